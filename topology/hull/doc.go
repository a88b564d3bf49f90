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
// It is the one place where the packages pattern, embed, topology/rips and
// topology meet; the command line only prints what Analyze returns.
// AnalyzeContext stops when its context is done.
package hull
