package register

import (
	"math"
	"sort"
)

// geometry holds the sorted design and the normalised coordinates of the
// fit: t = (d − centre)/half ∈ [−1, 1] and u = (d − d₀)/span ∈ [0, 1].
type geometry struct {
	d            []float64 // design, ascending
	hmin         []float64 // smaller design spacing next to each site
	centre, half float64
	d0, span     float64
	drift        bool
}

func newGeometry(d []float64, drift bool) *geometry {
	n := len(d)
	g := &geometry{d: d, hmin: make([]float64, n), drift: drift}
	g.d0, g.span = d[0], d[n-1]-d[0]
	g.centre, g.half = (d[0]+d[n-1])/2, g.span/2
	for i := range d {
		h := math.Inf(1)
		if i > 0 {
			h = d[i] - d[i-1]
		}
		if i+1 < n {
			h = math.Min(h, d[i+1]-d[i])
		}
		g.hmin[i] = h
	}
	return g
}

// params is the number of fitted parameters.
func (g *geometry) params() int {
	if g.drift {
		return 3
	}
	return 2
}

// columns returns the design-matrix row of design coordinate d: 1, t and,
// with drift, u².
func (g *geometry) columns(d float64, row []float64) {
	row[0] = 1
	row[1] = (d - g.centre) / g.half
	if g.drift {
		u := (d - g.d0) / g.span
		row[2] = u * u
	}
}

// gateWidths returns each design site's gate in design units.
func (g *geometry) gateWidths(gate float64) []float64 {
	w := make([]float64, len(g.hmin))
	for i, h := range g.hmin {
		w[i] = gate * h
	}
	return w
}

// model is x(d) = b₀ + b₁·t + b₂·u² in the normalised coordinates of a
// geometry, with the covariance of b.
type model struct {
	g   *geometry
	b   []float64
	cov [][]float64
}

func (m model) predict(d float64) float64 {
	t := (d - m.g.centre) / m.g.half
	x := m.b[0] + m.b[1]*t
	if len(m.b) == 3 {
		u := (d - m.g.d0) / m.g.span
		x += m.b[2] * u * u
	}
	return x
}

// slope returns dx/dd at d.
func (m model) slope(d float64) float64 {
	s := m.b[1] / m.g.half
	if len(m.b) == 3 {
		s += 2 * m.b[2] * (d - m.g.d0) / (m.g.span * m.g.span)
	}
	return s
}

// lineModel returns the model x = offset + scale·d (no drift).
func (g *geometry) lineModel(offset, scale float64) model {
	b := make([]float64, g.params())
	b[0] = offset + scale*g.centre
	b[1] = scale * g.half
	return model{g: g, b: b}
}

// calib is the calibration in the caller's terms, with standard errors.
type calib struct {
	offset, scale, drift          float64
	offsetErr, scaleErr, driftErr float64
}

// calibration converts b to offset, scale and drift:
//
//	offset = b₀ − b₁·centre/half,  scale = b₁/half,  drift = b₂/(2·b₁)
//
// (since span = 2·half), and propagates the covariance of b through the
// Jacobian of that map (first-order error propagation; common practice).
func (m model) calibration(g *geometry) calib {
	b := m.b
	c := calib{offset: b[0] - b[1]*g.centre/g.half, scale: b[1] / g.half}
	// Rows of the Jacobian ∂(offset, scale, drift)/∂b.
	jac := [][]float64{
		{1, -g.centre / g.half, 0},
		{0, 1 / g.half, 0},
	}
	if len(b) == 3 {
		c.drift = b[2] / (2 * b[1])
		jac = append(jac, []float64{0, -b[2] / (2 * b[1] * b[1]), 1 / (2 * b[1])})
	}
	if m.cov == nil {
		return c
	}
	errs := make([]float64, len(jac))
	for r, row := range jac {
		var v float64
		for i := range b {
			for j := range b {
				v += row[i] * m.cov[i][j] * row[j]
			}
		}
		errs[r] = math.Sqrt(math.Max(v, 0))
	}
	c.offsetErr, c.scaleErr = errs[0], errs[1]
	if len(b) == 3 {
		c.driftErr = errs[2]
	}
	return c
}

// firstGuess chooses the first calibration, for one direction, among the
// lines through one design/measured pair near the start of both chains and
// one near their end — up to endSkips sites skipped at each end of each
// chain — keeping the line under which most measured sites fall inside a
// gate, closest to its centre (see score).
func (g *geometry) firstGuess(x []float64, gates []float64, reversed bool) model {
	n, m := len(g.d), len(x)
	best, bestScore := g.lineModel(0, 1), math.Inf(-1)
	sa, sb := min(endSkips, n-1), min(endSkips, m-1)
	for a := 0; a <= sa; a++ {
		for c := 0; c <= sa && n-1-c > a; c++ {
			for b := 0; b <= sb; b++ {
				for e := 0; e <= sb && m-1-e > b; e++ {
					// Design a pairs with measured b (or m−1−b when
					// reversed), design n−1−c with measured m−1−e (or e).
					xa, xc := x[b], x[m-1-e]
					if reversed {
						xa, xc = x[m-1-b], x[e]
					}
					scale := (xc - xa) / (g.d[n-1-c] - g.d[a])
					cand := g.lineModel(xa-scale*g.d[a], scale)
					if s := score(cand, g, x, gates); s > bestScore {
						best, bestScore = cand, s
					}
				}
			}
		}
	}
	return best
}

// score sums, over up to scoreSample measured sites spread evenly along
// the chain, 2 − (r/gate)² for each site within the gate of its nearest
// calibrated design site: the weight the alignment gives a match.
func score(m model, g *geometry, x []float64, gates []float64) float64 {
	step := max(1, len(x)/scoreSample)
	scale := m.b[1] / g.half
	offset := m.b[0] - m.b[1]*g.centre/g.half
	var s float64
	for k := 0; k < len(x); k += step {
		// The design coordinate the line maps to x[k], and its nearest
		// design site.
		d := (x[k] - offset) / scale
		i := sort.SearchFloat64s(g.d, d)
		if i == len(g.d) || (i > 0 && d-g.d[i-1] < g.d[i]-d) {
			i--
		}
		r := (x[k] - m.predict(g.d[i])) / (math.Abs(scale) * gates[i])
		if math.Abs(r) <= 1 {
			s += 2 - r*r
		}
	}
	return s
}
