package topology

import (
	"errors"
	"fmt"
	"math"

	"phasonhull/topology/rips"
)

// CircleMap is a circle-valued coordinate on a landmark cloud, built from a
// one-dimensional cohomology class by the method of de Silva, Morozov &
// Vejdemo-Johansson ("Persistent cohomology and circular coordinates",
// Discrete Comput. Geom. 45, 2011).
//
// At scale r the Rips 1-skeleton K_r joins two landmarks when their
// distance is at most r. An integer cocycle α on K_r is replaced by its
// harmonic representative ᾱ = α − δf, f minimising ‖α − δf‖² (unit edge
// weights): the cocycle in the class with the least energy, spreading each
// turn as evenly as the graph allows. The coordinate of landmark v is
// −f_v mod 1, so that along an edge i → j it advances by
// ᾱ_ij = α_ij − (f_j − f_i), and around a loop on which α counts +1 it
// makes one turn forward.
type CircleMap struct {
	landmarks [][]float64
	scale     float64
	u         []float64      // the lifted coordinate −f, f solving L f = δᵀα
	alpha     map[[2]int]int // the cocycle on K_r, non-zero edges only, keyed i < j
}

// cgTol is the relative residual ‖Lf − b‖/‖b‖ at which the conjugate
// gradient solve stops.
const cgTol = 1e-10

// DefaultScale returns the scale at which CircularCoordinates should build
// the coordinate of the H1 bar b: the midpoint of [Birth, Death). A
// representative cocycle of the bar is a cocycle of K_r for r below the
// death and non-trivial from the birth on; the midpoint stays as far as the bar allows from the birth, where
// the class is still fragile and K_r sparse, and from the death, where the
// triangles that kill the class are about to enter. It refuses an essential
// bar, whose upper end says nothing: pick a scale above the birth by hand.
func DefaultScale(b rips.Bar) (float64, error) {
	if b.Essential() {
		return 0, errors.New("default scale: the bar is essential (never dies); choose a scale above its birth")
	}
	if !(b.Death > b.Birth) || math.IsNaN(b.Birth) {
		return 0, fmt.Errorf("default scale: empty bar [%g, %g)", b.Birth, b.Death)
	}
	return 0.5 * (b.Birth + b.Death), nil
}

// ErrDisconnected is wrapped by CircularCoordinates' error when the
// landmarks fall into several components at the scale of the coordinate:
// a circular coordinate needs a connected one.
var ErrDisconnected = errors.New("the coordinate needs a connected one")

