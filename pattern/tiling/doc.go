// Package tiling recognises chains built from a few tile lengths and
// describes the order of their tiles.
//
// Detect decides from the spacings alone, robustly to position noise,
// whether a chain is a tiling: a few lengths, each spacing one of them up to
// noise, with rare spacings that are the sum of two tiles (a missing site)
// marked as such. It reports the lengths, their counts and scatter and the
// tile word, one letter per spacing.
//
// Analyze reads the tile word: its complexity function p(n), the number of
// distinct factors of length n, for the lengths the data support; the class
// of order that p implies (periodic, Sturmian, aperiodic of zero entropy, or
// of positive entropy); the empirical frequencies of letters and short
// factors; and, for a Sturmian word, its angle.
package tiling
