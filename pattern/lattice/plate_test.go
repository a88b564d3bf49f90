package lattice

import (
	"math"
	"math/rand/v2"
)

// plate describes a synthetic plane for the tests: a patch of n1 × n2
// lattice points of the basis, displaced by waves and Gaussian noise,
// rotated by rot and moved by offset, with some sites removed and some
// spurious sites added uniformly over the patch.
type plate struct {
	basis    [2][2]float64
	n1, n2   int
	rot      float64    // radians
	offset   [2]float64 // after the rotation
	noise    float64    // σ of each coordinate, in units of |a1|
	missing  float64    // share of lattice points left empty
	extra    float64    // spurious sites, as a share of the lattice points
	waves    []wave
	seed     uint64
	shuffled bool
}

// wave is a displacement u_n = amp·|a1|·pol·sin 2π(q·n + phase).
type wave struct {
	q     [2]float64 // turns per lattice step
	amp   float64    // in units of |a1|
	pol   [2]float64 // unit polarisation
	phase float64
}

var (
	square  = [2][2]float64{{1, 0}, {0, 1}}
	hex     = [2][2]float64{{1, 0}, {0.5, math.Sqrt(3) / 2}}
	oblique = [2][2]float64{{1.3, 0.2}, {0.45, 1.9}}
)

// site is one generated site: its position, its lattice index in the
// generating basis, and whether it is a lattice site (not spurious).
type site struct {
	x    [2]float64
	n    [2]int
	real bool
}

func (p plate) sites() []site {
	r := rand.New(rand.NewPCG(p.seed, 0x1a771ce))
	a := math.Hypot(p.basis[0][0], p.basis[0][1])
	c, s := math.Cos(p.rot), math.Sin(p.rot)
	place := func(x [2]float64) [2]float64 {
		return [2]float64{c*x[0] - s*x[1] + p.offset[0], s*x[0] + c*x[1] + p.offset[1]}
	}
	var out []site
	for i := range p.n1 {
		for j := range p.n2 {
			if r.Float64() < p.missing {
				continue
			}
			x := [2]float64{
				float64(i)*p.basis[0][0] + float64(j)*p.basis[1][0],
				float64(i)*p.basis[0][1] + float64(j)*p.basis[1][1],
			}
			for _, w := range p.waves {
				u := w.amp * a * math.Sin(2*math.Pi*(w.q[0]*float64(i)+w.q[1]*float64(j)+w.phase))
				x[0] += u * w.pol[0]
				x[1] += u * w.pol[1]
			}
			x[0] += p.noise * a * r.NormFloat64()
			x[1] += p.noise * a * r.NormFloat64()
			out = append(out, site{x: place(x), n: [2]int{i, j}, real: true})
		}
	}
	extra := int(math.Round(p.extra * float64(p.n1*p.n2)))
	for range extra {
		f := [2]float64{r.Float64()*float64(p.n1) - 0.5, r.Float64()*float64(p.n2) - 0.5}
		x := [2]float64{
			f[0]*p.basis[0][0] + f[1]*p.basis[1][0],
			f[0]*p.basis[0][1] + f[1]*p.basis[1][1],
		}
		out = append(out, site{x: place(x)})
	}
	if p.shuffled {
		r.Shuffle(len(out), func(i, j int) { out[i], out[j] = out[j], out[i] })
	}
	return out
}

func points(s []site) [][2]float64 {
	out := make([][2]float64, len(s))
	for i := range s {
		out[i] = s[i].x
	}
	return out
}

// rotated returns the basis rotated by rot.
func rotated(b [2][2]float64, rot float64) [2][2]float64 {
	c, s := math.Cos(rot), math.Sin(rot)
	var out [2][2]float64
	for k := range 2 {
		out[k] = [2]float64{c*b[k][0] - s*b[k][1], s*b[k][0] + c*b[k][1]}
	}
	return out
}

// poisson returns n points uniform in a square of side √n.
func poisson(n int, seed uint64) [][2]float64 {
	r := rand.New(rand.NewPCG(seed, 0x901550))
	side := math.Sqrt(float64(n))
	out := make([][2]float64, n)
	for i := range out {
		out[i] = [2]float64{r.Float64() * side, r.Float64() * side}
	}
	return out
}
