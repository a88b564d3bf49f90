package plate

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"

	"phasonhull/pattern/lattice"
	"phasonhull/topology"
)

// Edge states on a strip. The sample is cut to a strip of the box's L1
// columns along a1 (open) and L2 rows along a2, closed into a ring along
// a2 with a phase Seam: going once round the ring a state picks up
// exp(2πi·Seam), a momentum Seam/L2 along the strip. As Seam goes through
// one turn, the spectrum returns to itself, and the states at each edge
// that cross the middle of a bulk gap carry, by Laughlin's argument (one
// flux quantum threaded through the ring; Halperin, PRB 25, 2185, 1982),
// as many charges from one edge to the other as the Hall conductance of
// the filled bands — for the Hofstadter model the integer t_r of the gap's
// label r/q = s_r + t_r·α (Thouless, Kohmoto, Nightingale & den Nijs, PRL
// 49, 405, 1982).
//
// The count: W(φ) is the weight, on the first half of the columns
// (n1 < L1/2, the a1 = 0 edge), of the states below the gap's middle. W is
// smooth in φ but for a jump of about ±1 each time a state on that edge
// crosses the middle (a state on the other edge moves W by its small
// weight there). The count is the sum of the jumps, each rounded; a step
// of the sweep whose change of W is far from an integer is counted as
// unresolved (the sweep too coarse, or a state neither on an edge nor in
// the bulk). Sign: +1 for a state on the a1 = 0 edge going up through
// the middle as φ increases (W falls by one), the orientation in which
// the count equals t_r with the Peierls phases of New.

// Defaults of EdgeOptions.
const (
	DefaultEdgeSamples = 48
	// DefaultStripSites bounds the strip's sites: L2 is chosen so that
	// L1·L2 stays under it (at least 2 rows), every level and vector being
	// computed at each phase.
	DefaultStripSites = 600
)

// EdgeOptions control EdgeStates.
type EdgeOptions struct {
	// Samples is the number of phases over the turn; 0 means
	// DefaultEdgeSamples.
	Samples int
	// Rows is L2, the rows of the strip; 0 chooses it from
	// DefaultStripSites.
	Rows int
}

// EdgeResult is the edge-state count of each gap.
type EdgeResult struct {
	// Strip is L1 × L2, Samples the phases of the turn.
	Strip   [2]int    `json:"strip"`
	Samples int       `json:"samples"`
	Gaps    []EdgeGap `json:"gaps"`
}

// EdgeGap is one bulk gap's edge states.
type EdgeGap struct {
	// Energy is the middle of the bulk gap, IDS its IDS, Label its bulk
	// label (nil when unlabelled).
	Energy float64         `json:"energy"`
	IDS    float64         `json:"ids"`
	Label  *topology.Label `json:"label"`
	// Count is the signed number of crossings on the a1 = 0 edge over one
	// turn, +1 upward; Unresolved the steps that could not be read (Count is then
	// not reliable).
	Count      int `json:"count"`
	Unresolved int `json:"unresolved_steps"`
	// Expected is the label's coefficient of the flux α (the Hall
	// conductance the count should equal), when the group has a flux;
	// Agrees compares them.
	Expected *int `json:"expected,omitempty"`
	Agrees   bool `json:"agrees"`
}

// EdgeStates cuts the sample s into a strip (see above), runs the seam
// phase of model m through one turn and counts the edge states crossing
// the middle of each gap of bulk (the gaps of the bulk spectrum, with
// their labels). fluxIndex is the index of α among the labels' generators
// (−1 for none): the label's coefficient there is the expected count.
func EdgeStates(ctx context.Context, s *Sample, m Model, bulk []Gap, fluxIndex int, opt EdgeOptions) (*EdgeResult, error) {
	if len(bulk) == 0 {
		return nil, errors.New("plate: no bulk gap to count edge states in")
	}
	samples := opt.Samples
	if samples == 0 {
		samples = DefaultEdgeSamples
	}
	if samples < 8 {
		return nil, fmt.Errorf("plate: %d phases over the turn; need at least 8", samples)
	}
	l, pts, box, err := stripOf(s, opt.Rows)
	if err != nil {
		return nil, err
	}
	m.Strip = true
	res := &EdgeResult{Strip: box, Samples: samples}
	W := make([][]float64, len(bulk)) // W[g][k]
	for g := range W {
		W[g] = make([]float64, samples+1)
	}
	for k := 0; k <= samples; k++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		m.Seam = float64(k) / float64(samples)
		op, err := New(l, pts, m)
		if err != nil {
			return nil, err
		}
		vals, weights, err := op.edgeWeights(box[0])
		if err != nil {
			return nil, err
		}
		for g, gap := range bulk {
			mid := (gap.Lower + gap.Upper) / 2
			for i, e := range vals {
				if e < mid {
					W[g][k] += weights[i]
				}
			}
		}
	}
	for g, gap := range bulk {
		eg := EdgeGap{Energy: (gap.Lower + gap.Upper) / 2, IDS: gap.IDS, Label: gap.Label}
		for k := range samples {
			d := W[g][k+1] - W[g][k]
			n := math.Round(d)
			if math.Abs(d-n) > 0.3 {
				eg.Unresolved++
			}
			eg.Count -= int(n)
		}
		if gap.Label != nil && fluxIndex >= 0 && fluxIndex+1 < len(gap.Label.Coeffs) {
			want := gap.Label.Coeffs[fluxIndex+1]
			eg.Expected = &want
			eg.Agrees = eg.Unresolved == 0 && eg.Count == want
		}
		res.Gaps = append(res.Gaps, eg)
	}
	return res, nil
}

