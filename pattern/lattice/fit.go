package lattice

import "math"

// model is a lattice fitted to sites: x ≈ origin + n1·a1 + n2·a2.
type model struct {
	origin [2]float64
	basis  [2][2]float64
}

// at is the position of lattice point n.
func (m model) at(n [2]int) [2]float64 {
	return [2]float64{
		m.origin[0] + float64(n[0])*m.basis[0][0] + float64(n[1])*m.basis[1][0],
		m.origin[1] + float64(n[0])*m.basis[0][1] + float64(n[1])*m.basis[1][1],
	}
}

// index is the lattice point nearest x (by rounding in the basis) and
// the displacement of x from it.
func (m model) index(recip [2][2]float64, x [2]float64) ([2]int, [2]float64) {
	d := [2]float64{x[0] - m.origin[0], x[1] - m.origin[1]}
	n := [2]int{int(math.Round(dot(recip[0], d))), int(math.Round(dot(recip[1], d)))}
	p := m.at(n)
	return n, [2]float64{x[0] - p[0], x[1] - p[1]}
}

// sums accumulates the normal equations of the least-squares fit of the
// positions on the design (1, n1, n2), for both coordinates at once.
type sums struct {
	xtx [3][3]float64
	xty [3][2]float64
	m   int
}

func (s *sums) add(n [2]int, x [2]float64) {
	r := [3]float64{1, float64(n[0]), float64(n[1])}
	for i := range 3 {
		for j := range 3 {
			s.xtx[i][j] += r[i] * r[j]
		}
		s.xty[i][0] += r[i] * x[0]
		s.xty[i][1] += r[i] * x[1]
	}
	s.m++
}

func (s *sums) sub(o *sums) sums {
	out := *s
	for i := range 3 {
		for j := range 3 {
			out.xtx[i][j] -= o.xtx[i][j]
		}
		out.xty[i][0] -= o.xty[i][0]
		out.xty[i][1] -= o.xty[i][1]
	}
	out.m -= o.m
	return out
}

// solve returns the fitted model and the inverse of XᵀX; ok is false when
// the design is singular (the sites span less than a 2D patch of indices).
func (s *sums) solve() (model, [3][3]float64, bool) {
	a := s.xtx
	c00 := a[1][1]*a[2][2] - a[1][2]*a[2][1]
	c01 := a[1][2]*a[2][0] - a[1][0]*a[2][2]
	c02 := a[1][0]*a[2][1] - a[1][1]*a[2][0]
	det := a[0][0]*c00 + a[0][1]*c01 + a[0][2]*c02
	scale := a[0][0] * a[1][1] * a[2][2]
	if s.m < 3 || !(math.Abs(det) > 1e-9*math.Abs(scale)) {
		return model{}, [3][3]float64{}, false
	}
	inv := [3][3]float64{
		{c00, a[0][2]*a[2][1] - a[0][1]*a[2][2], a[0][1]*a[1][2] - a[0][2]*a[1][1]},
		{c01, a[0][0]*a[2][2] - a[0][2]*a[2][0], a[0][2]*a[1][0] - a[0][0]*a[1][2]},
		{c02, a[0][1]*a[2][0] - a[0][0]*a[2][1], a[0][0]*a[1][1] - a[0][1]*a[1][0]},
	}
	for i := range 3 {
		for j := range 3 {
			inv[i][j] /= det
		}
	}
	var beta [3][2]float64
	for i := range 3 {
		for j := range 3 {
			beta[i][0] += inv[i][j] * s.xty[j][0]
			beta[i][1] += inv[i][j] * s.xty[j][1]
		}
	}
	return model{origin: beta[0], basis: [2][2]float64{beta[1], beta[2]}}, inv, true
}

// jackknifeBlocks is the number of blocks along each index direction of
// the delete-one-block jackknife of the basis uncertainty.
const jackknifeBlocks = 4

// uncertainty returns one standard uncertainty of each basis component:
// the larger of the least-squares standard error from the residual
// scatter (which assumes independent residuals) and the delete-one-block
// jackknife over jackknifeBlocks² blocks of the index range (which holds
// when the residuals are correlated over the patch, as a displacement
// wave or a drift makes them). It also says which of the two was larger
// for most components.
func uncertainty(total sums, inv [3][3]float64, fit model, idx [][2]int, pos [][2]float64, use []int32) ([2][2]float64, bool) {
	var ss [2]float64
	lo := [2]int{math.MaxInt, math.MaxInt}
	hi := [2]int{math.MinInt, math.MinInt}
	for _, i := range use {
		p := fit.at(idx[i])
		for c := range 2 {
			r := pos[i][c] - p[c]
			ss[c] += r * r
			lo[c] = min(lo[c], idx[i][c])
			hi[c] = max(hi[c], idx[i][c])
		}
	}
	dof := float64(total.m - 3)
	var u [2][2]float64
	for k := range 2 {
		for c := range 2 {
			u[k][c] = math.Sqrt(ss[c] / dof * inv[k+1][k+1])
		}
	}
	var blocks [jackknifeBlocks * jackknifeBlocks]sums
	for _, i := range use {
		var b [2]int
		for c := range 2 {
			b[c] = (idx[i][c] - lo[c]) * jackknifeBlocks / (hi[c] - lo[c] + 1)
		}
		blocks[b[0]*jackknifeBlocks+b[1]].add(idx[i], pos[i])
	}
	var fits [][2][2]float64
	for b := range blocks {
		if blocks[b].m == 0 {
			continue
		}
		rest := total.sub(&blocks[b])
		if f, _, ok := rest.solve(); ok {
			fits = append(fits, f.basis)
		}
	}
	jackWins := 0
	if g := float64(len(fits)); g >= 3 {
		for k := range 2 {
			for c := range 2 {
				var mean, v float64
				for _, f := range fits {
					mean += f[k][c]
				}
				mean /= g
				for _, f := range fits {
					v += (f[k][c] - mean) * (f[k][c] - mean)
				}
				if j := math.Sqrt((g - 1) / g * v); j > u[k][c] {
					u[k][c] = j
					jackWins++
				}
			}
		}
	}
	return u, jackWins > 2
}
