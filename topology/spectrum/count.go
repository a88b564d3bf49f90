package spectrum

import "math"

// Counting eigenvalues by Sylvester's law of inertia: for a symmetric A,
// the number of eigenvalues below e is the number of negative pivots of the
// LDLᵀ factorization of A − e·I. For a tridiagonal A the pivots obey the
// Sturm recurrence
//
//	q_0 = a_0 − e,   q_i = a_i − e − b_{i−1}² / q_{i−1},
//
// O(N) per energy and backward stable (Kahan, "Accurate eigenvalues of a
// symmetric tri-diagonal matrix", Stanford CS41, 1966; Barth, Martin &
// Wilkinson, Numer. Math. 9, 1967), with the usual safeguard that a pivot
// smaller than pivmin in magnitude is replaced by −pivmin (LAPACK's
// dstebz).

// batch is the number of energies counted together: independent
// recurrences interleaved in one loop keep the divider busy while each
// waits on its previous pivot. countOpen writes its lanes out by hand.
const batch = 4

// pivmin returns the pivot safeguard of the tridiagonal recurrence.
func pivmin(b2 []float64) float64 {
	m := 1.0
	for _, v := range b2 {
		m = max(m, v)
	}
	return m * 0x1p-1000
}

// countOpen counts, for each energy es[j], the eigenvalues of the open
// tridiagonal operator below it, into c[j]. The batch lanes are written
// out so that their pivots stay in registers.
func (op *Operator) countOpen(es []float64, c []int) {
	a, b2, piv := op.diag, op.near2, op.piv
	for j0 := 0; j0 < len(es); j0 += batch {
		m := min(batch, len(es)-j0)
		// Unused lanes repeat the first energy.
		e0, e1, e2, e3 := es[j0], es[j0+min(1, m-1)], es[j0+min(2, m-1)], es[j0+min(3, m-1)]
		q0, q1, q2, q3 := a[0]-e0, a[0]-e1, a[0]-e2, a[0]-e3
		var n0, n1, n2, n3 int
		guard := func(q float64, neg *int) float64 {
			if q > -piv && q < piv {
				q = -piv
			}
			if q < 0 {
				*neg++
			}
			return q
		}
		q0, q1, q2, q3 = guard(q0, &n0), guard(q1, &n1), guard(q2, &n2), guard(q3, &n3)
		for i := 1; i < len(a); i++ {
			ai, bb := a[i], b2[i-1]
			q0 = ai - e0 - bb/q0
			q1 = ai - e1 - bb/q1
			q2 = ai - e2 - bb/q2
			q3 = ai - e3 - bb/q3
			if q0 > -piv && q0 < piv {
				q0 = -piv
			}
			if q1 > -piv && q1 < piv {
				q1 = -piv
			}
			if q2 > -piv && q2 < piv {
				q2 = -piv
			}
			if q3 > -piv && q3 < piv {
				q3 = -piv
			}
			if q0 < 0 {
				n0++
			}
			if q1 < 0 {
				n1++
			}
			if q2 < 0 {
				n2++
			}
			if q3 < 0 {
				n3++
			}
		}
		neg := [batch]int{n0, n1, n2, n3}
		copy(c[j0:j0+m], neg[:m])
	}
}

// countRing counts, for each energy es[j], the eigenvalues below it of a
// periodic tridiagonal operator: a tridiagonal matrix with corner entries
// H[0][N−1] = H[N−1][0].
//
// With the last site as a border, A − e·I is a tridiagonal block T
// (sites 0..N−2) bordered by one row and column w (w_0 the corner, w_{N−2}
// the last bond). Eliminating T's pivots in order carries the border
// along: z_0 = w_0, z_{i+1} = w_{i+1} − b_i·z_i/q_i, and the border's own
// pivot is a_{N−1} − e − Σ_i z_i²/q_i. The N pivots q_0..q_{N−2} and that
// last one have the inertia of A − e·I (Sylvester). Since
// z_i = ±w_0·ψ_0/ψ_i for the solution ψ the pivots follow, z stays bounded
// inside the bands and decays in the gaps; but a pivot close to 0 (e
// almost an eigenvalue of a leading block) makes two consecutive terms of
// Σ z²/q huge and opposite, and their cancellation costs the border's
// pivot its accuracy. An energy that meets a pivot below 1e-6 of the
// operator's scale is therefore counted again by countRingPivoted, which
// eliminates such a pivot together with the next row as one 2×2 block.
func (op *Operator) countRing(es []float64, c []int) {
	for j0 := 0; j0 < len(es); j0 += batch {
		var e [batch]float64
		m := min(batch, len(es)-j0)
		for j := range batch {
			e[j] = es[j0+min(j, m-1)]
		}
		neg, ok := op.tryRing(e)
		for j := range m {
			if !ok[j] {
				neg[j] = op.countRingPivoted(e[j])
			}
			c[j0+j] = neg[j]
		}
	}
}

