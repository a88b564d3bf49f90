package register

import (
	"math"
	"slices"
)

// TieFactor: two alignments tie when their costs differ by no more than
// TieFactor combined standard uncertainties (a two-sided 95% band under
// Gaussian noise; common practice).
const TieFactor = 2

// Tie is another alignment of the chains that the data cannot tell from
// the reported one: the whole matching shifted along the measured chain,
// as many sites left unmatched, and a cost within TieFactor combined
// uncertainties of Result.Cost.
type Tie struct {
	// Shift is how many sites further along the measured chain (sorted
	// ascending) the tie matches each design site than the reported
	// matching does.
	Shift int
	// Cost and CostErr are the tie's alignment cost and its uncertainty
	// (see Result.Cost).
	Cost, CostErr float64
	// Missing and Extra count the sites the tie leaves unmatched.
	Missing, Extra int
}

// shifted is one candidate alignment: a converged run's matching shifted by
// shift sites along the measured chain, refitted.
type shifted struct {
	shift         int
	r             *run
	cost, costErr float64
	missing       int
	extra         int
}

// cost returns the alignment objective of r's matching under r's model —
// one per unmatched site of either chain plus (res/gate)² per matched pair
// (see align) — and its standard uncertainty. A pair whose residual lies
// outside its gate counts as two unmatched sites, as align would leave it.
//
// The uncertainty propagates the robust sigma σ of the residuals through
// the pair terms: ∂(res/g)²/∂res = 2·res/g², so
// u(C)² = Σ (2·res·σ/g²)² (first-order error propagation; common practice).
func (g *geometry) cost(r *run, x, gates []float64) shifted {
	c := shifted{r: r, missing: len(g.d), extra: len(x)}
	// The floor keeps exact data from making every difference significant.
	sigma := math.Max(r.sigma, 1e-9*(x[len(x)-1]-x[0])/float64(len(x)-1))
	var v float64
	for _, p := range r.pairs {
		gate := math.Abs(r.m.slope(g.d[p.d])) * gates[p.d]
		res := x[p.k] - r.m.predict(g.d[p.d])
		if math.Abs(res) > gate {
			c.cost += 2
			continue
		}
		c.missing--
		c.extra--
		pc, pv := pairCost(res, gate, sigma)
		c.cost += pc
		v += pv
	}
	c.cost += float64(c.missing + c.extra)
	c.costErr = math.Sqrt(v)
	return c
}

// pairCost returns the cost (res/gate)² of a matched pair whose residual
// has magnitude res, and the variance of that cost from a residual
// scatter sigma per coordinate: ∂(res/g)²/∂res = 2·res/g², so
// (2·res·σ/g²)² (first-order error propagation; common practice). A
// residual vector r in the plane gives the same, its gradient 2·r/g²
// having magnitude 2·|r|/g².
func pairCost(res, gate, sigma float64) (cost, variance float64) {
	d := 2 * res * sigma / (gate * gate)
	return (res / gate) * (res / gate), d * d
}

// ties reports whether candidates a and b tie: their costs differ by no
// more than TieFactor combined uncertainties.
func ties(a, b shifted) bool { return costsTie(a.cost, a.costErr, b.cost, b.costErr) }

// costsTie reports whether two alignment costs with their standard
// uncertainties differ by no more than TieFactor combined uncertainties.
func costsTie(a, aErr, b, bErr float64) bool {
	return math.Abs(a-b) <= TieFactor*math.Hypot(aErr, bErr)
}

// settle searches the offsets of the whole alignment of the converged run
// r: its matching shifted by δ = ±1, ±2, … sites along the measured chain
// (order preserving, one to one), from each of which the matching and the
// calibration settle again as in Register. The search goes on in each
// direction as long as the settled alignment costs no more than the best
// found plus the tie margin, or the shifted matching alone leaves no more
// sites unmatched than that (n + m − 2·pairs still inside the chain, one
// per unmatched site, bounds the cost of the matching shifted from below),
// so that every shift that could tie is tried.
//
// Among the alignments whose cost ties with the cheapest, the one leaving
// the fewest sites unmatched is kept — a missing site and an extra one
// that a shift of the whole alignment explains are not reported — and
// the cheapest of those, or r's own matching when it ties with that one;
// the others that leave as many unmatched and tie with it are returned as
// ties.
func (g *geometry) settle(r *run, x, gates []float64, maxIter int) (*run, shifted, []shifted) {
	cands := []shifted{g.cost(r, x, gates)}
	best := cands[0]
	reach := func() float64 { return best.cost + TieFactor*math.Sqrt2*best.costErr }
	for _, dir := range []int{-1, 1} {
		for delta := dir; ; delta += dir {
			pairs := make([]pair, 0, len(r.pairs))
			for _, p := range r.pairs {
				if k := p.k + delta; k >= 0 && k < len(x) {
					pairs = append(pairs, pair{p.d, k})
				}
			}
			if len(pairs) < g.params()+2 {
				break
			}
			// The shifted matching alone leaves this many unmatched.
			bound := float64(len(g.d) + len(x) - 2*len(pairs))
			c, ok := g.refit(r, pairs, x, gates, maxIter)
			if ok {
				c.shift = delta
				cands = append(cands, c)
				if c.cost < best.cost {
					best = c
				}
			}
			if bound > reach() && !(ok && c.cost <= reach()) {
				break
			}
		}
	}
	// The fewest unmatched among those tying with the cheapest, then the
	// cheapest of them.
	var near []shifted
	for _, c := range cands {
		if c.cost <= best.cost || ties(c, best) {
			near = append(near, c)
		}
	}
	fewest := slices.MinFunc(near, func(a, b shifted) int { return (a.missing + a.extra) - (b.missing + b.extra) })
	var kept *shifted
	for i, c := range near {
		if c.missing+c.extra == fewest.missing+fewest.extra && (kept == nil || c.cost < kept.cost) {
			kept = &near[i]
		}
	}
	// In a tie the registration's own matching stays.
	if own := cands[0]; own.missing+own.extra == kept.missing+kept.extra && ties(own, *kept) {
		kept = &own
	}
	win := *kept
	var tied []shifted
	for _, c := range near {
		if c.shift != win.shift && c.missing+c.extra == win.missing+win.extra && ties(c, win) {
			c.shift -= win.shift
			tied = append(tied, c)
		}
	}
	slices.SortFunc(tied, func(a, b shifted) int { return a.shift - b.shift })
	return win.r, win, tied
}

// refit lets the matching settle from r's model moved by the median
// residual of pairs, a shift of r's matching (which sits about that far
// off r's model), and returns the converged candidate with its cost; false
// when it fails or settles back on r's matching.
func (g *geometry) refit(r *run, pairs []pair, x, gates []float64, maxIter int) (shifted, bool) {
	res := make([]float64, len(pairs))
	for i, p := range pairs {
		res[i] = x[p.k] - r.m.predict(g.d[p.d])
	}
	start := model{g: g, b: slices.Clone(r.m.b)}
	start.b[0] += median(res)
	s, err := g.solve(start, x, gates, maxIter)
	if err != nil || slices.Equal(s.pairs, r.pairs) {
		return shifted{}, false
	}
	return g.cost(s, x, gates), true
}
