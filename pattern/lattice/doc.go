// Package lattice recovers the average lattice of a two-dimensional point
// set: its basis vectors with their uncertainty, the lattice index of every
// site, the sites that sit on no lattice point, and the displacement field
// of the sites from their lattice points.
package lattice
