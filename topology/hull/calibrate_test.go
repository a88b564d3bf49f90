package hull

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// The calibration of the two factors of the hull analysis that no closed
// form fixes, by simulation of the suite's hulls over its noise range:
//
//   - noiseFactor (cloud.go): a bar is significant only above
//     noiseFactor·s, s the measured noise propagated to the cloud. The
//     false call it controls is a loop (or 2-cycle) made by noise alone: a
//     bar beyond the true Betti numbers above noiseFactor·s — and above
//     the full threshold τ, which adds the sampling term. The price of a
//     larger factor is true loops below it.
//   - modelSlack (angles.go): the angles pass the model check when
//     χ² = RSS/σ̂² ≤ modelSlack · q, q the 0.999 quantile of χ² with N − P
//     degrees of freedom and σ̂² the measured noise. The false calls it
//     controls are true angles refused and wrong bases (a sublattice of
//     index 2 of the module, or angles unrelated to it) accepted. Each draw
//     gives the slack at which it would just pass, χ²/q.
//
// BenchmarkCalibration runs the whole grid and logs the table the
// constants' comments and the README quote:
//
//	go test -run '^$' -bench Calibration -benchtime 1x -v ./topology/hull
//
// TestCalibrationSlice asserts the rates on a small slice of it.

// calCell is one cell of the calibration grid: a design (its seed set per
// draw), the true Betti numbers b1, b2 of its hull, its true angles and
// wrong bases of the same number of angles, and its cell of p sites.
type calCell struct {
	name  string
	spec  design.Spec
	p     int
	betti [3]int
	truth []float64
	wrong [][]float64
}

// calGrid returns the calibration cells at the given sizes and noises: a
// circle, a dimerised circle (2 circles) and a two-torus, each with the
// suite's angles (√2−1, 2−√3). Their Betti numbers are p·C(d, k) (Künneth
// formula; common practice). The wrong bases are 2θ (index 2 in the
// module), θ1 ± θ2 (index 2), and the angles the issue reports a torus of
// a few hundred sites given, 0.00001 and 0.346.
func calGrid(sites []int, noises []float64) []calCell {
	t1, t2 := math.Sqrt2-1, 2-math.Sqrt(3)
	var out []calCell
	for _, n := range sites {
		for _, noise := range noises {
			tag := fmt.Sprintf("N%d/σ%g%%", n, 100*noise)
			out = append(out,
				calCell{name: "circle/" + tag, p: 1, betti: [3]int{1, 1, 0}, truth: []float64{t1},
					wrong: [][]float64{{2 * t1}, {0.346}},
					spec:  design.Spec{Family: "modulated", Sites: n, Theta: t1, Sin: []float64{0.1}, Phase: 0.13, Noise: noise}},
				calCell{name: "circle×2/" + tag, p: 2, betti: [3]int{2, 2, 0}, truth: []float64{t1},
					wrong: [][]float64{{2 * t1}, {0.346}},
					spec:  design.Spec{Family: "decorated", Sites: n, Cell: []float64{0.88, 1.12}, Theta: t1, Sin: []float64{0.1}, Phase: 0.13, Noise: noise}},
				calCell{name: "torus/" + tag, p: 1, betti: [3]int{1, 2, 1}, truth: []float64{t1, t2},
					wrong: [][]float64{{t1, 2 * t2}, {t1 + t2, t1 - t2}, {0.00001, 0.346}},
					spec:  design.Spec{Family: "two-angle", Sites: n, Theta: t1, Amp: 0.1, Theta2: t2, Amp2: 0.08, Phase: 0.13, Phase2: 0.71, Noise: noise}},
			)
		}
	}
	return out
}

// barDraw is what one analysed draw says of the noise term: the longest
// bar beyond the true Betti numbers and the shortest true bar, over H1 and
// H2, in units of the noise scale s and of the threshold τ.
type barDraw struct {
	extraS, extraTau, trueS float64
}

