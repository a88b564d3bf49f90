// Package pattern holds the point patterns that phasonhull analyses: an
// ordered list of site positions along a chain, with its unit and where it
// came from.
//
// A Pattern is read from the files a practitioner holds (a column of
// positions or spacings, two- or three-dimensional centroids from a
// microscope or coordinate-measuring scan, a word of tile letters, JSON) or
// generated from a design family (periodic, modulated, loop, two-angle,
// Sturmian, substitution, random), optionally perturbed the way fabrication
// perturbs a sample.
//
// A Plane is a two-dimensional point set, the sites of a plate: ReadSites
// reads a chain or a plane, telling them apart by the one rule IsPlanar,
// and WritePlane writes a plane as CSV.
//
// Every reader validates what it reads and refuses bad input with an error
// that names the file, the line and the column; nothing here writes files.
package pattern
