package embed

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

func whitenDelay(t *testing.T, d []float64, k int, floor float64) *Whitened {
	t.Helper()
	x, err := Delay(d, k)
	if err != nil {
		t.Fatal(err)
	}
	w, err := Whiten(x, floor)
	if err != nil {
		t.Fatal(err)
	}
	return w
}

// checkSpan asserts that exactly r components are significant and that the
// others vanish to rounding, relative to the largest.
func checkSpan(t *testing.T, w *Whitened, r int) {
	t.Helper()
	if w.Kept != r {
		t.Errorf("window %d: kept %d components, want %d (spectrum %.3g)", len(w.Spectrum), w.Kept, r, w.Spectrum)
	}
	for j := r; j < len(w.Spectrum); j++ {
		if rel := w.Spectrum[j] / w.Spectrum[0]; rel > 1e-12 {
			t.Errorf("window %d: eigenvalue %d is %.3g of the largest, want below 1e-12", len(w.Spectrum), j+1, rel)
		}
	}
}

// A one-harmonic modulation d_n = 1 + a·cos(2π(nθ+φ)) puts every window on
// a 2-plane: cos(2π(θ(n+j)+φ)) = cos(2π(nθ+φ))·cos(2πjθ) − sin(2π(nθ+φ))·sin(2πjθ),
// so each vector is the mean plus a combination of the two fixed vectors
// (cos 2πjθ)_j and (sin 2πjθ)_j (trigonometric identity; common practice).
func TestOneHarmonicSpansAPlane(t *testing.T) {
	d := circleSpacings(2000)
	mean, _ := meanSpacing(d)
	for k := 3; k <= 8; k++ {
		w := whitenDelay(t, d, k, 0)
		checkSpan(t, w, 2)
		// The total variance is k·a²/2 in units of the mean spacing: a
		// cosine of an equidistributed phase has variance 1/2 (Weyl's
		// equidistribution theorem; common practice).
		want := float64(k) * 0.2 * 0.2 / 2 / (mean * mean)
		if got := w.Spectrum[0] + w.Spectrum[1]; math.Abs(got-want) > 0.01*want {
			t.Errorf("window %d: variance %.6g, want %.6g", k, got, want)
		}
	}
}

// Two incommensurate angles give four fixed vectors by the same identity:
// every window lies in a 4-space.
func TestTwoAnglesSpanA4Space(t *testing.T) {
	d := torusSpacings(3000)
	for k := 4; k <= 8; k++ {
		checkSpan(t, whitenDelay(t, d, k, 0), 4)
	}
	// Below four coordinates the torus fills the window.
	for k := 1; k <= 3; k++ {
		if w := whitenDelay(t, d, k, 0); w.Kept != k {
			t.Errorf("window %d: kept %d, want all %d", k, w.Kept, k)
		}
	}
}

// A periodic chain of one spacing has every window equal: the cloud is one
// point. The positions are n·0.37, so the spacings carry the rounding of
// real input.
func TestPeriodicIsOnePoint(t *testing.T) {
	d := make([]float64, 500)
	for i := range d {
		d[i] = float64(i+1)*0.37 - float64(i)*0.37
	}
	for k := 1; k <= 6; k++ {
		w := whitenDelay(t, d, k, 0)
		if w.Kept != 0 {
			t.Errorf("window %d: kept %d components of a point", k, w.Kept)
		}
		for j, v := range w.Spectrum {
			if v > 1e-20 {
				t.Errorf("window %d: eigenvalue %d = %.3g, want ~0", k, j+1, v)
			}
		}
		if len(w.Cloud) != len(d)-k+1 || len(w.Cloud[0]) != 0 {
			t.Errorf("window %d: cloud of %d rows of %d, want %d rows of 0", k, len(w.Cloud), len(w.Cloud[0]), len(d)-k+1)
		}
	}
}

