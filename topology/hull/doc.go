// Package hull runs the hull analysis of a pattern: it embeds the spacings
// as delay vectors, reads the class of the hull, measures the effective
// step angle(s) — the rotation number of the shift on the hull — with
// their uncertainties, and lists the gap labels the hull allows.
//
// The classes are point, finite, circle, torus, cantor, disordered and
// unresolved; Classes lists them with what each means, its Betti numbers
// and its gap-label generators, one entry per class.
//
// The class is decided by an ordered list of rules (decide.go): an exact
// period of the spacings, a tiling read through its word, a delay cloud
// with no direction above the noise, the barcodes of the delay cloud, a
// shaken lattice, independent spacings, and unresolved last. Each rule
// proposes a class or passes; the first proposal stands, and it is set in
// one place. The barcode rule works on a point cloud with its landmarks
// and sampling facts (cloud.go), not on the chain, so other sources of
// points on a hull can feed it.
//
// AnalyzePlane reads the hull of a plane of sites from its average
// lattice (package pattern/lattice): the spectral lines of the
// displacement field over the 2D index and their module (planelines.go),
// the patch cloud of displacements over a window of lattice steps through
// the same barcode stage, and the rotation matrix A (d×2, turns per
// lattice step) refined by a least-squares fit of the field (planefit.go)
// and checked against the measured noise. Its decision list (planeRules)
// lives in decide.go beside the chain's, and both set the class in one
// place (Result.setHull). The gap labels of a plane come from
// topology.PlaneGenerators: 1, the entries of A, det A for a two-torus
// (the second-Chern term) or the 2×2 minors for a three-torus.
//
// It is the one place where the packages pattern, embed, topology/rips and
// topology meet; the command line only prints what Analyze returns.
// AnalyzeContext stops when its context is done.
package hull
