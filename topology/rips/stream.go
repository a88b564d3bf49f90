package rips

import (
	"math/bits"
	"slices"
	"unsafe"
)

// The working column of a reduction is the coboundary δc of a chain
// c = Σ λ_s s of simplices. It is never written out: each simplex s of the
// chain contributes a stream, the cofacets of s in filtration order,
// produced on demand, and the column is the merge of the streams. Each
// stream waits under the diameter rank of its next cofacet; the pivot is
// found rank by rank by summing the waiting cofacets that name the same
// simplex. Memory grows with the chain, not with the coboundaries, and
// cofacets beyond the final pivot are never visited.
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

// key returns the entry at position p of u's list, or ^0 past its end.
func (nb *neighbours) key(u int, p uint32) uint64 {
	if p < nb.off[u+1] {
		return nb.keys[p]
	}
	return ^uint64(0)
}

// stream is the coboundary of one chain simplex, with its next entry.
type stream struct {
	v    [MaxDim + 1]int32  // vertices, decreasing
	pos  [MaxDim + 1]uint32 // phase 2: cursors into the neighbour lists
	hk   [MaxDim + 1]uint64 // the keys at the cursors; ^0 past the end
	r    uint32             // diameter rank of the simplex
	coef uint32             // coefficient of the simplex in the chain
	x1   int32              // phase 1: next vertex to test; −1 when done
	link int32              // next stream waiting in the same bucket
	head entry              // the next cofacet, with its coefficient; rank noEdge once exhausted
}

// working is a working column: the chain's streams, waiting for their
// heads in a bucket queue indexed by diameter rank (the pivot only moves
// forward, so the queue is monotone and every wait costs O(1)). The
// entries at the rank being merged are summed in a hash table, and only
// the simplices whose sums are not zero enter a heap by decreasing index.
type working struct {
	e       *engine
	k       int // vertices per chain simplex
	streams []stream
	first   []int32  // per rank: the first stream waiting there, or −1
	bits    []uint64 // per rank: its bucket holds a stream
	summary []uint64 // per word of bits: the word is not zero
	cur     uint32   // the rank being merged
	acc     accumulator
	// The pivots at rank cur are found by scanning acc for the largest
	// index with a non-zero sum. After scanPivots pivots at one rank the
	// survivors are sorted into sorted (consumed from its end), and
	// simplices that become non-zero later go into the max-heap alive.
	scans  int
	sorted []uint64
	alive  []uint64
}

// scanPivots is the number of pivots found by scanning at one rank before
// the rank's survivors are put in a heap.
const scanPivots = 4

func newWorking(e *engine) *working {
	ranks := len(e.m.vals)
	w := &working{e: e, first: make([]int32, ranks), bits: make([]uint64, (ranks+63)/64)}
	w.summary = make([]uint64, (len(w.bits)+63)/64)
	for i := range w.first {
		w.first[i] = -1
	}
	w.acc.init(64)
	return w
}

// reset empties the column for chain simplices of k vertices whose
// cofacets all have rank ≥ r.
func (w *working) reset(k int, r uint32) {
	for i := range w.streams {
		if q := w.streams[i].head.rank; q != noEdge {
			w.first[q] = -1
			w.bits[q/64] = 0
			w.summary[q/4096] = 0
		}
	}
	w.k = k
	w.streams = w.streams[:0]
	w.alive = w.alive[:0]
	w.sorted = w.sorted[:0]
	w.scans = 0
	w.cur = r
	w.acc.clear()
}

// schedule merges the entries of stream sid at the current rank and files
// it under the rank of its next head.
func (w *working) schedule(sid int32) {
	s := &w.streams[sid]
	for s.head.rank == w.cur {
		if old, sum := w.acc.add(s.head.idx, s.head.coef, &w.e.f); old == 0 && sum != 0 && w.scans > scanPivots {
			w.pushAlive(s.head.idx)
		}
		if !w.next(s) {
			s.head.rank = noEdge
			return
		}
	}
	q := s.head.rank
	s.link = w.first[q]
	w.first[q] = sid
	w.bits[q/64] |= 1 << (q % 64)
	w.summary[q/4096] |= 1 << (q / 64 % 64)
}

