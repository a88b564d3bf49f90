package lattice

import (
	"cmp"
	"math"
	"slices"
)

// occupancy maps lattice points to the site that sits on them: a dense
// array over the bounding box of the indices when that is not much larger
// than the number of sites, a map otherwise.
type occupancy struct {
	lo, size [2]int
	dense    []int32
	sparse   map[[2]int]int32
}

func newOccupancy(idx [][2]int, on []bool) *occupancy {
	lo := [2]int{math.MaxInt, math.MaxInt}
	hi := [2]int{math.MinInt, math.MinInt}
	m := 0
	for i, n := range idx {
		if !on[i] {
			continue
		}
		m++
		for c := range 2 {
			lo[c] = min(lo[c], n[c])
			hi[c] = max(hi[c], n[c])
		}
	}
	o := &occupancy{lo: lo}
	if m == 0 {
		o.sparse = map[[2]int]int32{}
		return o
	}
	o.size = [2]int{hi[0] - lo[0] + 1, hi[1] - lo[1] + 1}
	if float64(o.size[0])*float64(o.size[1]) <= 4*float64(m)+1024 {
		o.dense = make([]int32, o.size[0]*o.size[1])
		for i := range o.dense {
			o.dense[i] = -1
		}
	} else {
		o.sparse = make(map[[2]int]int32, m)
	}
	return o
}

func (o *occupancy) get(n [2]int) int32 {
	if o.dense == nil {
		if s, ok := o.sparse[n]; ok {
			return s
		}
		return -1
	}
	a, b := n[0]-o.lo[0], n[1]-o.lo[1]
	if a < 0 || b < 0 || a >= o.size[0] || b >= o.size[1] {
		return -1
	}
	return o.dense[a*o.size[1]+b]
}

func (o *occupancy) set(n [2]int, site int32) {
	if o.dense == nil {
		o.sparse[n] = site
		return
	}
	o.dense[(n[0]-o.lo[0])*o.size[1]+n[1]-o.lo[1]] = site
}

// settle keeps one site per lattice point, the one nearest it, and then
// takes off the lattice every site none of whose four lattice neighbours
// n ± e1, n ± e2 carries a site (a lone site outside the patch is a
// spurious one that happened to fall near a lattice point). It returns
// the numbers of sites taken off for each reason.
func settle(idx [][2]int, disp [][2]float64, on []bool) (second, lone int) {
	occ := newOccupancy(idx, on)
	for i := range idx {
		if !on[i] {
			continue
		}
		j := occ.get(idx[i])
		switch {
		case j < 0:
			occ.set(idx[i], int32(i))
		case norm2(disp[i]) < norm2(disp[j]) || (norm2(disp[i]) == norm2(disp[j]) && i < int(j)):
			on[j] = false
			occ.set(idx[i], int32(i))
			second++
		default:
			on[i] = false
			second++
		}
	}
	var alone []int
	for i, n := range idx {
		if !on[i] {
			continue
		}
		if occ.get([2]int{n[0] + 1, n[1]}) < 0 && occ.get([2]int{n[0] - 1, n[1]}) < 0 &&
			occ.get([2]int{n[0], n[1] + 1}) < 0 && occ.get([2]int{n[0], n[1] - 1}) < 0 {
			alone = append(alone, i)
		}
	}
	for _, i := range alone {
		on[i] = false
		occ.set(idx[i], -1)
	}
	return second, len(alone)
}

// latticePointsInHull counts the lattice points inside or on the convex
// hull of the indices of the sites on the lattice: the patch.
func latticePointsInHull(idx [][2]int, on []bool) int {
	// Only the two ends of each row n2 can be vertices of the hull.
	ends := map[int][2]int{}
	for i, n := range idx {
		if !on[i] {
			continue
		}
		e, ok := ends[n[1]]
		if !ok {
			e = [2]int{n[0], n[0]}
		}
		ends[n[1]] = [2]int{min(e[0], n[0]), max(e[1], n[0])}
	}
	var pts [][2]int
	for y, e := range ends {
		pts = append(pts, [2]int{e[0], y}, [2]int{e[1], y})
	}
	h := convexHull(pts)
	switch len(h) {
	case 0:
		return 0
	case 1:
		return 1
	}
	lo, hi := h[0][1], h[0][1]
	for _, p := range h {
		lo, hi = min(lo, p[1]), max(hi, p[1])
	}
	total := 0
	for y := lo; y <= hi; y++ {
		// The hull's extent along n1 on row n2 = y, from its edges that
		// cross the row; exact in rationals, rounded inwards with care.
		left, right := math.Inf(1), math.Inf(-1)
		for k := range h {
			p, q := h[k], h[(k+1)%len(h)]
			if (p[1] < y && q[1] < y) || (p[1] > y && q[1] > y) {
				continue
			}
			if p[1] == q[1] {
				left = math.Min(left, float64(min(p[0], q[0])))
				right = math.Max(right, float64(max(p[0], q[0])))
				continue
			}
			x := float64(p[0]) + float64((y-p[1])*(q[0]-p[0]))/float64(q[1]-p[1])
			left, right = math.Min(left, x), math.Max(right, x)
		}
		if right >= left {
			total += int(math.Floor(right+1e-9)) - int(math.Ceil(left-1e-9)) + 1
		}
	}
	return total
}

// convexHull returns the vertices of the convex hull of the points,
// counterclockwise (Andrew's monotone chain; common practice), without
// collinear points.
func convexHull(pts [][2]int) [][2]int {
	pts = slices.Clone(pts)
	slices.SortFunc(pts, func(a, b [2]int) int {
		if r := cmp.Compare(a[0], b[0]); r != 0 {
			return r
		}
		return cmp.Compare(a[1], b[1])
	})
	pts = slices.Compact(pts)
	if len(pts) < 3 {
		return pts
	}
	turn := func(o, a, b [2]int) int {
		return (a[0]-o[0])*(b[1]-o[1]) - (a[1]-o[1])*(b[0]-o[0])
	}
	h := make([][2]int, 0, 2*len(pts))
	for _, p := range pts {
		for len(h) >= 2 && turn(h[len(h)-2], h[len(h)-1], p) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, p)
	}
	lower := len(h) + 1
	for i := len(pts) - 2; i >= 0; i-- {
		p := pts[i]
		for len(h) >= lower && turn(h[len(h)-2], h[len(h)-1], p) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, p)
	}
	return h[:len(h)-1]
}
