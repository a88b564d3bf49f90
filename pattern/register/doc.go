// Package register matches the sites of a measured chain to the sites of
// its design and fits the calibration between them: an offset, a global
// scale and, optionally, a linear drift of the scale along the chain.
//
// Register alternates two steps until the matching no longer changes
// (the iterative-closest-point scheme of Besl & McKay, IEEE Trans. PAMI 14,
// 1992, with the closest-point step replaced by an order-preserving
// alignment):
//
//  1. Matching: the design sites, mapped through the current calibration,
//     and the measured sites, both sorted along the chain, are aligned by
//     dynamic programming. An alignment is a one-to-one, order-preserving
//     set of matched pairs; every design site left out is missing, every
//     measured site left out is extra. Matching a pair costs its squared
//     residual relative to the pair's gate, leaving a site out costs one,
//     and a pair may only be matched inside its gate, a fixed fraction of
//     the smaller design spacing next to the design site.
//  2. Calibration: the matched pairs are fitted by iteratively reweighted
//     least squares with Tukey's biweight on residuals scaled by a robust
//     sigma (1.4826 times the median absolute deviation), so that
//     displaced sites do not pull the calibration.
//
// Once the matching has settled, every offset of the whole alignment that
// could compete is tried (see settle in shift.go): the matching shifted by
// one site, two, … either way along the measured chain, from which the
// matching and calibration settle again, for as long as the result or the
// shift itself could tie with the best. Their costs (the objective of the
// alignment, with an uncertainty from the scatter of the residuals) are
// compared; among those that tie with the cheapest, the one leaving the
// fewest sites unmatched is kept, so that a missing and an extra site that
// a one-site shift of the whole alignment explains are never reported.
// Alignments that still tie with the one kept are listed in Result.Ties
// rather than dropped silently: the data cannot tell them apart.
//
// The first calibration is chosen among the lines through a pair of sites
// near each end of both chains, so that missing or extra sites at the ends
// do not derail it; both directions are tried, so that a chain measured
// from its other end is registered too (with a negative scale).
//
// RegisterPlane does the same for sites in the plane: the calibration is
// a similarity (offset, rotation, scale) fitted by the same robust fit;
// the first calibrations come from the average lattices of both sets
// (pattern/lattice), one per rotation the lattice allows, and the offset
// search runs over lattice vectors, so that the modulation of the design
// decides between alignments a lattice alone cannot tell apart, and the
// ties it cannot decide are listed (PlaneResult.Ties). Merged and swapped
// sites are a chain's notions and are not looked for in a plane.
//
// The result lists the matched pairs with their residuals, the missing,
// extra, merged and swapped sites, robust outliers, the calibration
// with its standard errors, and the cost of the alignment with its ties.
package register
