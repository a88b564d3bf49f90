package rips

// entry is one coefficient of a coboundary column: the simplex with
// combinatorial index idx, its diameter rank, and its coefficient in Z/p.
type entry struct {
	idx  uint64
	rank uint32
	coef uint32
}

// before reports whether a comes before b in the filtration: smaller
// diameter first, and among equal diameters the larger index first (reverse
// colexicographic order). The pivot of a coboundary column is its entry
// that comes first.
func before(a, b *entry) bool {
	return a.rank < b.rank || (a.rank == b.rank && a.idx > b.idx)
}
