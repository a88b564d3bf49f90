// Package spectrum computes spectra of operators on a chain of sites — the
// gaps, their integrated density of states (IDS) and gap labels, and the
// boundary states that cross them as the phason moves.
//
// # Operators
//
// New builds an Operator on a pattern from a Model: a tight-binding
// (Hopping) matrix
//
//	H = Σ_n ε_n |n⟩⟨n| − Σ_bonds t (|n⟩⟨m| + |m⟩⟨n|)
//
// — note the minus sign: a uniform chain's band is ε − 2t·cos k — or the
// dynamical matrix of unit masses joined by springs (Springs), whose
// eigenvalues are squared angular frequencies ω². The coupling of a bond
// follows from the distance it spans by a Law: Exp
// (t = t0·exp(−decay·(d/d̄ − 1)), d̄ the mean spacing), Power
// (t = t0·(d/d̄)^(−power)) or a Table of distances and couplings,
// interpolated linearly and never extrapolated. Next-nearest bonds carry
// NNN times the law at the mean of the two spacings they span. On-site
// terms are a constant, a list, and the almost-Mathieu term
// 2λ·cos 2π(nθ + φ). Ends are open, or periodic across a closing spacing
// (the mean spacing unless given).
//
// # Spectra
//
// Nearest-neighbour operators are tridiagonal (with two corner entries
// when periodic): the number of eigenvalues below an energy is counted in
// O(N) by the signs of the LDLᵀ pivots (Sturm sequences), so chains of
// 10^5–10^6 sites are analysed by counting on an energy grid and locating
// gap edges by bisection. Up to DenseLimit sites every eigenvalue can be
// computed: the implicit QL iteration for an open tridiagonal matrix,
// bisection for a periodic one, and gonum's dense symmetric eigensolver
// (mat.EigenSym) for next-nearest bonds, which are limited to DenseLimit
// sites.
//
// # Gaps, IDS and labels
//
// Analyze reports the gaps wider than MinGap (relative to the spectrum's
// width). The IDS of a gap is the number of levels at or below its lower
// edge over N. On an open chain a gap can hold boundary states, whose
// eigenvectors sit on the ends; they are recognised by their weight (more
// than half on the first and last tenth of the chain), listed with the gap
// and left out of its count: the bulk counting convention. A periodic
// chain closed across a spacing that breaks the pattern has a seam, which
// can hold such states too, and they are treated alike.
//
// By the gap-labelling theorem (Johnson & Moser, Commun. Math. Phys. 84,
// 1982, for quasi-periodic Schrödinger operators; Bellissard, "Gap
// labelling theorems for Schrödinger operators", 1992, in general) the IDS
// in a gap of an operator built equivariantly from a pattern whose hull is
// a circle rotated by θ lies in Z + Zθ, and for a periodic pattern of p
// sites per cell it is k/p (Bloch's theorem). A finite chain's count of
// levels below a gap differs from N times the infinite chain's IDS by the
// charge held at the ends, a bounded number of levels, so a gap matches a
// label when its IDS lies within DefaultResolution/N (3/N) of it
// (topology.MatchLabel, which also refuses a match that another label
// would fit as well). A gap that matches no label is reported unlabelled,
// never forced: the angle may be off, the coefficients above MaxCoeff, or
// the operator may break the pattern's symmetry.
//
// ChooseLabels decides what labels a spectrum: given angles or a period,
// a design's own angles or cell, or the hull analysis of the pattern
// (hull.Result.LabelGroup), in that order, and how wide a match is when
// the angles were measured; Labelling.Apply puts its choice into Options.
//
// # Reports
//
// A Report gathers a spectrum's gaps with the operator they were computed
// on (Model.Info) and what labelled them (Report.Label records a
// Labelling), in the phasonhull.spectrum/1 JSON form; WriteText writes it
// for a reader and WriteLevels its levels, or counting staircase, as CSV.
// WriteScan writes the spectra of ScanTheta over a grid of θ (ParseGrid)
// as CSV.
//
// # Boundary states and the gap label
//
// EdgeModes moves the pattern through one turn of its phase (a Sweep,
// e.g. PhaseSweep of a design) and follows, on an open chain, the levels
// inside each of the widest gaps, each put on the end that holds more of
// its weight. It counts signed crossings of the gap's middle: +1 for a
// level moving up through it, −1 down. For a pattern whose phase advances
// by θ from one site to the next, swept with the phase increasing, and a
// gap of label IDS = n + mθ, the states on the first end (site 1) cross
// m times net and those on the last end −m times (EdgeGap.Agrees; the
// tests check it on the widest gaps of modulated designs). In outline:
// shifting the phase by θ drops the first site, which by Cauchy
// interlacing changes the count below the gap by 0 or 1, so the first
// end's boundary charge Q(φ) (count minus N times the IDS) obeys
// Q(φ+θ) = Q(φ) + n + mθ − j(φ) with j(φ) an integer; a charge that rises
// steadily by F per turn between its jumps of −1 at upward crossings can
// satisfy that only with F = m, θ being irrational. Written with the
// folded angle 1 − θ instead, every m changes sign.
package spectrum
