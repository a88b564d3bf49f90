package plate

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
)

// Defaults of KPMOptions.
const (
	DefaultMoments = 512
	DefaultVectors = 16
	// margin is the fraction of the rescaled interval [−1, 1] kept free at
	// each end, so that rounding in the bounds never puts an eigenvalue
	// outside it, where the Chebyshev expansion diverges.
	margin = 0.01
)

// KPMOptions control the kernel polynomial method.
type KPMOptions struct {
	// Moments is the number M of Chebyshev moments (0: DefaultMoments);
	// the energy resolution is about π·a/M, a the half-width of the
	// spectrum's bounds.
	Moments int
	// Vectors is the number R of random vectors of the stochastic trace
	// (0: DefaultVectors; at least 2, for the spread that gives the
	// statistical error).
	Vectors int
	// Seed seeds the random vectors; vector r draws from the stream
	// (Seed, r), so the result does not depend on Workers.
	Seed uint64
	// Workers bounds the goroutines, one vector each at a time; 0 means
	// runtime.GOMAXPROCS(0).
	Workers int
}

// Density is the density of states of an operator by the kernel
// polynomial method: the Chebyshev moments of each random vector, from
// which the density and the integrated density of states (IDS) follow at
// any energy, with the statistical error from the spread over vectors.
type Density struct {
	// Moments and Vectors are M and R.
	Moments, Vectors int
	// Center and HalfWidth map the energy E to x = (E − Center)/HalfWidth
	// in (−1, 1).
	Center, HalfWidth float64
	// Sites is the dimension N of the operator.
	Sites int
	mu    [][]float64 // mu[r][n]: moment n of vector r, kernel applied
	mean  []float64   // mean over vectors
}

// NewDensity computes the Chebyshev moments μ_n = ⟨r|T_n(H̃)|r⟩/N of the rescaled
// operator H̃ = (H − Center)/HalfWidth for R random-phase vectors r
// (|r_i| = 1), by the kernel polynomial method of Weiße, Wellein,
// Alvermann & Fehske, Rev. Mod. Phys. 78, 275 (2006): the recursion
// T_{n+1} = 2H̃T_n − T_{n−1} applied to r, two moments per product by
// μ_{2n} = 2⟨α_n|α_n⟩ − μ_0 and μ_{2n+1} = 2⟨α_{n+1}|α_n⟩ − μ_1
// (α_n = T_n(H̃)r), and the Jackson kernel g_n against Gibbs oscillations
// (their Sec. II.C). The bounds are Gershgorin's, with a margin of 1%.
// The vectors run in parallel; ctx is checked every 16 products.
func NewDensity(ctx context.Context, op *Operator, opt KPMOptions) (*Density, error) {
	M, R := opt.Moments, opt.Vectors
	if M == 0 {
		M = DefaultMoments
	}
	if R == 0 {
		R = DefaultVectors
	}
	if M < 4 || R < 2 {
		return nil, fmt.Errorf("plate: %d moments and %d vectors: need at least 4 moments and 2 vectors", M, R)
	}
	lo, hi := op.Bounds()
	d := &Density{Moments: M, Vectors: R, Center: (lo + hi) / 2, HalfWidth: max((hi-lo)/2, 1e-300) / (1 - margin), Sites: op.Len()}
	d.mu = make([][]float64, R)
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, R)
	// A real operator's entries are multiplied as reals: half the work.
	var re []float64
	if op.real {
		re = make([]float64, len(op.val))
		for k, v := range op.val {
			re[k] = real(v)
		}
	}
	next := make(chan int)
	var wg sync.WaitGroup
	var errOnce sync.Once
	var firstErr error
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			a := make([]complex128, op.Len())
			b := make([]complex128, op.Len())
			for r := range next {
				mu, err := d.vectorMoments(ctx, op, re, a, b, rand.New(rand.NewPCG(opt.Seed, uint64(r))))
				if err != nil {
					errOnce.Do(func() { firstErr = err })
					continue
				}
				d.mu[r] = mu
			}
		}()
	}
	for r := range R {
		if ctx.Err() != nil {
			break
		}
		next <- r
	}
	close(next)
	wg.Wait()
	if firstErr == nil && ctx.Err() != nil {
		firstErr = ctx.Err()
	}
	if firstErr != nil {
		return nil, fmt.Errorf("plate: kernel polynomial method stopped: %w", firstErr)
	}
	g := jackson(M)
	d.mean = make([]float64, M)
	for _, mu := range d.mu {
		for n := range mu {
			mu[n] *= g[n]
			d.mean[n] += mu[n] / float64(R)
		}
	}
	return d, nil
}

