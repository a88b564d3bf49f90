package spectrum

import "math"

// pentaToTridiagonal reduces the open operator with next-nearest bonds (a
// symmetric band matrix of half-bandwidth 2) to a symmetric tridiagonal
// matrix with the same eigenvalues, by Givens rotations that chase the
// fill-in down the band (Schwarz, "Tridiagonalization of a symmetric band
// matrix", Numer. Math. 12, 1968): O(N²) work instead of the O(N³) of a
// dense reduction. It returns the diagonal d and the sub-diagonal e.
//
// Column j is cleaned by a rotation of rows and columns j+1, j+2 that
// zeroes A[j+2][j]; it creates one entry three places off the diagonal,
// A[j+4][j+1], which a rotation of j+3, j+4 removes, creating A[j+6][j+3],
// and so on down the matrix. The band is stored with room for that one
// extra diagonal.
func pentaToTridiagonal(op *Operator) (d, e []float64) {
	n := op.Len()
	const w = 4 // diagonals 0..3: the band and the chased fill-in
	a := make([]float64, n*w)
	// at returns the stored entry A[i][j], |i−j| ≤ 3.
	at := func(i, j int) *float64 {
		if i < j {
			i, j = j, i
		}
		return &a[i*w+i-j]
	}
	for i := range n {
		*at(i, i) = op.diag[i]
		for k := 1; k <= 2; k++ {
			if i+k < n {
				*at(i+k, i) = op.off[k-1][i]
			}
		}
	}
	// rotate applies the similarity rotation of rows and columns r, r+1
	// that zeroes A[r+1][t] against A[r][t].
	rotate := func(r, t int) {
		x, y := *at(r, t), *at(r+1, t)
		if y == 0 {
			return
		}
		h := math.Hypot(x, y)
		c, s := x/h, y/h
		for k := max(0, r-3); k <= min(n-1, r+4); k++ {
			if k == r || k == r+1 {
				continue
			}
			var u, v float64
			if abs(r-k) <= 3 {
				u = *at(r, k)
			}
			if abs(r+1-k) <= 3 {
				v = *at(r+1, k)
			}
			nu, nv := c*u+s*v, -s*u+c*v
			// Entries the band cannot hold are zero in exact
			// arithmetic by the order of the rotations.
			if abs(r-k) <= 3 {
				*at(r, k) = nu
			}
			if abs(r+1-k) <= 3 {
				*at(r+1, k) = nv
			}
		}
		p, q, m := *at(r, r), *at(r+1, r), *at(r+1, r+1)
		*at(r, r) = c*c*p + 2*c*s*q + s*s*m
		*at(r+1, r+1) = s*s*p - 2*c*s*q + c*c*m
		*at(r+1, r) = c*s*(m-p) + (c*c-s*s)*q
		*at(r+1, t) = 0
	}
	for j := 0; j+2 < n; j++ {
		rotate(j+1, j)
		// Chase the fill-in A[t+3][t] down: rows t+2, t+3 against t.
		for t := j + 1; t+3 < n; t += 2 {
			if *at(t+3, t) == 0 {
				break
			}
			rotate(t+2, t)
			*at(t+3, t) = 0
		}
	}
	d, e = make([]float64, n), make([]float64, n-1)
	for i := range n {
		d[i] = *at(i, i)
		if i+1 < n {
			e[i] = *at(i+1, i)
		}
	}
	return d, e
}
