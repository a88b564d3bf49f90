package rips

// The working column of a reduction is the coboundary δc of a chain
// c = Σ λ_s s of simplices. It is never written out: each simplex s of the
// chain contributes a stream, the cofacets of s in filtration order,
// produced on demand, and the column is the merge of the streams. A heap
// holds the next cofacet of each stream; the pivot is found by summing the
// heads that name the same simplex. Memory grows with the chain, not with
// the coboundaries, and cofacets beyond the final pivot are never visited.
//
// The cofacets of s (vertices v_0 > … > v_{k−1}, diameter rank r) come in
// two phases:
//
//  1. s ∪ {x} with rank(v_i, x) ≤ r for every i: diameter r, in
//     decreasing x (decreasing index). Found by scanning x downwards.
//  2. the others, by increasing diameter q = max_i rank(v_i, x) > r and,
//     for equal q, decreasing x: a merge of the neighbour lists of the
//     v_i, each sorted that way; a candidate x from the list of v_i is
//     taken when v_i is the first vertex of s with rank(v_i, x) = q (and
//     no vertex has a larger rank), so every cofacet appears once.

// neighbours lists, for every vertex u, the vertices within the threshold
// by increasing rank of the edge to u and, for equal ranks, decreasing
// vertex, each packed as rank<<32 | (2³²−1 − x) so that the packed keys
// increase along a list.
type neighbours struct {
	off  []uint32 // list of u: keys[off[u]:off[u+1]]
	keys []uint64
}

// newNeighbours fills the lists from the edges in filtration order
// (increasing rank, then decreasing index): for a fixed vertex u, the
// index of the edge {u, x} increases with x, so each list comes out sorted.
func newNeighbours(m *metric) neighbours {
	n := m.n
	off := make([]uint32, n+1)
	for _, id := range m.order {
		i, j := edgeVertices(int(id))
		off[i+1]++
		off[j+1]++
	}
	for u := 0; u < n; u++ {
		off[u+1] += off[u]
	}
	keys := make([]uint64, off[n])
	fill := append([]uint32(nil), off[:n]...)
	for _, id := range m.order {
		i, j := edgeVertices(int(id))
		r := uint64(m.rank[i*n+j]) << 32
		keys[fill[i]] = r | uint64(0xffffffff-uint32(j))
		fill[i]++
		keys[fill[j]] = r | uint64(0xffffffff-uint32(i))
		fill[j]++
	}
	return neighbours{off: off, keys: keys}
}

