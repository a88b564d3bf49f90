package embed

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
)

// Coincident is the distance, relative to the extent of the cloud, below
// which Landmarks treats a point as a copy of its nearest landmark.
const Coincident = 1e-9

// parallelMin is the cloud size from which Landmarks splits each sweep over
// goroutines; below it the goroutine start-up costs more than it saves.
const parallelMin = 1 << 14

// Landmarks picks m landmarks from points by max–min (farthest point)
// sampling: the first is drawn from a source seeded with seed, and each
// next one is the point farthest from all landmarks chosen before it (ties
// go to the lowest index). It returns the landmark indices in the order
// chosen and the cover radius, the largest distance of any point from its
// nearest landmark.
//
// Max–min sampling gives a cover within a factor 2 of the best possible
// cover radius for m centres (Gonzalez, Theoretical Computer Science 38,
// 293, 1985), and the landmarks are spread evenly over the cloud, which is
// what a Vietoris–Rips complex on them needs (de Silva & Carlsson,
// Eurographics Symposium on Point-Based Graphics, 2004).
//
// When m ≥ len(points) every point is returned and the cover radius is 0.
// Sampling stops early, with fewer than m landmarks, once every point lies
// within Coincident times the cloud's extent (the largest distance from
// the first landmark) of a landmark: such points are copies of a landmark
// up to rounding, and a cloud of a few distinct points returns one
// landmark for each.
//
// The cost is O(n·m) distance evaluations: each point keeps its distance to
// its nearest landmark, updated once per new landmark; the sweeps are split
// over runtime.GOMAXPROCS goroutines for large clouds.
func Landmarks(points [][]float64, m int, seed uint64) ([]int, float64, error) {
	n := len(points)
	if n == 0 {
		return nil, 0, fmt.Errorf("landmarks: the cloud is empty")
	}
	if m < 1 {
		return nil, 0, fmt.Errorf("landmarks: %d requested, need at least 1", m)
	}
	dim := len(points[0])
	for i, p := range points {
		if len(p) != dim {
			return nil, 0, fmt.Errorf("landmarks: point %d has %d coordinates, point 0 has %d", i, len(p), dim)
		}
	}
	if m >= n {
		all := make([]int, n)
		for i := range all {
			all[i] = i
		}
		return all, 0, nil
	}

	// Invariant: after each sweep near[i] is the squared distance from
	// point i to its nearest landmark so far, and far is the index of the
	// largest near[i] (lowest index among equals).
	near := make([]float64, n)
	for i := range near {
		near[i] = math.Inf(1)
	}
	rng := rand.New(rand.NewPCG(seed, 0))
	chosen := []int{rng.IntN(n)}
	workers := 1
	if n >= parallelMin {
		workers = min(runtime.GOMAXPROCS(0), n/(parallelMin/4))
	}
	extent := -1.0 // squared distance of the farthest point from the first landmark
	for {
		far, farDist := sweep(points, near, points[chosen[len(chosen)-1]], workers)
		if extent < 0 {
			extent = farDist
		}
		if len(chosen) == m || farDist <= Coincident*Coincident*extent {
			return chosen, math.Sqrt(farDist), nil
		}
		chosen = append(chosen, far)
	}
}

// sweep lowers near[i] to the squared distance from point i to the new
// landmark l where that is closer, and returns the index and value of the
// largest near[i] (lowest index among equals). The points are split into
// contiguous chunks, one per worker; each chunk's farthest point is
// combined in chunk order, so the result does not depend on scheduling.
func sweep(points [][]float64, near []float64, l []float64, workers int) (int, float64) {
	n := len(points)
	chunk := (n + workers - 1) / workers
	idx := make([]int, workers)
	val := make([]float64, workers)
	var wg sync.WaitGroup
	for w := range workers {
		lo, hi := w*chunk, min((w+1)*chunk, n)
		work := func() {
			bi, bv := lo, -1.0
			for i := lo; i < hi; i++ {
				p := points[i]
				var s float64
				for j, v := range l {
					d := p[j] - v
					s += d * d
				}
				if s < near[i] {
					near[i] = s
				}
				if near[i] > bv {
					bi, bv = i, near[i]
				}
			}
			idx[w], val[w] = bi, bv
		}
		if workers == 1 {
			work()
			continue
		}
		wg.Add(1)
		go func() { defer wg.Done(); work() }()
	}
	wg.Wait()
	best := 0
	for w := 1; w < workers; w++ {
		if val[w] > val[best] {
			best = w
		}
	}
	return idx[best], val[best]
}