// barcodeDraw analyses one draw and reads its barcode; false when the
// analysis computed none (a rule before the barcodes decided) or measured
// no noise.
func barcodeDraw(p *pattern.Pattern, betti [3]int) (barDraw, bool, error) {
	r, err := Analyze(p, Options{})
	if err != nil {
		return barDraw{}, false, err
	}
	per := r.Persistence
	if len(per.Bars) == 0 || !(per.NoiseScale > 0) {
		return barDraw{}, false, nil
	}
	// With p components, cycles born once the components merge (the
	// (p−1)-th longest H0 bar's death) belong to the space between them
	// and are not counted (see count): they are left out here too.
	merge := math.Inf(1)
	var deaths []float64
	for _, b := range per.Bars {
		if b.Dim == 0 && !b.Essential() {
			deaths = append(deaths, b.Death)
		}
	}
	slices.Sort(deaths)
	slices.Reverse(deaths)
	if p := betti[0]; p > 1 && len(deaths) >= p-1 {
		merge = deaths[p-2]
	}
	d := barDraw{trueS: math.Inf(1)}
	for dim := 1; dim <= 2; dim++ {
		var ps []float64
		for _, b := range per.Bars {
			if b.Dim == dim && b.Birth < merge {
				// An essential bar (a cycle that lives until the scale at
				// which the components merge, where the barcode stops)
				// counts as infinitely persistent.
				v := math.Inf(1)
				if !b.Essential() {
					v = b.Persistence()
				}
				ps = append(ps, v)
			}
		}
		slices.Sort(ps)
		slices.Reverse(ps)
		k := betti[dim]
		if k > 0 && len(ps) >= k {
			d.trueS = math.Min(d.trueS, ps[k-1]/per.NoiseScale)
		} else if k > 0 && dim == 1 {
			d.trueS = 0 // a true loop missing altogether
		}
		if len(ps) > k {
			d.extraS = math.Max(d.extraS, ps[k]/per.NoiseScale)
			d.extraTau = math.Max(d.extraTau, ps[k]/per.Threshold)
		}
	}
	return d, true, nil
}

// modelDraw returns, for one draw, the slack χ²/q at which the model check
// of the true angles would just pass, and that of each wrong basis (one
// harmonic: the designs are pure sines). The measured noise is the
// embedding's, as in the analysis.
func modelDraw(p *pattern.Pattern, c calCell) (float64, []float64, error) {
	opt, err := Options{}.withDefaults()
	if err != nil {
		return 0, nil, err
	}
	res := &Result{Sites: p.Len(), MeanSpacing: p.MeanSpacing(), Warnings: []string{}, Trace: &Trace{}}
	if _, err := newAnalysis(p, opt, res); err != nil {
		return 0, nil, err
	}
	n := make([]int, p.Len())
	for i := range n {
		n[i] = i
	}
	ratio := func(f []float64) (float64, error) {
		mc, ok := modelCheck(n, p.Positions, f, c.p, 1, res.Embedding.NoiseVariance, res.MeanSpacing)
		if !ok {
			return 0, fmt.Errorf("%s: the model does not fit %d sites", c.name, p.Len())
		}
		return mc.chi2 / mc.quantile, nil
	}
	tr, err := ratio(c.truth)
	if err != nil {
		return 0, nil, err
	}
	var wr []float64
	for _, w := range c.wrong {
		v, err := ratio(w)
		if err != nil {
			return 0, nil, err
		}
		wr = append(wr, v)
	}
	return tr, wr, nil
}

// calRow is the outcome of one cell. Counts are of draws: extraS with a
// bar beyond the true Betti numbers longer than noiseFactor·s, extraTau
// longer than τ, lost with a true bar shorter than noiseFactor·s;
// trueFail with the true angles refused at modelSlack (trueFail1 at a
// slack of 1), wrongPass with a wrong basis accepted (of wrongTries).
type calRow struct {
	name                        string
	barDraws                    int
	extraS, extraTau, lost      int
	extraSValues                []float64
	extraSMax, trueSMin         float64
	modelDraws, wrongTries      int
	trueFail, trueFail1         int
	wrongPass                   int
	trueSlackMax, wrongSlackMin float64
}

// calibrate runs barDraws analysed draws and modelDraws embedded draws of
// each cell, seeds 1, 2, ….
func calibrate(cells []calCell, barDraws, modelDraws int) ([]calRow, error) {
	var rows []calRow
	for _, c := range cells {
		row := calRow{name: c.name, trueSMin: math.Inf(1), wrongSlackMin: math.Inf(1)}
		for seed := 1; seed <= max(barDraws, modelDraws); seed++ {
			s := c.spec
			s.Seed = uint64(seed)
			p, err := design.Generate(s)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", c.name, err)
			}
			if seed <= barDraws {
				d, ok, err := barcodeDraw(p, c.betti)
				if err != nil {
					return nil, fmt.Errorf("%s, seed %d: %w", c.name, seed, err)
				}
				if ok {
					row.barDraws++
					row.extraSValues = append(row.extraSValues, d.extraS)
					row.trueSMin = math.Min(row.trueSMin, d.trueS)
					if d.extraS > noiseFactor {
						row.extraS++
					}
					if d.extraTau > 1 {
						row.extraTau++
					}
					if d.trueS < noiseFactor {
						row.lost++
					}
				}
			}
			if seed <= modelDraws {
				tr, wr, err := modelDraw(p, c)
				if err != nil {
					return nil, fmt.Errorf("seed %d: %w", seed, err)
				}
				row.modelDraws++
				row.trueSlackMax = math.Max(row.trueSlackMax, tr)
				if tr > modelSlack {
					row.trueFail++
				}
				if tr > 1 {
					row.trueFail1++
				}
				for _, w := range wr {
					row.wrongTries++
					row.wrongSlackMin = math.Min(row.wrongSlackMin, w)
					if w <= modelSlack {
						row.wrongPass++
					}
				}
			}
		}
		if len(row.extraSValues) > 0 {
			row.extraSMax = slices.Max(row.extraSValues)
		}
		rows = append(rows, row)
	}
	return rows, nil
}

