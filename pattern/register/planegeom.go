package register

import "math"

// Small 2D vector and matrix helpers of the registration of planes;
// matrices are row-major.

func add(a, b [2]float64) [2]float64 { return [2]float64{a[0] + b[0], a[1] + b[1]} }
func sub(a, b [2]float64) [2]float64 { return [2]float64{a[0] - b[0], a[1] - b[1]} }
func norm2(a [2]float64) float64     { return a[0]*a[0] + a[1]*a[1] }

func apply(m [2][2]float64, v [2]float64) [2]float64 {
	return [2]float64{m[0][0]*v[0] + m[0][1]*v[1], m[1][0]*v[0] + m[1][1]*v[1]}
}

func mul(a, b [2][2]float64) [2][2]float64 {
	var c [2][2]float64
	for i := range 2 {
		for j := range 2 {
			c[i][j] = a[i][0]*b[0][j] + a[i][1]*b[1][j]
		}
	}
	return c
}

// columns returns the matrix whose columns are the two vectors of b.
func columns(b [2][2]float64) [2][2]float64 {
	return [2][2]float64{{b[0][0], b[1][0]}, {b[0][1], b[1][1]}}
}

// inverse returns m⁻¹, false when m is singular.
func inverse(m [2][2]float64) ([2][2]float64, bool) {
	det := m[0][0]*m[1][1] - m[0][1]*m[1][0]
	if det == 0 {
		return [2][2]float64{}, false
	}
	return [2][2]float64{{m[1][1] / det, -m[0][1] / det}, {-m[1][0] / det, m[0][0] / det}}, true
}

// grid buckets points in square cells of side h, for the points within a
// radius of at most h of a query.
type grid struct {
	pts   [][2]float64
	h     float64
	cells map[[2]int][]int32
}

func newGrid(pts [][2]float64, h float64) *grid {
	g := &grid{pts: pts, h: h, cells: make(map[[2]int][]int32, len(pts))}
	for i, p := range pts {
		c := g.cell(p)
		g.cells[c] = append(g.cells[c], int32(i))
	}
	return g
}

func (g *grid) cell(p [2]float64) [2]int {
	return [2]int{int(math.Floor(p[0] / g.h)), int(math.Floor(p[1] / g.h))}
}

// near calls f with every point within r ≤ h of p and its distance.
func (g *grid) near(p [2]float64, r float64, f func(k int, dist float64)) {
	c := g.cell(p)
	for dx := -1; dx <= 1; dx++ {
		for dy := -1; dy <= 1; dy++ {
			for _, k := range g.cells[[2]int{c[0] + dx, c[1] + dy}] {
				if d := math.Sqrt(norm2(sub(g.pts[k], p))); d <= r {
					f(int(k), d)
				}
			}
		}
	}
}