// firstAtLeast returns the position of the first entry of u's list with
// rank ≥ r.
func (nb *neighbours) firstAtLeast(u int, r uint32) uint32 {
	lo, hi := nb.off[u], nb.off[u+1]
	key := uint64(r) << 32
	for lo < hi {
		mid := lo + (hi-lo)/2
		if nb.keys[mid] < key {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	return lo
}

// stream is the coboundary of one chain simplex, with its next entry.
type stream struct {
	v    [MaxDim + 1]int32  // vertices, decreasing
	pos  [MaxDim + 1]uint32 // phase 2: cursors into the neighbour lists
	r    uint32             // diameter rank of the simplex
	coef uint32             // coefficient of the simplex in the chain
	x1   int32              // phase 1: next vertex to test; −1 when done
	head entry              // the next cofacet, with its coefficient
}

// working is a working column: the chain's streams and the heap of their
// heads (entry.coef holding the stream number).
type working struct {
	e       *engine
	k       int // vertices per chain simplex
	streams []stream
	heap    heap
}

func (w *working) reset(k int) {
	w.k = k
	w.streams = w.streams[:0]
	w.heap = w.heap[:0]
}

// add puts λ·δs into the column, for the simplex s with vertices vs and
// rank r, keeping only its cofacets after the entry from (all of them when
// from is nil). Skipping is exact when a whole reduced column with pivot
// *from is added: its simplices' cofacets before the pivot cancel, and λ is
// chosen to cancel the pivot itself.
func (w *working) add(vs []int, r, lambda uint32, from *entry) {
	e := w.e
	var s stream
	for i, v := range vs {
		s.v[i] = int32(v)
	}
	s.r, s.coef = r, lambda
	s.x1 = int32(e.n - 1)
	start := r + 1 // first rank of phase 2
	if from != nil && from.rank > r {
		s.x1 = -1 // phase 1 lies before from
		start = from.rank
	}
	for i := range w.k {
		s.pos[i] = e.nb.firstAtLeast(vs[i], start)
	}
	for {
		if !w.next(&s) {
			return
		}
		if from == nil || before(from, &s.head) {
			break
		}
	}
	id := uint32(len(w.streams))
	w.streams = append(w.streams, s)
	w.heap.push(entry{idx: s.head.idx, rank: s.head.rank, coef: id})
}

// next moves s to its next cofacet; false when there is none.
func (w *working) next(s *stream) bool {
	e := w.e
	n := e.n
	rank := e.m.rank
	k := w.k
	if s.x1 >= 0 {
		switch k {
		case 2:
			r0 := rank[int(s.v[0])*n : int(s.v[0])*n+n]
			r1 := rank[int(s.v[1])*n : int(s.v[1])*n+n]
			for x := int(s.x1); x >= 0; x-- {
				if r0[x] <= s.r && r1[x] <= s.r {
					s.x1 = int32(x - 1)
					w.emit(s, x, s.r)
					return true
				}
			}
		default:
		scan:
			for x := int(s.x1); x >= 0; x-- {
				for i := 0; i < k; i++ {
					if rank[int(s.v[i])*n+x] > s.r {
						continue scan
					}
				}
				s.x1 = int32(x - 1)
				w.emit(s, x, s.r)
				return true
			}
		}
		s.x1 = -1
	}
	nb := &e.nb
	for {
		best, bi := ^uint64(0), -1
		for i := 0; i < k; i++ {
			if p := s.pos[i]; p < nb.off[s.v[i]+1] {
				if key := nb.keys[p]; key < best {
					best, bi = key, i
				}
			}
		}
		if bi < 0 {
			return false
		}
		s.pos[bi]++
		q := uint32(best >> 32)
		x := int(0xffffffff - uint32(best))
		ok := true
		for i := 0; i < k; i++ {
			if i == bi {
				continue
			}
			if rr := rank[int(s.v[i])*n+x]; rr > q || (rr == q && i < bi) {
				ok = false
				break
			}
		}
		if ok {
			w.emit(s, x, q)
			return true
		}
	}
}

// emit sets the head of s to the cofacet s ∪ {x} of rank q.
func (w *working) emit(s *stream, x int, q uint32) {
	b := &w.e.b
	k := w.k
	var idx uint64
	j := 0 // vertices of s above x
	for j < k && int(s.v[j]) > x {
		idx += b.c(int(s.v[j]), k-j+1)
		j++
	}
	idx += b.c(x, k-j+1)
	for i := j; i < k; i++ {
		idx += b.c(int(s.v[i]), k-i)
	}
	c := s.coef
	if (k-j)&1 == 1 {
		c = w.e.f.p - c
	}
	s.head = entry{idx: idx, rank: q, coef: c}
}

// pivot returns the first entry of the column with a non-zero coefficient,
// consuming every head up to and including it; ok is false once the column
// is zero.
func (w *working) pivot() (piv entry, ok bool) {
	f := &w.e.f
	h := w.heap
	for len(h) > 0 {
		top := h[0]
		var sum uint32
		for len(h) > 0 && h[0].idx == top.idx {
			s := &w.streams[h[0].coef]
			sum = f.add(sum, s.head.coef)
			if w.next(s) {
				h.replaceTop(entry{idx: s.head.idx, rank: s.head.rank, coef: h[0].coef})
			} else {
				h.popTop()
			}
		}
		if sum != 0 {
			w.heap = h
			return entry{idx: top.idx, rank: top.rank, coef: sum}, true
		}
	}
	w.heap = h
	return entry{}, false
}

// chain returns the simplices of the chain after the first, with their
// coefficients.
func (w *working) chain(dst []entry) []entry {
	dst = dst[:0]
	b := &w.e.b
	vs := make([]int, w.k)
	for _, s := range w.streams[1:] {
		for i := range vs {
			vs[i] = int(s.v[i])
		}
		dst = append(dst, entry{idx: b.index(vs), rank: s.r, coef: s.coef})
	}
	return dst
}

// bytes is the memory the working column holds.
func (w *working) bytes() int64 {
	return int64(cap(w.streams))*int64(sizeofStream) + int64(cap(w.heap))*16
}

const sizeofStream = 4*(MaxDim+1)*2 + 4*3 + 16 + 4
