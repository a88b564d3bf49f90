package tones

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Parameters of the line search.
const (
	// hannENBW is the equivalent noise bandwidth of the Hann taper, in
	// natural bins (1/N): its periodogram ordinates one natural bin apart
	// are correlated, and about N/(2·1.5) of them in (0, ½] are
	// independent (Harris, Proc. IEEE 66, 1978).
	hannENBW = 1.5
	// mainLobe is the half-width of the Hann taper's main lobe, in
	// natural bins: within it a line is one peak, and below it a
	// frequency cannot be told from the removed mean and drift.
	mainLobe = 2.0
	// floorTerms is K, the number of terms of the noise floor's cosine
	// series Σ_{j<K} c_j cos 2πjf. Two terms hold the spectrum of
	// independent spacing noise (white, c_1 = 0), of position noise
	// (differenced white noise, 2σ²(1 − cos 2πf)) and of their sum,
	// exactly; more terms let the fit wander where the spectrum of
	// position noise dips to zero at low frequency, and a line there
	// would be judged against a floor too low.
	floorTerms = 2
	// leakageFloor is the lowest floor, relative to the mean level, that
	// can be measured through the taper: the Hann taper's highest
	// sidelobe is 31 dB under its main lobe, so a power 30 dB under the
	// mean level is leakage rather than a property of the noise.
	leakageFloor = 1e-3
	// leakageMargin is the factor by which a peak must exceed the bound
	// of the taper's leakage from a stronger peak of the same look to be
	// taken in that look; a peak that does not is looked at again after
	// the stronger line is subtracted.
	leakageMargin = 100
)

// spectrum holds what the periodograms of one sequence length share.
type spectrum struct {
	n      int // length of the sequence
	nfft   int // length of the padded transform
	fft    *fourier.FFT
	window []float64
	wnorm  float64 // Σ w²
	wsum   float64 // Σ w
	buf    []float64
	coef   []complex128
	cos1   []float64 // cos 2πf at each grid bin
	// Significance: a line is a peak with power/floor above thrGen, or
	// above thrEdge within a main lobe of ½ (where the transform of
	// real data is real and the power a χ²₁ variable).
	thrGen, thrEdge float64
	// clip is the power/floor ratio above which a bin is left out of the
	// floor fit: noise exceeds it about once in e² spectra.
	clip float64
}

// newSpectrum prepares the periodograms of sequences of length n and the
// thresholds of false-alarm probability alpha.
//
// The transform is zero-padded to a power of two of at least 2n (at least
// n beyond 2¹⁷ points, where the cost of the transform dominates: the
// least-squares fit refines a peak from either grid). The threshold
// counts M = 2n looks at the spectrum, two per natural bin, a conservative
// count of the independent chances a continuous search over frequency has
// (Scargle, ApJ 263, 835, 1982, for the effective number of frequencies).
// A noise ordinate divided by the floor is F(2, 2ν)-distributed when the
// floor is estimated with ν degrees of freedom, ν = (n/(2·ENBW))/K for a
// K-term fit to the independent ordinates; so P(ratio > T) = (1 + T/ν)^−ν,
// and T is solved from M_gen·P = α·M_gen/M. Within a main lobe of ½ the
// ordinate is χ²₁ and the ratio F(1, 2ν), the square of a Student t with
// 2ν degrees of freedom; its threshold takes the remaining share of α.
func newSpectrum(n int, alpha float64) *spectrum {
	nfft := 1
	target := 2 * n
	if n > 1<<17 {
		target = n
	}
	for nfft < target {
		nfft <<= 1
	}
	sp := &spectrum{n: n, nfft: nfft, fft: fourier.NewFFT(nfft), buf: make([]float64, nfft), coef: make([]complex128, nfft/2+1)}
	sp.window = make([]float64, n)
	for i := range n {
		// The Hann taper sin²(πi/(n−1)), zero at both ends, so that
		// its sidelobes fall as the cube of the distance.
		w := math.Sin(math.Pi * float64(i) / float64(n-1))
		sp.window[i] = w * w
		sp.wnorm += w * w * w * w
		sp.wsum += w * w
	}
	nu := float64(n) / (2 * hannENBW * floorTerms)
	mEdge := 2 * mainLobe
	mGen := math.Max(float64(n)-4*mainLobe, 1)
	m := mGen + mEdge
	sp.thrGen = nu * (math.Pow(m/alpha, 1/nu) - 1)
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: 2 * nu}
	target2 := alpha / m // per look, for each of the mEdge edge looks
	lo, hi := 0.0, 1e4
	for range 200 {
		mid := 0.5 * (lo + hi)
		if 2*t.Survival(math.Sqrt(mid)) > target2 {
			lo = mid
		} else {
			hi = mid
		}
	}
	sp.thrEdge = hi
	sp.clip = math.Log(m) + 2
	sp.cos1 = make([]float64, nfft/2+1)
	for k := range sp.cos1 {
		sp.cos1[k] = math.Cos(2 * math.Pi * sp.freq(k))
	}
	return sp
}