// Whitening gives zero mean and the identity covariance on the kept
// components (the definition of whitening; common practice).
func TestWhitenedComponents(t *testing.T) {
	for name, d := range map[string][]float64{
		"circle": circleSpacings(1500),
		"torus":  torusSpacings(1500),
		"random": randomSpacings(1500, 0.5, 4),
	} {
		w := whitenDelay(t, d, 6, 0)
		n := len(w.Cloud)
		if w.Kept == 0 {
			t.Fatalf("%s: nothing kept", name)
		}
		x := mat.NewDense(n, w.Kept, nil)
		for i, row := range w.Cloud {
			x.SetRow(i, row)
		}
		for j := range w.Kept {
			if m := stat.Mean(mat.Col(nil, j, x), nil); math.Abs(m) > 1e-12 {
				t.Errorf("%s: component %d has mean %.3g", name, j, m)
			}
		}
		var cov mat.SymDense
		stat.CovarianceMatrix(&cov, x, nil)
		for i := range w.Kept {
			for j := range w.Kept {
				want := 0.0
				if i == j {
					want = 1
				}
				if math.Abs(cov.At(i, j)-want) > 1e-10 {
					t.Errorf("%s: covariance (%d,%d) = %.12g, want %v", name, i, j, cov.At(i, j), want)
				}
			}
		}
		// The axes are orthonormal.
		var g mat.Dense
		g.Mul(w.Axes.T(), w.Axes)
		if !mat.EqualApprox(&g, eye(w.Kept), 1e-12) {
			t.Errorf("%s: axes not orthonormal", name)
		}
	}
}

func eye(n int) *mat.Dense {
	m := mat.NewDense(n, n, nil)
	for i := range n {
		m.Set(i, i, 1)
	}
	return m
}

// Position jitter of standard deviation σ gives each spacing the noise
// variance 2σ² and neighbouring spacings the covariance −σ²; its spectrum
// at window w is σ²(2 − 2cos(πj/(w+1))), j = 1…w (the second-difference
// matrix; common practice). The estimated floor must hide that noise and
// keep the circle's two components.
func TestNoiseFloorHidesJitter(t *testing.T) {
	const sigma = 0.02
	d := jitter(circleSpacings(3000), sigma, 5)
	if w := whitenDelay(t, d, 6, 0); w.Kept != 6 {
		t.Fatalf("without a floor the noise should fill all 6 directions, kept %d", w.Kept)
	}
	ch, err := ChooseWindow(d, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// At window 13 the circle takes 2 eigenvalues; the 7th largest then
	// lies between the 7th and 5th largest of the noise spectrum
	// (interlacing under a rank-2 positive perturbation): between 2σ²
	// and 2.87σ².
	if r := ch.NoiseVariance / (2 * sigma * sigma); r < 0.9 || r > 1.6 {
		t.Errorf("noise variance %.3g is %.2f × 2σ², want within [0.9, 1.6]", ch.NoiseVariance, r)
	}
	if ch.NoiseCapped {
		t.Errorf("2%% jitter is below the default tolerance, yet the estimate was capped")
	}
	for k := 2; k <= 8; k++ {
		w := whitenDelay(t, d, k, ch.NoiseFloor)
		if w.Kept != 2 {
			t.Errorf("window %d: kept %d with the noise floor, want 2 (spectrum %.3g, threshold %.3g)", k, w.Kept, w.Spectrum, w.Threshold)
		}
	}
}

func TestThreshold(t *testing.T) {
	for _, tc := range []struct {
		spec  []float64
		floor float64
		want  float64
	}{
		{[]float64{1, 0.5}, 0, RelativeCut},
		{[]float64{1e-6, 0}, 0, AbsoluteCut},
		{[]float64{1, 0.5}, 0.01, 0.01},
		{nil, 0, AbsoluteCut},
	} {
		if got := Threshold(tc.spec, tc.floor); got != tc.want {
			t.Errorf("Threshold(%v, %v) = %v, want %v", tc.spec, tc.floor, got, tc.want)
		}
	}
}
