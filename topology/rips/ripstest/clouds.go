package ripstest

import (
	"math"
	"math/rand/v2"
)

func newRand(seed uint64) *rand.Rand { return rand.New(rand.NewPCG(seed, 0x7a11)) }

// Cube returns n points uniform in the unit cube [0, 1]^dim.
func Cube(n, dim int, seed uint64) [][]float64 { return draw(n, dim, newRand(seed).Float64) }

// Gaussian returns n points of a standard normal distribution in R^dim.
func Gaussian(n, dim int, seed uint64) [][]float64 { return draw(n, dim, newRand(seed).NormFloat64) }

// draw returns n points of R^dim whose coordinates are successive values
// of next, point by point.
func draw(n, dim int, next func() float64) [][]float64 {
	pts := make([][]float64, n)
	for i := range pts {
		p := make([]float64, dim)
		for k := range p {
			p[k] = next()
		}
		pts[i] = p
	}
	return pts
}

// Circle returns n points of the unit circle at uniform random angles,
// each moved by a normal offset of standard deviation noise in each
// coordinate.
func Circle(n int, noise float64, seed uint64) [][]float64 {
	r := newRand(seed)
	pts := make([][]float64, n)
	for i := range pts {
		a := 2 * math.Pi * r.Float64()
		pts[i] = []float64{math.Cos(a) + noise*r.NormFloat64(), math.Sin(a) + noise*r.NormFloat64()}
	}
	return pts
}

// RegularPolygon returns the n vertices of the regular n-gon inscribed in
// the unit circle.
func RegularPolygon(n int) [][]float64 {
	pts := make([][]float64, n)
	for i := range pts {
		a := 2 * math.Pi * float64(i) / float64(n)
		pts[i] = []float64{math.Cos(a), math.Sin(a)}
	}
	return pts
}

// FigureEight returns n points on two unit circles touching at the origin,
// with normal noise.
func FigureEight(n int, noise float64, seed uint64) [][]float64 {
	r := newRand(seed)
	pts := make([][]float64, n)
	for i := range pts {
		a := 2 * math.Pi * r.Float64()
		cx := 1.0
		if i%2 == 1 {
			cx = -1
		}
		pts[i] = []float64{cx + math.Cos(a) + noise*r.NormFloat64(), math.Sin(a) + noise*r.NormFloat64()}
	}
	return pts
}

// Sphere returns n points uniform on the unit sphere S² in R³.
func Sphere(n int, seed uint64) [][]float64 {
	r := newRand(seed)
	pts := make([][]float64, n)
	for i := range pts {
		x, y, z := r.NormFloat64(), r.NormFloat64(), r.NormFloat64()
		s := math.Sqrt(x*x + y*y + z*z)
		pts[i] = []float64{x / s, y / s, z / s}
	}
	return pts
}

// FibonacciSphere returns n points spread evenly over the unit sphere
// along a Fibonacci spiral.
func FibonacciSphere(n int) [][]float64 {
	golden := math.Pi * (3 - math.Sqrt(5))
	pts := make([][]float64, n)
	for i := range pts {
		z := 1 - (2*float64(i)+1)/float64(n)
		s := math.Sqrt(1 - z*z)
		a := golden * float64(i)
		pts[i] = []float64{s * math.Cos(a), s * math.Sin(a), z}
	}
	return pts
}

// Torus returns n points of the torus of revolution in R³ with radii
// big > small, at uniform random angles.
func Torus(n int, big, small float64, seed uint64) [][]float64 {
	r := newRand(seed)
	pts := make([][]float64, n)
	for i := range pts {
		a, b := 2*math.Pi*r.Float64(), 2*math.Pi*r.Float64()
		rr := big + small*math.Cos(b)
		pts[i] = []float64{rr * math.Cos(a), rr * math.Sin(a), small * math.Sin(b)}
	}
	return pts
}

// FlatTorus returns n points of the flat torus (cos a, sin a, cos b, sin b)
// in R⁴ at uniform random angles.
func FlatTorus(n int, seed uint64) [][]float64 {
	r := newRand(seed)
	pts := make([][]float64, n)
	for i := range pts {
		a, b := 2*math.Pi*r.Float64(), 2*math.Pi*r.Float64()
		pts[i] = []float64{math.Cos(a), math.Sin(a), math.Cos(b), math.Sin(b)}
	}
	return pts
}

// FlatTorusGrid returns the m×m grid of angle pairs on the flat torus in R⁴.
func FlatTorusGrid(m int) [][]float64 {
	pts := make([][]float64, 0, m*m)
	for i := 0; i < m; i++ {
		for j := 0; j < m; j++ {
			a, b := 2*math.Pi*float64(i)/float64(m), 2*math.Pi*float64(j)/float64(m)
			pts = append(pts, []float64{math.Cos(a), math.Sin(a), math.Cos(b), math.Sin(b)})
		}
	}
	return pts
}

// ProjectivePlane returns n points of the real projective plane embedded in
// R⁴ by (x, y, z) ↦ (xy, xz, y² − z², 2yz) on uniform random points of the
// unit sphere; antipodal points have the same image.
func ProjectivePlane(n int, seed uint64) [][]float64 {
	s := Sphere(n, seed)
	pts := make([][]float64, n)
	for i, p := range s {
		x, y, z := p[0], p[1], p[2]
		pts[i] = []float64{x * y, x * z, y*y - z*z, 2 * y * z}
	}
	return pts
}

