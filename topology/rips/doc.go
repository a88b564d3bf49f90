// Package rips computes persistent homology of the Vietoris–Rips filtration
// of a finite Euclidean point cloud.
package rips
