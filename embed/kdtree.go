package embed

import "gonum.org/v1/gonum/spatial/kdtree"

// treePoint is a point of one of the package's k-d trees (delay vectors
// under the Euclidean norm, samples under the maximum norm): a
// kdtree.Comparable that exposes its coordinates.
type treePoint interface {
	kdtree.Comparable
	coords() []float64
}

// treeSet implements kdtree.Interface for a slice of points of one kind.
type treeSet[P treePoint] []P

func (s treeSet[P]) Index(i int) kdtree.Comparable         { return s[i] }
func (s treeSet[P]) Len() int                              { return len(s) }
func (s treeSet[P]) Slice(start, end int) kdtree.Interface { return s[start:end] }

// Pivot partitions the set about the median of coordinate d, as the
// tree's construction needs.
func (s treeSet[P]) Pivot(d kdtree.Dim) int {
	return kdtree.Partition(treePlane[P]{s, d}, kdtree.MedianOfMedians(treePlane[P]{s, d}))
}

// treePlane sorts a treeSet along one coordinate.
type treePlane[P treePoint] struct {
	treeSet[P]
	dim kdtree.Dim
}

func (p treePlane[P]) Less(i, j int) bool {
	return p.treeSet[i].coords()[p.dim] < p.treeSet[j].coords()[p.dim]
}
func (p treePlane[P]) Swap(i, j int) { p.treeSet[i], p.treeSet[j] = p.treeSet[j], p.treeSet[i] }
func (p treePlane[P]) Slice(start, end int) kdtree.SortSlicer {
	return treePlane[P]{p.treeSet[start:end], p.dim}
}