// Clusters returns n points in k normal clusters of standard deviation
// spread around centres uniform in the unit cube of R^dim.
func Clusters(n, k, dim int, spread float64, seed uint64) [][]float64 {
	r := newRand(seed)
	centres := Cube(k, dim, seed+1)
	pts := make([][]float64, n)
	for i := range pts {
		c := centres[i%k]
		p := make([]float64, dim)
		for j := range p {
			p[j] = c[j] + spread*r.NormFloat64()
		}
		pts[i] = p
	}
	return pts
}

// Delay returns the delay vectors (s[i], s[i+1], …, s[i+window−1]) of a
// sequence of spacings, one per start i.
func Delay(s []float64, window int) [][]float64 {
	pts := make([][]float64, 0, len(s)-window+1)
	for i := 0; i+window <= len(s); i++ {
		pts = append(pts, append([]float64(nil), s[i:i+window]...))
	}
	return pts
}

// ModulatedSpacings returns the spacings s_k = 1 + amp·cos(2π k θ),
// k = 0 … n−1, of a chain whose sites are modulated at frequency θ: its
// delay cloud lies on a closed curve.
func ModulatedSpacings(n int, theta, amp float64) []float64 {
	s := make([]float64, n)
	for k := range s {
		s[k] = 1 + amp*math.Cos(2*math.Pi*float64(k)*theta)
	}
	return s
}

// TwoAngleSpacings returns the spacings
// s_k = 1 + a1·cos(2π k θ1) + a2·cos(2π k θ2), k = 0 … n−1, of a chain
// modulated at two incommensurate frequencies: its delay cloud lies on a
// torus.
func TwoAngleSpacings(n int, theta1, theta2, a1, a2 float64) []float64 {
	s := make([]float64, n)
	for k := range s {
		x := float64(k)
		s[k] = 1 + a1*math.Cos(2*math.Pi*x*theta1) + a2*math.Cos(2*math.Pi*x*theta2)
	}
	return s
}

// MaxMin returns k landmarks of pts chosen by max–min (farthest point)
// sampling from pts[0]: each next landmark is the point farthest from those
// chosen so far, ties to the lowest index.
func MaxMin(pts [][]float64, k int) [][]float64 {
	if k >= len(pts) {
		return pts
	}
	dist := func(a, b []float64) float64 {
		s := 0.0
		for i := range a {
			d := a[i] - b[i]
			s += d * d
		}
		return s
	}
	near := make([]float64, len(pts))
	for i := range near {
		near[i] = math.Inf(1)
	}
	out := make([][]float64, 0, k)
	cur := 0
	for len(out) < k {
		out = append(out, pts[cur])
		next, far := 0, -1.0
		for i, p := range pts {
			near[i] = min(near[i], dist(p, pts[cur]))
			if near[i] > far {
				next, far = i, near[i]
			}
		}
		cur = next
	}
	return out
}

// Grid is the most grid steps across the widest extent of a cloud put on a
// grid by Quantize.
const Grid = 1000

// Quantize moves every point to the nearest node of a grid whose spacing
// is a power of two, between Grid/2 and Grid steps across the cloud's
// widest coordinate extent, after shifting the cloud to the origin. In up
// to four dimensions every squared distance is then an integer multiple
// K·u² of the squared spacing with K ≤ 4·Grid² < 2²², so single and double
// precision compute every squared distance exactly; the square roots of
// distinct K differ by more than a single-precision rounding step, so
// distinct distances stay distinct, and in the same order, in either
// precision.
func Quantize(pts [][]float64) [][]float64 {
	if len(pts) == 0 {
		return nil
	}
	dim := len(pts[0])
	lo := append([]float64(nil), pts[0]...)
	width := 0.0
	for _, p := range pts {
		for k, x := range p {
			lo[k] = min(lo[k], x)
		}
	}
	for _, p := range pts {
		for k, x := range p {
			width = max(width, x-lo[k])
		}
	}
	if width == 0 {
		width = 1
	}
	// Unit: the smallest power of two not below width/Grid.
	unit := math.Exp2(math.Ceil(math.Log2(width / Grid)))
	out := make([][]float64, len(pts))
	for i, p := range pts {
		q := make([]float64, dim)
		for k, x := range p {
			steps := math.Round((x - lo[k]) / unit)
			q[k] = math.Min(steps, Grid) * unit
		}
		out[i] = q
	}
	return out
}

// Named is a cloud with the homology dimension it is benchmarked to.
type Named struct {
	Name   string
	Points [][]float64
	MaxDim int
}

// BenchmarkSet returns the four benchmark clouds of the engine, on the grid
// of Quantize so that their barcodes can be compared exactly with a
// single-precision reference:
//
//   - two-angle: 400 max–min landmarks of the delay cloud in R⁴ of a chain
//     with spacings 1 + 0.3·cos(2πkθ1) + 0.2·cos(2πkθ2), θ1 = (√5−1)/2,
//     θ2 = √2−1 (a torus), to H2;
//   - noisy-circle: 400 points of the unit circle with normal noise 0.05,
//     to H2;
//   - cube: 250 points uniform in the unit cube of R³, to H2;
//   - circle: 2000 points of the unit circle, to H1.
func BenchmarkSet() []Named {
	two := TwoAngleSpacings(4003, (math.Sqrt(5)-1)/2, math.Sqrt(2)-1, 0.3, 0.2)
	return []Named{
		{Name: "two-angle-400", Points: Quantize(MaxMin(Delay(two, 4), 400)), MaxDim: 2},
		{Name: "noisy-circle-400", Points: Quantize(Circle(400, 0.05, 21)), MaxDim: 2},
		{Name: "cube-250", Points: Quantize(Cube(250, 3, 22)), MaxDim: 2},
		{Name: "circle-2000", Points: Quantize(Circle(2000, 0, 23)), MaxDim: 1},
	}
}
