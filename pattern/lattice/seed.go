package lattice

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/kdtree"
)

// Sizes of the neighbour-vector stage.
const (
	// windowSites is the number of sites, nearest the centre site, in the
	// k-d tree of the neighbour search; anchorSites of them, the nearest,
	// are the anchors whose neighbours are read.
	windowSites = 4096
	anchorSites = 1024
	// neighbours is how many nearest neighbours of each anchor are read:
	// enough to reach the second basis vector of an oblique lattice with
	// |a2| up to about 4|a1|.
	neighbours = 16
	// clusterRadius is the radius, in median nearest-neighbour distances,
	// within which neighbour vectors count as one lattice vector.
	clusterRadius = 0.45
	// maxClusters bounds the clusters formed, densest first: the lattice
	// vectors among the neighbours of the anchors are about neighbours
	// clusters, each denser than any cluster of spurious vectors.
	maxClusters = 4 * neighbours
)

// seed is the first estimate of the lattice from the neighbour vectors.
type seed struct {
	basis   [2][2]float64
	share   [2]float64 // fraction of the anchors with a neighbour at a1, a2
	anchors int
	centre  int     // the site nearest the centroid
	note    string  // what the fit made of the seed, for the notes
	order   []int32 // all sites, nearer the centre site first (see byDistance)
}

// neighbourSeed finds the centre site, orders the sites by distance from
// it, and reads the lattice off the difference vectors between the
// anchors and their nearest neighbours: a lattice vector is a cluster of
// difference vectors that most anchors contribute to, a1 the shortest
// such cluster and a2 the shortest not along a1.
func neighbourSeed(pts [][2]float64, minShare float64) (*seed, error) {
	n := len(pts)
	var cx, cy float64
	for _, p := range pts {
		cx += p[0]
		cy += p[1]
	}
	cx /= float64(n)
	cy /= float64(n)
	c := 0
	for i, p := range pts {
		if math.Hypot(p[0]-cx, p[1]-cy) < math.Hypot(pts[c][0]-cx, pts[c][1]-cy) {
			c = i
		}
	}
	s := &seed{centre: c, order: byDistance(pts, pts[c])}
	order := s.order

	w := min(n, windowSites)
	tree := make(kdtree.Points, w)
	for i := range w {
		p := pts[order[i]]
		tree[i] = kdtree.Point{p[0], p[1]}
	}
	t := kdtree.New(tree, false)
	// Anchors: all sites of a small set, else the nearest half of the
	// window (whose neighbours all lie in the window) up to anchorSites.
	na := w
	if w > 256 {
		na = min(w/2, anchorSites)
	}
	s.anchors = na
	vecs := make([][2]float64, 0, na*neighbours)
	nn := make([]float64, 0, na)
	for i := range na {
		p := pts[order[i]]
		q := kdtree.Point{p[0], p[1]}
		keep := kdtree.NewNKeeper(neighbours + 1)
		t.NearestSet(keep, q)
		first := math.Inf(1)
		for _, h := range keep.Heap {
			if h.Comparable == nil || h.Dist == 0 {
				continue
			}
			r := h.Comparable.(kdtree.Point)
			v := [2]float64{r[0] - p[0], r[1] - p[1]}
			vecs = append(vecs, v)
			first = math.Min(first, math.Sqrt(h.Dist))
		}
		if !math.IsInf(first, 1) {
			nn = append(nn, first)
		}
	}
	if len(nn) == 0 {
		return nil, fmt.Errorf("%w: no site has a neighbour", ErrNoLattice)
	}
	slices.Sort(nn)
	rnn := nn[len(nn)/2]
	minCount := minShare * float64(na)
	cl := clusters(vecs, clusterRadius*rnn, minCount)
	var a1, a2 *cluster
	for i := range cl {
		if float64(cl[i].count) < minCount {
			continue
		}
		if a1 == nil || norm2(cl[i].centre) < norm2(a1.centre) {
			a1 = &cl[i]
		}
	}
	if a1 == nil {
		return nil, fmt.Errorf("%w: no neighbour vector is shared by %.0f%% of the sites (the most common is shared by %.0f%%)",
			ErrNoLattice, 100*minShare, 100*topShare(cl, na))
	}
	for i := range cl {
		c := &cl[i]
		if float64(c.count) < minCount || math.Abs(cross(a1.centre, c.centre)) < 0.2*math.Sqrt(norm2(a1.centre)*norm2(c.centre)) {
			continue
		}
		if a2 == nil || norm2(c.centre) < norm2(a2.centre) {
			a2 = c
		}
	}
	if a2 == nil {
		return nil, fmt.Errorf("%w: the neighbour vectors shared by %.0f%% of the sites all lie along one line",
			ErrNoLattice, 100*minShare)
	}
	s.basis = [2][2]float64{a1.centre, a2.centre}
	s.share = [2]float64{float64(a1.count) / float64(na), float64(a2.count) / float64(na)}
	return s, nil
}