// freq returns the frequency of grid bin k.
func (sp *spectrum) freq(k int) float64 { return float64(k) / float64(sp.nfft) }

// periodogram returns |Σ w_n r_n e^{−2πikn/nfft}|² / Σ w_n² for k = 0 …
// nfft/2: for white noise of variance σ² each ordinate has mean σ².
func (sp *spectrum) periodogram(r []float64) []float64 {
	clear(sp.buf)
	for i, v := range r {
		sp.buf[i] = v * sp.window[i]
	}
	sp.coef = sp.fft.Coefficients(sp.coef, sp.buf)
	pow := make([]float64, len(sp.coef))
	for k, c := range sp.coef {
		pow[k] = (real(c)*real(c) + imag(c)*imag(c)) / sp.wnorm
	}
	return pow
}

// stillThere reports whether the periodogram of r at f, computed
// directly, still passes the threshold: a candidate of a look is checked
// again after the stronger ones are subtracted, since what looked like a
// peak may have been their leakage or their share of the straight line.
func (sp *spectrum) stillThere(r []float64, f float64, fl *noiseFloor) bool {
	w := 2 * math.Pi * f
	cw, sw := math.Cos(w), math.Sin(w)
	var re, im, c, s float64
	for i, v := range r {
		if i%anchor == 0 {
			s, c = math.Sincos(w * float64(i))
		} else {
			c, s = c*cw-s*sw, s*cw+c*sw
		}
		x := v * sp.window[i]
		re += x * c
		im -= x * s
	}
	thr := sp.thrGen
	if f > 0.5-mainLobe/float64(sp.n) {
		thr = sp.thrEdge
	}
	return (re*re+im*im)/sp.wnorm > thr*fl.at(f)
}

// significant reports whether a fitted sinusoid of amplitude amp at f
// would have passed the threshold at the floor: the periodogram of
// A·cos(2πfn + φ) peaks at A²(Σw)²/(4Σw²). A peak of the periodogram
// can be a line's or the taper's leakage; its fit tells them apart.
func (sp *spectrum) significant(f, amp float64, fl *noiseFloor) bool {
	thr := sp.thrGen
	if f > 0.5-mainLobe/float64(sp.n) {
		thr = sp.thrEdge
	}
	p := amp * amp * sp.wsum * sp.wsum / (4 * sp.wnorm)
	if f == 0.5 {
		p *= 4 // the alternation A·(−1)^n is all in one real coefficient
	}
	return p > thr*fl.at(f)
}

// noiseFloor is the fitted noise spectrum S(f) = Σ_j c_j cos 2πjf.
type noiseFloor struct {
	c   []float64
	min float64
	// rounding is the variance of the rounding of the spacings:
	// positions of up to n mean spacings held in float64 are rounded to
	// within half a unit in the last place u = n·2⁻⁵², so a spacing, the
	// difference of two, carries rounding noise of variance u²/6. No
	// line is measured under it.
	rounding float64
}

// at returns the floor at frequency f, at least the measurable minimum.
func (fl *noiseFloor) at(f float64) float64 {
	var s float64
	for j, c := range fl.c {
		s += c * math.Cos(2*math.Pi*float64(j)*f)
	}
	return math.Max(math.Max(s, fl.min), fl.rounding)
}

// atBin returns the floor at grid bin k of sp.
func (fl *noiseFloor) atBin(sp *spectrum, k int) float64 {
	return math.Max(math.Max(fl.c[0]+fl.c[1]*sp.cos1[k], fl.min), fl.rounding)
}

// noise returns the square root of the floor's mean over (0, ½]: the
// standard deviation of the noise.
func (fl *noiseFloor) noise() float64 { return math.Sqrt(math.Max(fl.c[0], 0)) }

// searchable reports whether grid bin k is searched for lines: above the
// taper's main lobe from 0 and away from every known line.
func (sp *spectrum) searchable(k int, lines []float64) bool {
	f := sp.freq(k)
	lobe := mainLobe / float64(sp.n)
	if f < lobe {
		return false
	}
	for _, l := range lines {
		if math.Abs(f-l) < lobe {
			return false
		}
	}
	return true
}