// stripOf cuts the first rows of the sample's box into a strip lattice:
// every column, L2 rows (rows, or chosen from DefaultStripSites).
func stripOf(s *Sample, rows int) (*lattice.Lattice, [][2]float64, [2]int, error) {
	l := s.Lattice
	lo, hi := [2]int{math.MaxInt, math.MaxInt}, [2]int{math.MinInt, math.MinInt}
	for i, on := range l.OnLattice {
		if on {
			for k := range 2 {
				lo[k], hi[k] = min(lo[k], l.Index[i][k]), max(hi[k], l.Index[i][k])
			}
		}
	}
	L1, L2box := hi[0]-lo[0]+1, hi[1]-lo[1]+1
	if rows == 0 {
		rows = min(L2box, max(2, DefaultStripSites/L1))
	}
	if rows < 2 || rows > L2box {
		return nil, nil, [2]int{}, fmt.Errorf("plate: a strip of %d rows from a box of %d", rows, L2box)
	}
	out := &lattice.Lattice{Basis: l.Basis, Origin: l.Origin, Unit: l.Unit}
	var pts [][2]float64
	for i, on := range l.OnLattice {
		if on && l.Index[i][1]-lo[1] < rows {
			out.Index = append(out.Index, l.Index[i])
			out.OnLattice = append(out.OnLattice, true)
			out.Displacement = append(out.Displacement, l.Displacement[i])
			pts = append(pts, s.Plane.Points[i])
		}
	}
	if len(pts) != L1*rows {
		return nil, nil, [2]int{}, fmt.Errorf("plate: a strip needs a site on every lattice point of its %d×%d box; %d of them carry none", L1, rows, L1*rows-len(pts))
	}
	return out, pts, [2]int{L1, rows}, nil
}

// edgeWeights returns every level, ascending, and each level's weight on
// the first half of the columns (n1 − min n1 < L1/2), by gonum's dense
// symmetric eigensolver on the real embedding of the operator (see
// Eigenvalues; each level's two embedded vectors share its weights).
func (op *Operator) edgeWeights(L1 int) ([]float64, []float64, error) {
	n := op.Len()
	if n > DenseLimit {
		return nil, nil, fmt.Errorf("plate: a strip of %d sites: at most %d", n, DenseLimit)
	}
	a := mat.NewSymDense(2*n, nil)
	for i := range n {
		a.SetSym(i, i, op.diag[i])
		a.SetSym(n+i, n+i, op.diag[i])
		for k := op.ptr[i]; k < op.ptr[i+1]; k++ {
			j := int(op.col[k])
			if j < i {
				continue
			}
			v := op.val[k]
			a.SetSym(i, j, a.At(i, j)+real(v))
			a.SetSym(n+i, n+j, a.At(n+i, n+j)+real(v))
			a.SetSym(n+i, j, a.At(n+i, j)+imag(v))
			a.SetSym(n+j, i, a.At(n+j, i)-imag(v))
		}
	}
	var e mat.EigenSym
	if !e.Factorize(a, true) {
		return nil, nil, fmt.Errorf("plate: the dense eigensolver did not converge on a strip of %d sites", n)
	}
	vals := e.Values(nil)
	var vec mat.Dense
	e.VectorsTo(&vec)
	lo := math.MaxInt
	for _, idx := range op.index {
		lo = min(lo, idx[0])
	}
	left := make([]bool, n)
	for i, idx := range op.index {
		left[i] = 2*(idx[0]-lo) < L1
	}
	w := make([]float64, 2*n)
	for c := range 2 * n {
		s := 0.0
		for i := range n {
			if left[i] {
				x, y := vec.At(i, c), vec.At(n+i, c)
				s += x*x + y*y
			}
		}
		w[c] = s / 2 // each level appears twice
	}
	order := make([]int, 2*n)
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(a, b int) int { return cmp.Compare(vals[a], vals[b]) })
	sv, sw := make([]float64, 2*n), make([]float64, 2*n)
	for i, c := range order {
		sv[i], sw[i] = vals[c], w[c]
	}
	return sv, sw, nil
}

func (r *EdgeResult) writeText(b *strings.Builder) {
	fmt.Fprintf(b, "edge states on a %d×%d strip (open along a1, closed along a2), the seam phase over one turn in %d steps; count: signed crossings on the a1 = 0 edge\n", r.Strip[0], r.Strip[1], r.Samples)
	for _, g := range r.Gaps {
		label := "unlabelled"
		if g.Label != nil {
			label = g.Label.CoeffString()
		}
		fmt.Fprintf(b, "  gap at E = %.4g, IDS %.4f, label %s: %d", g.Energy, g.IDS, label, g.Count)
		if g.Expected != nil {
			verdict := "disagrees"
			if g.Agrees {
				verdict = "agrees"
			}
			fmt.Fprintf(b, " (the label's flux coefficient %d: %s)", *g.Expected, verdict)
		}
		if g.Unresolved > 0 {
			fmt.Fprintf(b, ", %d steps unresolved", g.Unresolved)
		}
		b.WriteString("\n")
	}
}