// calTable writes the rows as a table.
func calTable(rows []calRow) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%-18s | %5s %11s %9s %10s %8s %9s | %5s %10s %9s %9s %11s %9s\n",
		"cell", "draws", "extra>3s", "extra>τ", "true<3s", "max x/s", "min t/s",
		"draws", "true fail", "(slack1)", "max t/q", "wrong pass", "min w/q")
	for _, r := range rows {
		fmt.Fprintf(&b, "%-18s | %5d %11s %9s %10s %8.2f %9.2f | %5d %10s %9s %9.3f %11s %9.3g\n",
			r.name, r.barDraws, frac(r.extraS, r.barDraws), frac(r.extraTau, r.barDraws), frac(r.lost, r.barDraws), r.extraSMax, r.trueSMin,
			r.modelDraws, frac(r.trueFail, r.modelDraws), frac(r.trueFail1, r.modelDraws), r.trueSlackMax, frac(r.wrongPass, r.wrongTries), r.wrongSlackMin)
	}
	return b.String()
}

func frac(k, n int) string { return fmt.Sprintf("%d/%d", k, n) }

// BenchmarkCalibration runs the calibration grid once and logs its tables:
// position noise 0.5% to 5% (the suite's range); the noise term on 4
// analysed draws per cell at 2000 sites, the model check on 40 draws per
// cell at 500 and at 2000 sites.
func BenchmarkCalibration(b *testing.B) {
	noises := []float64{0.005, 0.01, 0.02, 0.03, 0.05}
	for b.Loop() {
		var out []calRow
		for _, g := range []struct {
			sites, bars int
		}{{500, 0}, {2000, 4}} {
			rows, err := calibrate(calGrid([]int{g.sites}, noises), g.bars, 40)
			if err != nil {
				b.Fatal(err)
			}
			out = append(out, rows...)
		}
		b.Log("\n" + calTable(out))
	}
}

// TestCalibrationSlice asserts the calibrated rates on a slice of the
// grid: at 1% and 3% position noise on 500 sites, the model check refuses
// none of 15 draws of the true angles and accepts none of the wrong bases
// (the full grid: none of 40 draws per cell up to 3%, the slack the truth
// needs at most 1.10, a wrong basis at least 3.39); and on two analysed
// draws of a
// circle of 2000 sites at 1%, no bar beyond its one loop exceeds
// noiseFactor·s, and the loop does.
func TestCalibrationSlice(t *testing.T) {
	if testing.Short() {
		t.Skip("the calibration slice runs the analysis on simulated chains; -short skips it")
	}
	var cells []calCell
	for _, c := range calGrid([]int{500}, []float64{0.01, 0.03}) {
		if c.p == 1 {
			cells = append(cells, c)
		}
	}
	rows, err := calibrate(cells, 0, 15)
	if err != nil {
		t.Fatal(err)
	}
	bars, err := calibrate(calGrid([]int{2000}, []float64{0.01})[:1], 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		if r.trueFail > 0 || r.wrongPass > 0 {
			t.Errorf("%s: the model check refused the true angles in %d of %d draws (slack up to %.3g) and accepted a wrong basis %d of %d times (slack down to %.3g), want none",
				r.name, r.trueFail, r.modelDraws, r.trueSlackMax, r.wrongPass, r.wrongTries, r.wrongSlackMin)
		}
	}
	for _, r := range bars {
		if r.barDraws != 2 || r.extraS > 0 || r.lost > 0 {
			t.Errorf("%s: %d draws read; %d with a noise bar above %g·s (longest %.3g·s), %d with the loop below it, want none", r.name, r.barDraws, r.extraS, float64(noiseFactor), r.extraSMax, r.lost)
		}
	}
	if t.Failed() {
		t.Log("\n" + calTable(append(rows, bars...)))
	}
}