// fitFloor fits the floor to the periodogram ordinates of the searchable
// bins by iteratively reweighted least squares with weights 1/S(f)²:
// an ordinate of noise is S(f) times an exponential variable, so its
// standard deviation is S(f), and these weights give every bin the same
// relative accuracy (the Gaussian approximation of Whittle's likelihood),
// which keeps the floor right where the spectrum dips towards zero, as
// the spectrum of position noise does at low frequency. Each pass also
// leaves out the bins above clip times the previous fit, with their main
// lobes, so that a line left in the residual does not raise the floor it
// is judged against.
func (sp *spectrum) fitFloor(pow []float64, lines []float64) *noiseFloor {
	use := make([]bool, len(pow))
	for k := range pow {
		use[k] = sp.searchable(k, lines)
	}
	lobeBins := int(math.Ceil(mainLobe * float64(sp.nfft) / float64(sp.n)))
	u := float64(sp.n) * 0x1p-52
	fl := &noiseFloor{c: make([]float64, floorTerms), rounding: u * u / 6}
	const passes = 5
	for pass := range passes {
		var ata [floorTerms * floorTerms]float64
		var atb [floorTerms]float64
		var cnt int
		for k, p := range pow {
			if !use[k] {
				continue
			}
			cnt++
			w := 1.0
			if pass > 0 {
				v := fl.atBin(sp, k)
				w = 1 / (v * v)
			}
			row := [floorTerms]float64{1, sp.cos1[k]}
			for i := range row {
				atb[i] += w * row[i] * p
				for j := range row {
					ata[i*floorTerms+j] += w * row[i] * row[j]
				}
			}
		}
		if cnt < 2*floorTerms {
			break
		}
		var c mat.VecDense
		if err := c.SolveVec(mat.NewDense(floorTerms, floorTerms, ata[:]), mat.NewVecDense(floorTerms, atb[:])); err != nil {
			break
		}
		copy(fl.c, c.RawVector().Data)
		fl.min = math.Max(leakageFloor*fl.c[0], math.SmallestNonzeroFloat64)
		if pass == passes-1 {
			break
		}
		for k, p := range pow {
			if use[k] && p > sp.clip*fl.atBin(sp, k) {
				for j := max(k-lobeBins, 0); j <= min(k+lobeBins, len(pow)-1); j++ {
					use[j] = false
				}
			}
		}
	}
	if fl.c[0] <= 0 {
		fl.min = math.SmallestNonzeroFloat64
	}
	return fl
}

// candidates returns up to max new line frequencies from one look at the
// periodogram: significant local maxima, strongest first, each clear of
// the leakage of the stronger ones taken in the same look, refined by
// parabolic interpolation of the log power over three bins.
func (sp *spectrum) candidates(pow []float64, fl *noiseFloor, lines []float64, maxNew int) []float64 {
	type peak struct {
		k int
		p float64
	}
	var peaks []peak
	half := len(pow) - 1
	edge := 0.5 - mainLobe/float64(sp.n)
	for k := 1; k <= half; k++ {
		if !sp.searchable(k, lines) || pow[k] < pow[k-1] || (k < half && pow[k] <= pow[k+1]) {
			continue
		}
		thr := sp.thrGen
		if sp.freq(k) > edge {
			thr = sp.thrEdge
		}
		if pow[k] > thr*fl.atBin(sp, k) {
			peaks = append(peaks, peak{k, pow[k]})
		}
	}
	slices.SortFunc(peaks, func(a, b peak) int { return -cmp.Compare(a.p, b.p) })
	var out []float64
	var taken []peak
	for _, pk := range peaks {
		if len(out) == maxNew {
			break
		}
		f := sp.freq(pk.k)
		clear := true
		for _, s := range taken {
			fs := sp.freq(s.k)
			for _, img := range []float64{fs, -fs, 1 - fs} {
				d := math.Abs(f-img) * float64(sp.n)
				if d < mainLobe || pk.p < leakageMargin*s.p*hannLeak(d) {
					clear = false
				}
			}
		}
		if !clear {
			continue
		}
		taken = append(taken, pk)
		if pk.k < half {
			l, c, r := math.Log(pow[pk.k-1]), math.Log(pow[pk.k]), math.Log(pow[pk.k+1])
			if den := l - 2*c + r; den < 0 {
				f += 0.5 * (l - r) / den / float64(sp.nfft)
			}
		}
		out = append(out, math.Min(f, 0.5))
	}
	return out
}

// hannLeak bounds the power of the Hann taper's response d natural bins
// from its centre, relative to the centre: |W(d)/W(0)|² with W(d)/W(0) =
// sin(πd)/(πd(1 − d²)), bounded by 1/(π d |d² − 1|) for d ≥ 2.
func hannLeak(d float64) float64 {
	b := 1 / (math.Pi * d * math.Abs(d*d-1))
	return b * b
}
