package rips

// entry is one coefficient of a coboundary column: the simplex with
// combinatorial index idx, its diameter rank, and its coefficient in Z/p
// (or, in the heap of a working column, the number of the stream it heads).
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

// heap is a binary min-heap of entries in filtration order.
type heap []entry

func (h *heap) push(e entry) {
	s := append(*h, e)
	i := len(s) - 1
	for i > 0 {
		parent := (i - 1) / 2
		if !before(&e, &s[parent]) {
			break
		}
		s[i] = s[parent]
		i = parent
	}
	s[i] = e
	*h = s
}

// replaceTop replaces the first entry by e, which may come anywhere.
func (h heap) replaceTop(e entry) {
	last := len(h)
	i := 0
	for {
		l := 2*i + 1
		if l >= last {
			break
		}
		if r := l + 1; r < last && before(&h[r], &h[l]) {
			l = r
		}
		if !before(&h[l], &e) {
			break
		}
		h[i] = h[l]
		i = l
	}
	h[i] = e
}

// popTop removes the first entry.
func (h *heap) popTop() {
	s := *h
	last := len(s) - 1
	e := s[last]
	s = s[:last]
	*h = s
	if last > 0 {
		s.replaceTop(e)
	}
}
