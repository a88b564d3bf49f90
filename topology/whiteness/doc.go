// Package whiteness tells a chain of independent spacings — positions that
// wander from any lattice like a random walk, with no hull — from a chain
// that has one, by a calibrated rule on the spacing sequence alone.
//
// Position noise on any hull leaves the spacings' lag-1 autocorrelation
// near −½ (a moving average of order one; common practice), a continuous
// modulation or a tiling leaves spectral lines and autocorrelations that
// do not die away, and every hull keeps the positions within a bounded
// distance of a lattice. Independent spacings leave none of these: their
// sample autocorrelations at lags 1..L all vanish within their sampling
// error, and their positions wander like a random walk. Decide asks five
// readings, in two groups that must agree — the autocorrelations in time
// and the lines in frequency — before it calls the spacings independent:
//
//  1. whiteness in time: the Ljung–Box portmanteau statistic
//     Q = n(n+2) Σ_{k≤L} r_k²/(n−k) over L = n/5 lags (at least 3, at most
//     20; common practice) does not reject white noise against its χ²_L
//     law (Ljung & Box, Biometrika 65, 297, 1978), at 1% (5% up to
//     ShortSites sites);
//  2. not position noise: r_1 lies at least three standard errors above
//     −½, the standard error √(0.5/n) of r_1 for a moving average with
//     ρ = −½ (Bartlett 1946; common practice);
//  3. a spread above the noise: the independent part of the spacing
//     variance, γ_0 + 2γ_1 (position noise of variance σ² adds 2σ² to γ_0
//     and −σ² to γ_1), exceeds the variance the tolerated noise gives one
//     spacing;
//  4. a walk: W, the variance of the positions about their least-squares
//     line over n·γ_0, is at least the 1% point (5% up to ShortSites
//     sites) of its law for a walk of independent steps; a hull's W falls
//     as 1/n;
//  5. whiteness in frequency: the algebraic reading (package tones) finds
//     no spectral line at a false-alarm probability of 1%.
//
// Up to ShortSites sites the calibrated short-chain decision (package
// shortchain) must call the chain independent as well: there weak
// modulations drowned in position noise fool the five readings alone more
// often than 1%.
//
// The rule is calibrated (internal/calibrate, run by go generate): on
// 1000 seeded chains per size, noise and family with a hull
// (internal/hulls states the families: point, finite, circle, torus,
// 3-torus, decorated circle, Sturmian tiling) at position noises 0, 1, 3
// and 5% and sizes 16 to 20000 sites, it counts how often the rule calls
// them independent; table.go holds the counts, and Decide calls the
// spacings independent only at sizes whose worst cell (and that of the
// next calibrated size up) stays at or below 1%. It also counts how often
// the rule calls noise-free chains of independent spacings independent, by
// size and spread (1000 draws, 200 above 3000 sites), which gives the
// smallest size that would decide when it cannot.
package whiteness
