// Package shortchain calls the class of a short chain — 16 to about 200
// sites, what many fabricated samples have — where a hull cannot be read
// from barcodes: a lattice with position noise, a periodic cell of 2 to 6
// spacings, one angle with up to three harmonics, or spacings that vary
// independently; or Undecided, with the smallest size that would decide.
//
// The decision is a model comparison of the spacings (models.go). Position
// noise on a lattice leaves the spacings' lag-1 autocorrelation at −½ and
// independent spacings leave it at 0 (common practice); the Gaussian
// likelihoods of the two covariance shapes tell them apart without ever
// measuring a noise level and then calling the spacings equal up to it.
// The mean of the positions — a trend, a cell, a harmonic series of one
// fitted angle — separates the other classes. Each model is scored by its
// maximised log-likelihood less k·ln M for its k parameters, and the best
// class is called only when it leads every other by a margin calibrated by
// simulation.
//
// The calibration (internal/calibrate, run by go generate) draws 1000
// seeded chains of each class (internal/null states the families) for each
// size in {16, 24, 32, 48, 64, 100, 150, 200} and each position noise in
// {0, 0.5, 1, 2, 3}% of the spacing, and chooses for each size the margin
// each class needs so that the chains of every other class are called
// falsely at most 0.3% of the time in total in every cell; table.go holds
// the margins and the resulting counts. A Decision carries the false-call
// rate of its cell, and the tests re-measure the rate on fresh draws.
// Sizes between the calibrated ones take the larger margin of their two
// neighbours; chains noisier than 4.5% of the spacing are not called a
// position-noise class.
package shortchain
