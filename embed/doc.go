// Package embed turns the spacings of a pattern into the trace its hull
// leaves: delay-coordinate vectors of consecutive spacings, made
// dimensionless by the mean spacing, with the window length chosen from the
// data, the cloud centred and whitened on its significant components, and
// landmarks picked by max–min (farthest point) sampling.
//
// The package also holds the nearest-neighbour estimators the hull analysis
// needs (entropy, mutual information, intrinsic dimension).
package embed
