// Package hull runs the hull analysis of a pattern: it embeds the spacings
// as delay vectors, computes Vietoris–Rips barcodes of their landmarks,
// reads the Betti numbers off them with a stated significance rule, names
// the class of the hull (point, finite, circle, torus, or unresolved),
// measures the effective step angle(s) — the rotation number of the shift
// on the hull — and lists the gap labels the hull allows.
//
// It is the one place where the packages pattern, embed, topology/rips and
// topology meet; the command line only prints what Analyze returns.
package hull