// CircularCoordinates builds the circle-valued coordinate of the landmark
// cloud for the cohomology class of c at scale r (see DefaultScale).
//
// The edges of c longer than r are not in K_r and are dropped; on the rest
// the integer values must form a cocycle over Z on every triangle of K_r,
// which the integer lift of a Z/p cocycle usually but not always is. K_r
// must be connected, and the class must not vanish on it. The potential f
// solves the graph Laplacian system L f = δᵀα by conjugate gradients with a
// Jacobi preconditioner, to a relative residual of 1e-10.
func CircularCoordinates(landmarks [][]float64, c rips.Cocycle, r float64) (*CircleMap, error) {
	nl := len(landmarks)
	if nl < 3 {
		return nil, fmt.Errorf("circular coordinates: %d landmarks, need at least 3", nl)
	}
	if !(r > 0) || math.IsInf(r, 1) {
		return nil, fmt.Errorf("circular coordinates: scale %g is not a positive finite number", r)
	}
	dim := len(landmarks[0])
	for i, p := range landmarks {
		if len(p) != dim {
			return nil, fmt.Errorf("circular coordinates: landmark %d has %d coordinates, landmark 0 has %d", i, len(p), dim)
		}
	}
	// The 1-skeleton K_r as adjacency lists.
	adj := make([][]int, nl)
	for i := range nl {
		for j := i + 1; j < nl; j++ {
			if Dist(landmarks[i], landmarks[j]) <= r {
				adj[i] = append(adj[i], j)
				adj[j] = append(adj[j], i)
			}
		}
	}
	if comps := components(adj); comps > 1 {
		return nil, fmt.Errorf("circular coordinates: the Rips graph at scale %g has %d components: %w", r, comps, ErrDisconnected)
	}
	// The cocycle restricted to K_r.
	alpha := make(map[[2]int]int)
	for k, e := range c.Edges {
		if e.I < 0 || e.J >= nl || e.I >= e.J {
			return nil, fmt.Errorf("circular coordinates: cocycle edge %d {%d, %d} is not a landmark pair with I < J", k, e.I, e.J)
		}
		key := [2]int{e.I, e.J}
		if _, dup := alpha[key]; dup {
			return nil, fmt.Errorf("circular coordinates: cocycle edge {%d, %d} listed twice", e.I, e.J)
		}
		if e.Value != 0 && Dist(landmarks[e.I], landmarks[e.J]) <= r {
			alpha[key] = e.Value
		}
	}
	if len(alpha) == 0 {
		return nil, fmt.Errorf("circular coordinates: the cocycle has no edge in the Rips graph at scale %g", r)
	}
	// δα = 0 over Z: only triangles with a non-zero edge can fail, so visit
	// the common neighbours of each such edge.
	mark := make([]bool, nl)
	for key := range alpha {
		i, j := key[0], key[1]
		for _, k := range adj[i] {
			mark[k] = true
		}
		for _, k := range adj[j] {
			if !mark[k] {
				continue
			}
			a, b, cc := sort3(i, j, k)
			if v := alpha[[2]int{a, b}] + alpha[[2]int{b, cc}] - alpha[[2]int{a, cc}]; v != 0 {
				return nil, fmt.Errorf("circular coordinates: the integer lift is not a cocycle: δα = %d on triangle {%d, %d, %d}", v, a, b, cc)
			}
		}
		for _, k := range adj[i] {
			mark[k] = false
		}
	}
	// Right-hand side b = δᵀα: edge i→j adds α_ij at j and removes it at i.
	b := make([]float64, nl)
	for key, v := range alpha {
		b[key[1]] += float64(v)
		b[key[0]] -= float64(v)
	}
	f, err := solveLaplacian(adj, b)
	if err != nil {
		return nil, fmt.Errorf("circular coordinates: %w", err)
	}
	u := f // the coordinate −f, in place
	for i := range u {
		u[i] = -u[i]
	}
	// A class that vanishes on K_r leaves a harmonic part ᾱ of zero.
	var h2 float64
	for i := range nl {
		for _, j := range adj[i] {
			if j > i {
				h := u[j] - u[i] + float64(alpha[[2]int{i, j}])
				h2 += h * h
			}
		}
	}
	if h2 < 1e-12 {
		return nil, fmt.Errorf("circular coordinates: the class is trivial in the Rips graph at scale %g", r)
	}
	return &CircleMap{landmarks: landmarks, scale: r, u: u, alpha: alpha}, nil
}

// Coordinates returns the coordinate of every landmark, in [0, 1). The
// origin of the circle is arbitrary.
func (m *CircleMap) Coordinates() []float64 {
	out := make([]float64, len(m.u))
	for i, v := range m.u {
		out[i] = mod1(v)
	}
	return out
}

