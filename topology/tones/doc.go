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
// The reading decides no hull class: an empty list of lines means no line
// above the noise, which a lattice, a shaken lattice and independent
// spacings all give; the hull analysis compares the reading with the
// topological one.
package tones