// nextRank returns the smallest rank ≥ r with a waiting stream.
func (w *working) nextRank(r uint32) (uint32, bool) {
	wi := int(r / 64)
	if wi >= len(w.bits) {
		return 0, false
	}
	if word := w.bits[wi] &^ (1<<(r%64) - 1); word != 0 {
		return uint32(wi*64 + bits.TrailingZeros64(word)), true
	}
	wi++
	si := wi / 64
	if si >= len(w.summary) {
		return 0, false
	}
	sw := w.summary[si] &^ (1<<(wi%64) - 1)
	for sw == 0 {
		si++
		if si >= len(w.summary) {
			return 0, false
		}
		sw = w.summary[si]
	}
	wj := si*64 + bits.TrailingZeros64(sw)
	return uint32(wj*64 + bits.TrailingZeros64(w.bits[wj])), true
}

// take makes r the current rank and merges the streams waiting there.
func (w *working) take(r uint32) {
	w.cur = r
	w.scans = 0
	w.alive = w.alive[:0]
	w.sorted = w.sorted[:0]
	w.acc.clear()
	sid := w.first[r]
	w.first[r] = -1
	w.bits[r/64] &^= 1 << (r % 64)
	if w.bits[r/64] == 0 {
		w.summary[r/4096] &^= 1 << (r / 64 % 64)
	}
	for sid >= 0 {
		next := w.streams[sid].link
		w.schedule(sid)
		sid = next
	}
}

// pushAlive and popAlive keep w.alive a binary max-heap.
func (w *working) pushAlive(idx uint64) {
	h := append(w.alive, idx)
	i := len(h) - 1
	for i > 0 {
		parent := (i - 1) / 2
		if h[parent] >= idx {
			break
		}
		h[i] = h[parent]
		i = parent
	}
	h[i] = idx
	w.alive = h
}

func (w *working) popAlive() {
	h := w.alive
	last := len(h) - 1
	c := h[last]
	h = h[:last]
	w.alive = h
	if last == 0 {
		return
	}
	i := 0
	for {
		l := 2*i + 1
		if l >= last {
			break
		}
		if r := l + 1; r < last && h[r] > h[l] {
			l = r
		}
		if h[l] <= c {
			break
		}
		h[i] = h[l]
		i = l
	}
	h[i] = c
}

// accumulator sums coefficients by simplex index at one rank: open
// addressing with linear probing, emptied in O(1) by a generation stamp.
type accumulator struct {
	keys  []uint64
	sums  []uint32
	gens  []uint32
	used  []int32 // the slots filled in this generation
	gen   uint32
	shift uint
}

func (a *accumulator) init(size int) {
	a.keys = make([]uint64, size)
	a.sums = make([]uint32, size)
	a.gens = make([]uint32, size)
	a.gen = 1
	a.used = a.used[:0]
	a.shift = 64
	for s := size; s > 1; s >>= 1 {
		a.shift--
	}
}

func (a *accumulator) clear() {
	a.gen++
	a.used = a.used[:0]
	if a.gen == 0 { // the stamp wrapped around
		clear(a.gens)
		a.gen = 1
	}
}

// slot finds idx, or the empty slot where it belongs.
func (a *accumulator) slot(idx uint64) (int, bool) {
	mask := len(a.keys) - 1
	for i := int((idx * 0x9e3779b97f4a7c15) >> a.shift); ; i = (i + 1) & mask {
		if a.gens[i] != a.gen {
			return i, false
		}
		if a.keys[i] == idx {
			return i, true
		}
	}
}