// Extend returns the coordinate, in [0, 1), of each point of a cloud in the
// landmarks' space.
//
// A point x with nearest landmark a and second-nearest b (distances
// d_a ≤ d_b, ties to the lower index) takes
//
//	θ(x) = θ_a + φ_b(x)·s_ab,  φ_b = d_a/(d_a + d_b) ∈ [0, ½],
//
// where φ_a = 1 − φ_b and φ_b form a partition of unity over the two
// nearest landmarks and s_ab is the advance of the coordinate along a → b:
// the harmonic value ᾱ_ab when ab is an edge of K_r, the difference
// θ_b − θ_a wrapped into (−½, ½] otherwise. On a segment from a to b this
// is linear interpolation in the distance ratio. A landmark keeps its own
// coordinate (φ_b = 0), and on the bisector of a and b (φ_b = ½) both sides
// give θ_a + s_ab/2, so the extension is continuous there; where the
// second-nearest landmark changes from b to c it jumps by φ_b·|s_ab − s_ac|,
// which vanishes for points on a curve through the landmarks (the change
// happens at a, where φ_b = 0) and is small beside it.
func (m *CircleMap) Extend(points [][]float64) ([]float64, error) {
	dim := len(m.landmarks[0])
	out := make([]float64, len(points))
	for p, x := range points {
		if len(x) != dim {
			return nil, fmt.Errorf("extending circular coordinates: point %d has %d coordinates, landmarks have %d", p, len(x), dim)
		}
		a, b := -1, -1
		da, db := math.Inf(1), math.Inf(1)
		for l, y := range m.landmarks {
			switch d := Dist(x, y); {
			case d < da:
				b, db = a, da
				a, da = l, d
			case d < db:
				b, db = l, d
			}
		}
		if math.IsNaN(da) || math.IsNaN(db) || a < 0 || b < 0 {
			return nil, fmt.Errorf("extending circular coordinates: point %d is not finite", p)
		}
		s := m.u[b] - m.u[a]
		if Dist(m.landmarks[a], m.landmarks[b]) <= m.scale {
			if a < b { // ᾱ_ab = u_b − u_a + α_ab, and α_ba = −α_ab
				s += float64(m.alpha[[2]int{a, b}])
			} else {
				s -= float64(m.alpha[[2]int{b, a}])
			}
		} else {
			s -= math.Ceil(s - 0.5)
		}
		phi := 0.0
		if da+db > 0 {
			phi = da / (da + db)
		}
		out[p] = mod1(m.u[a] + phi*s)
	}
	return out, nil
}

// solveLaplacian solves L f = b for the graph Laplacian of a connected graph
// by preconditioned conjugate gradients (Hestenes & Stiefel, J. Res. Natl.
// Bur. Stand. 49, 1952). L is singular with the constants as kernel; b is
// first made orthogonal to them, and from f = 0 every iterate stays in the
// range of L, where CG converges.
func solveLaplacian(adj [][]int, b []float64) ([]float64, error) {
	n := len(b)
	mean := 0.0
	for _, v := range b {
		mean += v
	}
	mean /= float64(n)
	r := make([]float64, n)
	for i, v := range b {
		r[i] = v - mean
	}
	bnorm := norm(r)
	f := make([]float64, n)
	if bnorm == 0 {
		return f, nil
	}
	apply := func(dst, x []float64) { // dst = L x
		for i, nb := range adj {
			s := float64(len(nb)) * x[i]
			for _, j := range nb {
				s -= x[j]
			}
			dst[i] = s
		}
	}
	z := make([]float64, n)
	precond := func() { // z = D⁻¹ r
		for i, v := range r {
			z[i] = v / float64(len(adj[i]))
		}
	}
	precond()
	p := append([]float64(nil), z...)
	q := make([]float64, n)
	rz := dot(r, z)
	for it := 0; it < 10*n+100; it++ {
		apply(q, p)
		step := rz / dot(p, q)
		for i := range f {
			f[i] += step * p[i]
			r[i] -= step * q[i]
		}
		if norm(r) <= cgTol*bnorm {
			return f, nil
		}
		precond()
		rzNew := dot(r, z)
		beta := rzNew / rz
		rz = rzNew
		for i := range p {
			p[i] = z[i] + beta*p[i]
		}
	}
	return nil, fmt.Errorf("conjugate gradients did not reach relative residual %g in %d iterations", cgTol, 10*n+100)
}

// components counts the connected components of a graph.
func components(adj [][]int) int {
	seen := make([]bool, len(adj))
	count := 0
	var stack []int
	for s := range adj {
		if seen[s] {
			continue
		}
		count++
		seen[s] = true
		stack = append(stack[:0], s)
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, w := range adj[v] {
				if !seen[w] {
					seen[w] = true
					stack = append(stack, w)
				}
			}
		}
	}
	return count
}

func sort3(a, b, c int) (int, int, int) {
	if a > b {
		a, b = b, a
	}
	if b > c {
		b, c = c, b
	}
	if a > b {
		a, b = b, a
	}
	return a, b, c
}

// mod1 reduces x into [0, 1).
func mod1(x float64) float64 {
	y := x - math.Floor(x)
	if y >= 1 {
		return 0
	}
	return y
}

// Dist is the Euclidean distance between two points of the same dimension.
func Dist(a, b []float64) float64 {
	var s float64
	for i := range a {
		d := a[i] - b[i]
		s += d * d
	}
	return math.Sqrt(s)
}