func topShare(cl []cluster, na int) float64 {
	best := 0
	for _, c := range cl {
		best = max(best, c.count)
	}
	return float64(best) / float64(na)
}

// cluster is a group of neighbour vectors: their mean and their number.
type cluster struct {
	centre [2]float64
	count  int
}

// clusters groups the vectors greedily: the vector with the most others
// near it seeds a cluster, whose centre is moved to the mean of the
// unassigned vectors within radius of it (twice), and those vectors are
// taken; then the next, until maxClusters are formed or the vectors left
// are too sparse to hold minCount within radius of one another (after the first cluster, which
// is always formed so that the reason for a refusal can name it).
func clusters(vecs [][2]float64, radius, minCount float64) []cluster {
	cell := radius / 2
	key := func(v [2]float64) [2]int {
		return [2]int{int(math.Floor(v[0] / cell)), int(math.Floor(v[1] / cell))}
	}
	grid := make(map[[2]int][]int32)
	for i, v := range vecs {
		k := key(v)
		grid[k] = append(grid[k], int32(i))
	}
	// within calls f for every vector within r ≤ radius of v.
	within := func(v [2]float64, r float64, f func(int32)) {
		k := key(v)
		for dx := -2; dx <= 2; dx++ {
			for dy := -2; dy <= 2; dy++ {
				for _, j := range grid[[2]int{k[0] + dx, k[1] + dy}] {
					if norm2([2]float64{vecs[j][0] - v[0], vecs[j][1] - v[1]}) <= r*r {
						f(j)
					}
				}
			}
		}
	}
	// The density at a vector, which orders the seeds: the vectors in its
	// grid cell and the 8 around it (a square of side 1.5·radius). The
	// bound, which stops the seeding: the vectors in the 5 × 5 cells
	// around it, a square of side 2.5·radius that holds the disc of the
	// given radius about any point of the middle cell.
	density := make([]int, len(vecs))
	bound := make([]int, len(vecs))
	type counts struct{ near, bound int }
	cells := make(map[[2]int]counts, len(grid))
	for k := range grid {
		var c counts
		for dx := -2; dx <= 2; dx++ {
			for dy := -2; dy <= 2; dy++ {
				m := len(grid[[2]int{k[0] + dx, k[1] + dy}])
				c.bound += m
				if max(dx, -dx, dy, -dy) <= 1 {
					c.near += m
				}
			}
		}
		cells[k] = c
	}
	for i, v := range vecs {
		c := cells[key(v)]
		density[i], bound[i] = c.near, c.bound
	}
	byDensity := make([]int32, len(vecs))
	for i := range byDensity {
		byDensity[i] = int32(i)
	}
	slices.SortFunc(byDensity, func(i, j int32) int {
		if r := cmp.Compare(density[j], density[i]); r != 0 {
			return r
		}
		if r := cmp.Compare(vecs[i][0], vecs[j][0]); r != 0 {
			return r
		}
		return cmp.Compare(vecs[i][1], vecs[j][1])
	})
	taken := make([]bool, len(vecs))
	var out []cluster
	for _, i := range byDensity {
		if len(out) == maxClusters {
			break
		}
		if taken[i] || (len(out) > 0 && float64(bound[i]) < minCount/2) {
			continue
		}
		c := vecs[i]
		for range 2 {
			var sx, sy float64
			var m int
			within(c, radius, func(j int32) {
				if !taken[j] {
					sx += vecs[j][0]
					sy += vecs[j][1]
					m++
				}
			})
			if m > 0 {
				c = [2]float64{sx / float64(m), sy / float64(m)}
			}
		}
		var m int
		within(c, radius, func(j int32) {
			if !taken[j] {
				taken[j] = true
				m++
			}
		})
		taken[i] = true
		out = append(out, cluster{centre: c, count: m})
	}
	return out
}

// byDistance orders the sites by their distance from c, to within a ring
// of the area of about four sites: a counting sort on the squared
// distance (rings of equal area), in linear time; within a ring the sites
// keep their input order.
func byDistance(pts [][2]float64, c [2]float64) []int32 {
	n := len(pts)
	d2 := make([]float64, n)
	top := 0.0
	for i, p := range pts {
		d2[i] = norm2([2]float64{p[0] - c[0], p[1] - c[1]})
		top = math.Max(top, d2[i])
	}
	rings := max(1, n/4)
	ring := func(i int) int {
		if top == 0 {
			return 0
		}
		return min(rings-1, int(d2[i]/top*float64(rings)))
	}
	start := make([]int32, rings+1)
	for i := range n {
		start[ring(i)+1]++
	}
	for r := range rings {
		start[r+1] += start[r]
	}
	order := make([]int32, n)
	for i := range n {
		r := ring(i)
		order[start[r]] = int32(i)
		start[r]++
	}
	return order
}