// vectorMoments returns the M moments of one random-phase vector, using
// a and b as work space.
func (d *Density) vectorMoments(ctx context.Context, op *Operator, re []float64, a, b []complex128, rng *rand.Rand) ([]float64, error) {
	M, N := d.Moments, float64(op.Len())
	for i := range a {
		s, c := math.Sincos(2 * math.Pi * rng.Float64())
		a[i] = complex(c, s)
	}
	// b = H̃a; then μ0 = 1, μ1 = ⟨a|b⟩/N, μ2 = 2⟨b|b⟩/N − μ0.
	inv := 1 / d.HalfWidth
	var d1, d2 float64
	for i, di := range op.diag {
		s := complex(di-d.Center, 0) * a[i]
		for k := op.ptr[i]; k < op.ptr[i+1]; k++ {
			s += op.val[k] * a[op.col[k]]
		}
		s *= complex(inv, 0)
		b[i] = s
		d1 += real(a[i])*real(s) + imag(a[i])*imag(s)
		d2 += real(s)*real(s) + imag(s)*imag(s)
	}
	mu := make([]float64, M)
	mu[0] = 1
	mu[1] = d1 / N
	if M > 2 {
		mu[2] = 2*d2/N - mu[0]
	}
	// old holds α_{k−1}, cur α_k; old is overwritten by α_{k+1}.
	old, cur := a, b
	for k := 1; 2*k+1 < M; k++ {
		if k%16 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		cross, norm := recurse(op, re, d.Center, 2*inv, old, cur)
		// Now old = α_{k+1}: μ_{2k+1} and μ_{2k+2}.
		mu[2*k+1] = 2*cross/N - mu[1]
		if 2*k+2 < M {
			mu[2*k+2] = 2*norm/N - mu[0]
		}
		old, cur = cur, old
	}
	return mu, nil
}

// recurse overwrites old with 2·H̃·cur − old, H̃ = (H − center)·two/2,
// and returns ⟨new|cur⟩ and ⟨new|new⟩ (real parts). re, when not nil,
// holds the real entries of a real operator.
func recurse(op *Operator, re []float64, center, two float64, old, cur []complex128) (cross, norm float64) {
	ptr, col, val := op.ptr, op.col, op.val
	for i, di := range op.diag {
		c := cur[i]
		sr, si := (di-center)*real(c), (di-center)*imag(c)
		if re != nil {
			for j := ptr[i]; j < ptr[i+1]; j++ {
				x := cur[col[j]]
				sr += re[j] * real(x)
				si += re[j] * imag(x)
			}
		} else {
			for j := ptr[i]; j < ptr[i+1]; j++ {
				v, x := val[j], cur[col[j]]
				sr += real(v)*real(x) - imag(v)*imag(x)
				si += real(v)*imag(x) + imag(v)*real(x)
			}
		}
		sr, si = two*sr-real(old[i]), two*si-imag(old[i])
		old[i] = complex(sr, si)
		cross += sr*real(c) + si*imag(c)
		norm += sr*sr + si*si
	}
	return cross, norm
}

// jackson returns the Jackson kernel's weights for M moments,
//
//	g_n = [(M − n + 1)·cos(πn/(M+1)) + sin(πn/(M+1))·cot(π/(M+1))]/(M + 1),
//
// Weiße et al., Rev. Mod. Phys. 78, 275 (2006), Eq. (71).
func jackson(M int) []float64 {
	g := make([]float64, M)
	q := math.Pi / float64(M+1)
	cot := math.Cos(q) / math.Sin(q)
	for n := range g {
		g[n] = (float64(M-n+1)*math.Cos(q*float64(n)) + math.Sin(q*float64(n))*cot) / float64(M+1)
	}
	return g
}

// Resolution returns the energy resolution: the Jackson kernel broadens a
// level into a near-Gaussian of width σ = π/M on the rescaled axis at its
// centre, narrower towards the ends (Weiße et al. 2006, Sec. II.C.3, from
// memory; the kernel's variance is checked in the tests), so π·HalfWidth/M
// in energy.
func (d *Density) Resolution() float64 { return math.Pi * d.HalfWidth / float64(d.Moments) }

// x returns the rescaled energy, clamped inside (−1, 1).
func (d *Density) x(e float64) float64 {
	return min(max((e-d.Center)/d.HalfWidth, -1+1e-15), 1-1e-15)
}

// DOS returns the density of states per site and per unit of energy at e
// (averaged over the vectors):
//
//	ρ(x) = [g_0μ_0 + 2Σ_n g_nμ_n T_n(x)] / (π·√(1 − x²)).
func (d *Density) DOS(e float64) float64 {
	x := d.x(e)
	t0, t1 := 1.0, x
	s := d.mean[0]
	for n := 1; n < len(d.mean); n++ {
		s += 2 * d.mean[n] * t1
		t0, t1 = t1, 2*x*t1-t0
	}
	return s / (math.Pi * math.Sqrt(1-x*x)) / d.HalfWidth
}

// IDS returns the integrated density of states at e, the fraction of the
// levels below e, averaged over the vectors, and its standard error from
// their spread (the sample standard deviation over √R):
//
//	N(x) = g_0μ_0·(1 − φ/π) − (2/π)·Σ_n g_nμ_n·sin(nφ)/n,  x = cos φ,
//
// the integral of the kernel-smoothed density from −1 to x.
func (d *Density) IDS(e float64) (ids, stderr float64) {
	phi := math.Acos(d.x(e))
	w := make([]float64, d.Moments)
	w[0] = 1 - phi/math.Pi
	for n := 1; n < d.Moments; n++ {
		w[n] = -2 / math.Pi * math.Sin(float64(n)*phi) / float64(n)
	}
	var sum, sum2 float64
	for _, mu := range d.mu {
		v := 0.0
		for n, m := range mu {
			v += w[n] * m
		}
		sum += v
		sum2 += v * v
	}
	R := float64(len(d.mu))
	ids = sum / R
	variance := max(0, (sum2-R*ids*ids)/(R-1))
	return ids, math.Sqrt(variance / R)
}