// add adds c to the sum of idx and returns the sums before and after.
func (a *accumulator) add(idx uint64, c uint32, f *field) (old, sum uint32) {
	i, found := a.slot(idx)
	if found {
		old = a.sums[i]
		sum = f.add(old, c)
		a.sums[i] = sum
		return old, sum
	}
	if 2*(len(a.used)+1) > len(a.keys) {
		a.grow()
		i, _ = a.slot(idx)
	}
	a.keys[i], a.sums[i], a.gens[i] = idx, c, a.gen
	a.used = append(a.used, int32(i))
	return 0, c
}

// largest returns the largest index with a non-zero sum.
func (a *accumulator) largest() (uint64, bool) {
	var best uint64
	found := false
	for _, i := range a.used {
		if a.sums[i] != 0 && (!found || a.keys[i] > best) {
			best, found = a.keys[i], true
		}
	}
	return best, found
}

// take returns the sum of idx and sets it to zero.
func (a *accumulator) take(idx uint64) uint32 {
	i, found := a.slot(idx)
	if !found {
		return 0
	}
	s := a.sums[i]
	a.sums[i] = 0
	return s
}

func (a *accumulator) grow() {
	keys, sums, used := a.keys, a.sums, a.used
	a.init(2 * len(keys))
	a.used = make([]int32, 0, 2*cap(used))
	for _, i := range used {
		j, _ := a.slot(keys[i])
		a.keys[j], a.sums[j], a.gens[j] = keys[i], sums[i], a.gen
		a.used = append(a.used, int32(j))
	}
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
		s.hk[i] = e.nb.key(vs[i], s.pos[i])
	}
	for {
		if !w.next(&s) {
			return // nothing after from
		}
		if from == nil || before(from, &s.head) {
			break
		}
	}
	w.streams = append(w.streams, s)
	w.schedule(int32(len(w.streams) - 1))
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
		case 3:
			r0 := rank[int(s.v[0])*n : int(s.v[0])*n+n]
			r1 := rank[int(s.v[1])*n : int(s.v[1])*n+n]
			r2 := rank[int(s.v[2])*n : int(s.v[2])*n+n]
			for x := int(s.x1); x >= 0; x-- {
				if r0[x] <= s.r && r1[x] <= s.r && r2[x] <= s.r {
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
		best, bi := s.hk[0], 0
		for i := 1; i < k; i++ {
			if s.hk[i] < best {
				best, bi = s.hk[i], i
			}
		}
		if best == ^uint64(0) {
			return false
		}
		s.pos[bi]++
		s.hk[bi] = nb.key(int(s.v[bi]), s.pos[bi])
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
	for {
		if w.scans < scanPivots {
			if idx, ok := w.acc.largest(); ok {
				w.scans++
				return entry{idx: idx, rank: w.cur, coef: w.acc.take(idx)}, true
			}
		} else {
			if w.scans == scanPivots {
				// Many pivots at this rank: sort the survivors.
				w.scans++
				a := &w.acc
				for _, i := range a.used {
					if a.sums[i] != 0 {
						w.sorted = append(w.sorted, a.keys[i])
					}
				}
				slices.Sort(w.sorted)
			}
			for len(w.sorted) > 0 || len(w.alive) > 0 {
				var idx uint64
				if len(w.alive) == 0 || (len(w.sorted) > 0 && w.sorted[len(w.sorted)-1] > w.alive[0]) {
					idx = w.sorted[len(w.sorted)-1]
					w.sorted = w.sorted[:len(w.sorted)-1]
				} else {
					idx = w.alive[0]
					w.popAlive()
				}
				if c := w.acc.take(idx); c != 0 {
					return entry{idx: idx, rank: w.cur, coef: c}, true
				}
			}
		}
		r, ok := w.nextRank(w.cur)
		if !ok {
			return entry{}, false
		}
		w.take(r)
	}
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
	return int64(cap(w.streams))*int64(unsafe.Sizeof(stream{})) + int64(cap(w.alive)+cap(w.sorted))*8 +
		int64(len(w.acc.keys))*16 + int64(len(w.first))*4 + int64(len(w.bits)+len(w.summary))*8
}
