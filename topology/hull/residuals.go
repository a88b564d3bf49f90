package hull

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Disorder is the positional scatter that the recovered hull does not
// explain.
type Disorder struct {
	// RMS is the root-mean-square distance of the sites from the smooth
	// model of the hull, in the pattern's unit; Relative is RMS over the
	// mean spacing.
	RMS      float64 `json:"rms"`
	Relative float64 `json:"relative"`
	// Model names the model the residuals are taken from ("none" for a
	// disordered chain, whose figure is then the spread of the spacings).
	Model string `json:"model"`
	// MutualInformation is the Kraskov–Stögbauer–Grassberger estimate,
	// in nats, of the information one spacing carries about the next: 0
	// for independent spacings, large for a smooth hull.
	MutualInformation float64 `json:"mutual_information"`
	// IntrinsicDimension is the Levina–Bickel estimate of the dimension
	// of the delay cloud at small scales: about 1 for a circle, 2 for a
	// torus, the window for independent spacings.
	IntrinsicDimension float64 `json:"intrinsic_dimension"`
}

// cellResiduals fits the sites with a periodic cell of p sites on a
// uniform lattice — x = c0 + c1·n + δ_{n mod p} — and returns the residual
// of each fitted site (p = 1 is a plain lattice).
func cellResiduals(n []int, x []float64, p int) ([]float64, bool) {
	cols := 2 + p - 1
	if len(x) <= cols+1 {
		return nil, false
	}
	mid := 0.5 * float64(n[0]+n[len(n)-1])
	A := mat.NewDense(len(x), cols, nil)
	for i, v := range n {
		A.Set(i, 0, 1)
		A.Set(i, 1, float64(v)-mid)
		if j := ((v % p) + p) % p; j > 0 {
			A.Set(i, 1+j, 1)
		}
	}
	b := mat.NewVecDense(len(x), append([]float64(nil), x...))
	var beta mat.VecDense
	if err := beta.SolveVec(A, b); err != nil {
		return nil, false
	}
	var fitted mat.VecDense
	fitted.MulVec(A, &beta)
	r := make([]float64, len(x))
	for i := range x {
		r[i] = x[i] - fitted.AtVec(i)
	}
	return r, true
}

// setResiduals stores per-site residuals r of the fitted sites (those
// fitSites returns) on the Result, with NaN for the sites left out, and
// the disorder figure they give.
func (a *analysis) setResiduals(r []float64, model string) {
	out := make([]float64, a.p.Len())
	k := 0
	var ss float64
	for j := range out {
		if a.spurious[j] {
			out[j] = math.NaN()
			continue
		}
		out[j] = r[k]
		ss += r[k] * r[k]
		k++
	}
	a.res.SiteResiduals = out
	rms := math.Sqrt(ss / float64(k))
	a.res.Disorder = &Disorder{RMS: rms, Relative: rms / a.res.MeanSpacing, Model: model}
}

// setAllResiduals stores residuals given for every site.
func (a *analysis) setAllResiduals(r []float64, model string) {
	var ss float64
	for _, v := range r {
		ss += v * v
	}
	a.res.SiteResiduals = r
	rms := math.Sqrt(ss / float64(len(r)))
	a.res.Disorder = &Disorder{RMS: rms, Relative: rms / a.res.MeanSpacing, Model: model}
}

// periodicResiduals sets the residuals of a point or finite hull.
func (a *analysis) periodicResiduals() {
	p := max(a.res.Hull.Period, 1)
	n, x := a.fitSites()
	if r, ok := cellResiduals(n, x, p); ok {
		model := "uniform lattice"
		if p > 1 {
			model = "periodic cell of the lattice"
		}
		a.setResiduals(r, model)
	}
}
