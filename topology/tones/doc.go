// Package tones reads a chain algebraically: the frequency content of its
// spacing sequence s_n = x_{n+1} − x_n.
//
// A chain whose positions carry a continuous modulation by angles θ1 … θd
// and a periodic cell of p sites has spacings that are a sum of sinusoids
// at frequencies in the module (1/p)Z + Zθ1 + … + Zθd, plus noise. Read
// finds the strong spectral lines of the spacings (periodogram of the
// tapered sequence, a noise floor fitted robustly off the lines, a
// threshold from a stated false-alarm probability over the whole spectrum),
// refines each line's frequency by nonlinear least squares with a standard
// error from the fit, subtracts and looks again; then it finds the integer
// relations among the line frequencies and 1: the rational part 1/p, the
// rank d of what remains, a basis of d angles reduced to small
// coefficients, and each line's integer coordinates in it.
//
// The threshold is conservative: on white Gaussian spacings, 5 spectra in
// 1000 of 300 spacings showed a false line at a stated 10%, none at 1%
// or 0.1%, and none in 200 of 5000 spacings. A line too imprecise for the
// relation search to tell a second harmonic or a cell of four sites from
// chance is reported without coordinates and not counted in the rank, so
// that a short or noisy chain gives a partial reading (a period dividing
// the true one, a rank at most the true one) rather than a wrong one: the
// reading is complete for chains of 2000 spacings at 1% position noise
// with modulation amplitudes of a few hundredths of the spacing, not
// always at 300.
//
// The reading decides no hull class: an empty list of lines means no line
// above the noise, which a lattice, a shaken lattice and independent
// spacings all give; the hull analysis compares the reading with the
// topological one.
package tones