// ringTiny is the pivot, relative to the operator's scale, below which a
// ring count is redone with block pivots.
const ringTiny = 1e-6

// tryRing is the fast ring count on a batch of energies, with 1×1 pivots
// only; ok[j] is false when a pivot came below ringTiny.
func (op *Operator) tryRing(e [batch]float64) (neg [batch]int, ok [batch]bool) {
	a, b := op.diag, op.off[0]
	n := len(a)
	tiny := ringTiny * op.scale
	var q, z, last [batch]float64
	for j := range batch {
		q[j] = a[0] - e[j]
		z[j] = op.wrap[0][0] // w_0 = H[N−1][0]
		last[j] = a[n-1] - e[j]
		ok[j] = true
	}
	for i := 0; i < n-1; i++ {
		w := 0.0
		if i+1 == n-2 {
			w = b[n-2] // H[N−2][N−1]
		}
		for j := range batch {
			if math.Abs(q[j]) < tiny {
				ok[j] = false
				q[j] = -tiny // keep the lane finite; it is redone
			}
			if q[j] < 0 {
				neg[j]++
			}
			inv := 1 / q[j]
			zi := z[j]
			last[j] -= zi * zi * inv
			if i < n-2 {
				q[j] = a[i+1] - e[j] - b[i]*b[i]*inv
				z[j] = w - b[i]*zi*inv
			}
		}
	}
	for j := range batch {
		if last[j] < 0 {
			neg[j]++
		}
	}
	return neg, ok
}

// countRingPivoted is the ring count at one energy with a 2×2 block pivot
// wherever a 1×1 pivot would fall below ringTiny of the scale: rows i and
// i+1 of T, P = [[q_i, b_i], [b_i, a_{i+1} − e]], are eliminated together.
// With q_i ≈ 0, det P ≈ −b_i² keeps P well conditioned (one negative and
// one positive eigenvalue), the border takes −[z_i, w_{i+1}]·P⁻¹·[z_i,
// w_{i+1}]ᵀ and row i+2 takes −b_{i+1}²·(P⁻¹)₂₂ (Bunch & Kaufman, Math.
// Comp. 31, 1977, use such pivots for symmetric indefinite matrices).
func (op *Operator) countRingPivoted(e float64) int {
	a, b := op.diag, op.off[0]
	n := len(a)
	tiny := ringTiny * op.scale
	w := func(i int) float64 { // border entries of T's rows
		switch i {
		case 0:
			return op.wrap[0][0]
		case n - 2:
			return b[n-2]
		}
		return 0
	}
	neg := 0
	q, z, last := a[0]-e, w(0), a[n-1]-e
	i := 0
	for i <= n-2 {
		if math.Abs(q) >= tiny || i == n-2 || math.Abs(b[i]) < tiny {
			if i == n-2 && math.Abs(q) < tiny {
				// The last row of T and the border form the final
				// 2×2 block [[q, z], [z, last]].
				return neg + inertia2(q, z, last)
			}
			if q == 0 {
				q = -tiny
			}
			if q < 0 {
				neg++
			}
			last -= z * z / q
			if i < n-2 {
				z, q = w(i+1)-b[i]*z/q, a[i+1]-e-b[i]*b[i]/q
			}
			i++
			continue
		}
		// A 2×2 block of rows i and i+1 (i+1 ≤ n−2).
		r, bi, w1 := a[i+1]-e, b[i], w(i+1)
		det := q*r - bi*bi
		neg += inertia2(q, bi, r)
		last -= (r*z*z - 2*bi*z*w1 + q*w1*w1) / det
		if i+2 <= n-2 {
			// P⁻¹ = [[r, −b], [−b, q]]/det; row i+2 couples to row
			// i+1 only, by b_{i+1}, so it takes the second row of P⁻¹.
			bn := b[i+1]
			z = w(i+2) - bn*(-bi*z+q*w1)/det
			q = a[i+2] - e - bn*bn*q/det
		}
		i += 2
	}
	if last < 0 {
		neg++
	}
	return neg
}

// inertia2 returns the number of negative eigenvalues of the symmetric
// 2×2 matrix [[p, s], [s, r]].
func inertia2(p, s, r float64) int {
	det, tr := p*r-s*s, p+r
	switch {
	case det < 0:
		return 1 // eigenvalues of opposite signs
	case det > 0 && tr < 0:
		return 2
	case det == 0 && tr < 0:
		return 1 // one zero eigenvalue, counted as not below
	}
	return 0
}

// countMany fills c[j] with the number of eigenvalues below es[j] of a
// nearest-neighbour operator.
func (op *Operator) countMany(es []float64, c []int) {
	if op.wrap == nil {
		op.countOpen(es, c)
		return
	}
	op.countRing(es, c)
}
