// Package topology holds the measurements the hull analysis makes on a
// hull once its shape is known: circular coordinates from a persistent H1
// cocycle, rotation numbers and their least-squares refinement on the site
// positions, the gap labels an angle or a period implies (and, for a
// plane, the group of a torus moved by Z² through a rotation matrix:
// PlaneGenerators), frequency modules and integer relations among measured
// frequencies.
//
// The persistence engine is package topology/rips; the analysis that ties
// the pipeline together and names the class of a hull is package
// topology/hull.
package topology
