package lattice

import (
	"math"
	"testing"
)

// latticePatch returns the points origin + n1·a1 + n2·a2 for 0 ≤ n1 < m1,
// 0 ≤ n2 < m2, each displaced by u(n).
func latticePatch(b [2][2]float64, origin [2]float64, m1, m2 int, u func(n [2]int) [2]float64) [][2]float64 {
	var out [][2]float64
	for i := range m1 {
		for j := range m2 {
			x := [2]float64{
				origin[0] + float64(i)*b[0][0] + float64(j)*b[1][0],
				origin[1] + float64(i)*b[0][1] + float64(j)*b[1][1],
			}
			if u != nil {
				d := u([2]int{i, j})
				x[0] += d[0]
				x[1] += d[1]
			}
			out = append(out, x)
		}
	}
	return out
}

func combine(b [2][2]float64, m1, m2 float64) [2]float64 {
	return [2]float64{m1*b[0][0] + m2*b[1][0], m1*b[0][1] + m2*b[1][1]}
}

// The reciprocal basis satisfies b_i·a_j = δ_ij (its definition, in turns;
// common practice).
func TestReciprocalIsDual(t *testing.T) {
	for _, b := range [][2][2]float64{square, hex, oblique, rotated(oblique, 2.1)} {
		l := &Lattice{Basis: b}
		r := l.Reciprocal()
		for i := range 2 {
			for j := range 2 {
				want := 0.0
				if i == j {
					want = 1
				}
				if got := dot(r[i], b[j]); math.Abs(got-want) > 1e-12 {
					t.Errorf("basis %v: b%d·a%d = %v, want %v", b, i+1, j+1, got, want)
				}
			}
		}
	}
}

// A perfect lattice of N sites has its Bragg peaks at the reciprocal
// lattice vectors G with S(G) = N, whatever the offset of the patch
// (common practice). Halfway between peaks along b1, over an even number
// of rows, the sum Σ(−1)^n1 vanishes: S = 0.
func TestBraggPeaksOfPerfectLattice(t *testing.T) {
	b := rotated(oblique, 0.4)
	pts := latticePatch(b, [2]float64{3.7, -1.2}, 12, 15, nil)
	n := float64(len(pts))
	r := (&Lattice{Basis: b}).Reciprocal()
	var ks [][2]float64
	for m1 := -2; m1 <= 2; m1++ {
		for m2 := -2; m2 <= 2; m2++ {
			ks = append(ks, combine(r, float64(m1), float64(m2)))
		}
	}
	for i, s := range StructureFactor(pts, ks) {
		if math.Abs(s-n) > 1e-9*n {
			t.Errorf("S(G = %v) = %v, want N = %v", ks[i], s, n)
		}
	}
	half := StructureFactor(pts, [][2]float64{combine(r, 0.5, 0), combine(r, 1.5, 1)})
	for i, s := range half {
		if s > 1e-9 {
			t.Errorf("S halfway between peaks (%d) = %v, want 0", i, s)
		}
	}
}

// A displacement wave u_n = a·ê·sin 2π(q·n) puts satellites at G + m·q*
// (q* = q1·b1 + q2·b2) with S = N·J_m(2π a k·ê)², and the main peak at G
// with S = N·J_0(2π a G·ê)²: the Jacobi–Anger expansion
// e^{−iz sin θ} = Σ_m J_m(z) e^{−imθ} (common practice). With q a multiple
// of 1/40 on a 40 × 40 patch, every other order sums to zero over whole
// periods (aliasing reaches only J_{±39}, below 10⁻⁴⁰ here). The Bessel
// functions are computed independently by math.Jn.
func TestSatelliteWeightsOfADisplacementWave(t *testing.T) {
	const side = 40
	b := rotated(hex, 0.3)
	q := [2]float64{3.0 / side, 7.0 / side}
	pol := [2]float64{0.6, 0.8}
	const amp = 0.12
	pts := latticePatch(b, [2]float64{1, 2}, side, side, func(n [2]int) [2]float64 {
		s := amp * math.Sin(2*math.Pi*(q[0]*float64(n[0])+q[1]*float64(n[1])))
		return [2]float64{s * pol[0], s * pol[1]}
	})
	n := float64(len(pts))
	r := (&Lattice{Basis: b}).Reciprocal()
	qs := combine(r, q[0], q[1])
	for _, g := range [][2]int{{1, 0}, {0, 1}, {1, 1}, {2, -1}, {-1, 2}} {
		G := combine(r, float64(g[0]), float64(g[1]))
		for m := -2; m <= 2; m++ {
			k := [2]float64{G[0] + float64(m)*qs[0], G[1] + float64(m)*qs[1]}
			z := 2 * math.Pi * amp * dot(k, pol)
			want := n * math.Pow(math.Jn(m, z), 2)
			got := StructureFactor(pts, [][2]float64{k})[0]
			if math.Abs(got-want) > 1e-8*n {
				t.Errorf("G = %v, order %d: S = %.10g, want N·J_%d(%.4f)² = %.10g", g, m, got, m, z, want)
			}
		}
		// The first satellite relative to the main peak: J_1(z_k)²/J_0(z_G)²,
		// ≈ J_1(2π G·ê a)²/J_0(2π G·ê a)² for a long wave.
		s := StructureFactor(pts, [][2]float64{G, {G[0] + qs[0], G[1] + qs[1]}})
		zG := 2 * math.Pi * amp * dot(G, pol)
		zk := 2 * math.Pi * amp * dot([2]float64{G[0] + qs[0], G[1] + qs[1]}, pol)
		if want := math.Pow(math.J1(zk)/math.J0(zG), 2); math.Abs(s[1]/s[0]-want) > 1e-8 {
			t.Errorf("G = %v: satellite/peak = %v, want %v", g, s[1]/s[0], want)
		}
	}
}
