// Package rips computes persistent homology of the Vietoris–Rips filtration
// of a finite Euclidean point cloud: the barcode in dimensions 0 to 3 with
// coefficients in a prime field Z/p, and representative cocycles of the H1
// classes.
//
// # Filtration
//
// The Vietoris–Rips complex at scale t has a simplex for every set of
// points with pairwise distances at most t; a simplex enters the filtration
// at its diameter. Distances are computed once in double precision and
// replaced by their ranks among the distinct edge lengths, so all
// comparisons are integer comparisons. Simplices of equal diameter are
// ordered by decreasing combinatorial index (reverse colexicographic order
// of their vertex sets), which makes the filtration a total order; the
// barcode does not depend on that choice, only the pairing of simplices
// does.
//
// Simplices are never stored with their vertices. A k-simplex with vertices
// v_k > … > v_0 is the number Σ C(v_i, i+1) of the combinatorial number
// system, read back with a table of binomial coefficients, and its cofaces
// are enumerated on the fly from the rank matrix.
//
// # Method
//
// H0 comes from Kruskal's algorithm with a union–find forest on the edges
// sorted once: each edge that joins two components kills one of them
// (Zomorodian & Carlsson, "Computing persistent homology", Discrete Comput.
// Geom. 33, 2005).
//
// Higher dimensions are computed as persistent cohomology, dimension by
// dimension, by reducing the coboundary matrix column by column (de Silva,
// Morozov & Vejdemo-Johansson, "Dualities in persistent (co)homology",
// Inverse Problems 27, 2011), with the implicit matrix reduction of Bauer,
// "Ripser: efficient computation of Vietoris–Rips persistence barcodes",
// J. Appl. Comput. Topol. 5, 2021:
//
//   - clearing (twist): a simplex that was the pivot of a column one
//     dimension below kills a class, so its own column is skipped;
//   - apparent pairs: a simplex σ and its cofacet τ of the same diameter,
//     where τ is the first cofacet of σ in the filtration and σ the last
//     facet of τ, are a persistence pair of every reduction; both columns
//     are skipped, and the pair is used directly whenever τ turns up as a
//     pivot;
//   - emergent pairs: a column whose first cofacet is nobody's pivot yet is
//     reduced as it stands and pairs at once;
//   - the reduced columns are not stored: only the combination V of
//     simplices whose coboundaries sum to each of them is kept, and
//     coboundaries are enumerated again when a column is added.
//
// The working column is the merge of one lazily produced stream of cofacets
// per simplex of its chain, in filtration order, drawn from neighbour lists
// sorted by edge length. Streams wait in a bucket queue indexed by the
// diameter rank of their next cofacet (the pivot only moves forward), and
// the cofacets of one rank are summed in a hash table, so that most of
// them cancel without ever being ordered. Its memory grows with the chain,
// not with the coboundaries, and no cofacet beyond the final pivot is ever
// visited.
//
// The distances, the assembly of the columns of each dimension (with the
// apparent-pair tests) and the H1 candidates are computed in parallel;
// results do not depend on the number of workers. Before a computation the
// number of simplices below the threshold is estimated (edges exactly,
// higher simplices by sampling random cliques) and a computation that would
// exceed the memory budget is refused; the reduction watches its memory
// while it runs as well.
//
// # Conventions
//
// Bars of zero persistence are not reported. With Options.Threshold = 0
// edges are admitted up to the radius of the cloud, min_i max_j d(i, j):
// past it one point is joined to every other, so no bar can start or end,
// all bars are those of the complete filtration, and only one H0 class is
// essential. A smaller threshold cuts the filtration, and classes
// alive there are reported with Death = +Inf.
//
// A representative cocycle of an H1 bar [b, d) is the chain σ + V of the
// bar's birth edge σ: integer lifts in (−p/2, p/2] of Z/p coefficients on
// oriented edges {I, J}, I < J, whose coboundary vanishes on every triangle
// of diameter below d.
package rips
