package rips

import (
	"errors"
	"fmt"
	"math"
	"sync"
)

// noEdge is the rank of a pair of points farther apart than the threshold,
// and of a point with itself: every max over ranks that meets it exceeds
// every real rank, so such a simplex is never part of the complex.
const noEdge = math.MaxUint32

// metric holds the distances of the cloud as ranks. Ranks replace the
// lengths in every comparison: rank r stands for the r-th smallest distinct
// edge length vals[r], so a simplex's diameter is the largest rank among its
// edges, compared as an integer.
type metric struct {
	n         int
	rank      []uint32  // n×n, row-major; noEdge on the diagonal and above the threshold
	vals      []float64 // distinct edge lengths up to the threshold, ascending
	order     []uint32  // edges up to the threshold in filtration order, as edge indices
	threshold float64   // the largest edge length admitted
	radius    float64   // the radius of the cloud, min_i max_j d(i, j)
}

// flatten validates the cloud and copies it into one row-major slice.
func flatten(points [][]float64) ([]float64, int, error) {
	if len(points) == 0 {
		return nil, 0, errors.New("the point cloud is empty")
	}
	dim := len(points[0])
	if dim == 0 {
		return nil, 0, errors.New("point 1 has no coordinates")
	}
	flat := make([]float64, 0, len(points)*dim)
	for i, p := range points {
		if len(p) != dim {
			return nil, 0, fmt.Errorf("point %d has %d coordinates, point 1 has %d", i+1, len(p), dim)
		}
		for j, x := range p {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, 0, fmt.Errorf("point %d, coordinate %d: %v is not a finite number", i+1, j+1, x)
			}
		}
		flat = append(flat, p...)
	}
	return flat, dim, nil
}

// edgeVertices returns the vertices i < j of the edge with combinatorial
// index e = C(j, 2) + i.
func edgeVertices(e int) (i, j int) {
	j = int((1 + math.Sqrt(1+8*float64(e))) / 2)
	// Correct the floating-point estimate in either direction.
	for j*(j-1)/2 > e {
		j--
	}
	for (j+1)*j/2 <= e {
		j++
	}
	return e - j*(j-1)/2, j
}

// pairwise returns the Euclidean distances d(i, j), i < j, at their edge
// indices, and for every point the largest distance to another point. Rows
// are split among workers by equal numbers of pairs.
func pairwise(flat []float64, n, dim, workers int) (dist, far []float64) {
	m := n * (n - 1) / 2
	dist = make([]float64, m)
	far = make([]float64, n)
	if n < 2 {
		return dist, far
	}
	if workers > n-1 {
		workers = n - 1
	}
	fars := make([][]float64, workers)
	var wg sync.WaitGroup
	j0 := 1
	for w := 0; w < workers; w++ {
		// Rows j0 ≤ j < j1 hold about m/workers pairs.
		j1 := j0
		target := (w + 1) * (m / workers)
		if w == workers-1 {
			j1 = n
		} else {
			for j1 < n && j1*(j1-1)/2 < target {
				j1++
			}
		}
		fars[w] = make([]float64, n)
		wg.Add(1)
		go func(j0, j1 int, far []float64) {
			defer wg.Done()
			for j := j0; j < j1; j++ {
				pj := flat[j*dim : (j+1)*dim]
				row := dist[j*(j-1)/2 : j*(j-1)/2+j]
				for i := range row {
					pi := flat[i*dim : (i+1)*dim]
					var s float64
					for k, x := range pj {
						d := x - pi[k]
						s += d * d
					}
					d := math.Sqrt(s)
					row[i] = d
					if d > far[i] {
						far[i] = d
					}
					if d > far[j] {
						far[j] = d
					}
				}
			}
		}(j0, j1, fars[w])
		j0 = j1
	}
	wg.Wait()
	for _, f := range fars {
		for i, d := range f {
			far[i] = max(far[i], d)
		}
	}
	return dist, far
}

// newMetric ranks the edges of the cloud up to the threshold (0: the
// radius of the cloud; larger thresholds are lowered to it, where nothing
// changes any more).
func newMetric(flat []float64, n, dim int, threshold float64, workers int) *metric {
	dist, far := pairwise(flat, n, dim, workers)
	radius := 0.0
	if n > 1 {
		radius = math.Inf(1)
		for _, f := range far {
			radius = min(radius, f)
		}
	}
	t := radius
	if threshold > 0 && threshold < radius {
		t = threshold
	}

	// Edges up to t in filtration order: ascending length, ties by
	// descending index. Listing them by descending index and sorting
	// stably by length gives exactly that order.
	keys := make([]uint64, 0, len(dist))
	ids := make([]uint32, 0, len(dist))
	for e := len(dist) - 1; e >= 0; e-- {
		if d := dist[e]; d <= t {
			keys = append(keys, math.Float64bits(d))
			ids = append(ids, uint32(e))
		}
	}
	radixSort(keys, ids)

	// Distinct lengths and the rank of each edge, by edge index.
	byEdge := make([]uint32, len(dist))
	for e := range byEdge {
		byEdge[e] = noEdge
	}
	var vals []float64
	for k, key := range keys {
		if k == 0 || key != keys[k-1] {
			vals = append(vals, math.Float64frombits(key))
		}
		byEdge[ids[k]] = uint32(len(vals) - 1)
	}
	keys = nil
	dist = nil

	rank := make([]uint32, n*n)
	for j := 0; j < n; j++ {
		rank[j*n+j] = noEdge
		off := j * (j - 1) / 2
		for i := 0; i < j; i++ {
			r := byEdge[off+i]
			rank[j*n+i] = r
			rank[i*n+j] = r
		}
	}
	return &metric{n: n, rank: rank, vals: vals, order: ids, threshold: t, radius: radius}
}

// radixSort sorts keys ascending, carrying ids along, stably: a
// least-significant-digit radix sort on 16-bit digits that skips the digits
// all keys share (for lengths of similar size the exponent digits).
func radixSort(keys []uint64, ids []uint32) {
	n := len(keys)
	if n < 256 {
		insertionSort(keys, ids)
		return
	}
	src, dst := keys, make([]uint64, n)
	srcID, dstID := ids, make([]uint32, n)
	var count [1 << 16]int
	for shift := uint(0); shift < 64; shift += 16 {
		clear(count[:])
		for _, k := range src {
			count[(k>>shift)&0xffff]++
		}
		if count[(src[0]>>shift)&0xffff] == n {
			continue // every key has this digit
		}
		sum := 0
		for d, c := range count {
			count[d] = sum
			sum += c
		}
		for i, k := range src {
			d := (k >> shift) & 0xffff
			p := count[d]
			count[d]++
			dst[p] = k
			dstID[p] = srcID[i]
		}
		src, dst = dst, src
		srcID, dstID = dstID, srcID
	}
	if &src[0] != &keys[0] {
		copy(keys, src)
		copy(ids, srcID)
	}
}

// insertionSort sorts short inputs stably.
func insertionSort(keys []uint64, ids []uint32) {
	for i := 1; i < len(keys); i++ {
		k, id := keys[i], ids[i]
		j := i
		for j > 0 && keys[j-1] > k {
			keys[j], ids[j] = keys[j-1], ids[j-1]
			j--
		}
		keys[j], ids[j] = k, id
	}
}
