// Package ripstest holds what the persistence engine's reference checks and
// its benchmark against the reference program share: the seeded point
// clouds they run on, and the reading and writing of barcodes in the
// reference's notation.
//
// The clouds are samples of spaces whose homology is known (cube, circle,
// sphere, tori, the real projective plane) and delay clouds of chains built
// from explicit formulas. Every generator is deterministic: the same
// arguments give the same cloud. Quantize puts a cloud on a dyadic grid
// where this engine and the reference compute every length the same way.
//
// The reference program is Debian's ripser package, version 1.2.1: the
// binary ripser for coefficients in Z/2 and ripser-coeff for other primes.
// It computes in single precision and prints lengths with six significant
// digits. Bars are compared as text "dim:birth,death", death empty for a
// class that never dies: ParseReference reads the reference's output,
// FormatBars writes this engine's bars the same way, and Diff lists the
// bars found by one program only.
package ripstest
