// Package topology reads the shape of a hull off its landmark cloud:
// Vietoris–Rips persistent homology written here, the classification of the
// hull from its barcodes, circular coordinates, the effective step angle and
// the gap-label group it implies.
package topology
