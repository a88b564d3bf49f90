package plate

import (
	"fmt"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// DenseLimit is the largest operator whose every eigenvalue Eigenvalues
// computes: a real operator is one n×n symmetric problem, a complex one
// the 2n×2n real embedding, eight times the work.
const DenseLimit = 4000

// Eigenvalues returns every eigenvalue, ascending, for at most DenseLimit
// sites, by gonum's dense symmetric eigensolver (mat.EigenSym). A complex
// Hermitian H = A + iB goes through the real symmetric embedding
//
//	[ A  −B ]
//	[ B   A ],
//
// whose spectrum is H's with every eigenvalue twice (H and its complex
// conjugate have the same eigenvalues; common practice): every second
// one of its sorted eigenvalues is kept.
func (op *Operator) Eigenvalues() ([]float64, error) {
	n := op.Len()
	if n > DenseLimit {
		return nil, fmt.Errorf("plate: %d sites: every eigenvalue is computed for at most %d; use the kernel polynomial method", n, DenseLimit)
	}
	dim := n
	if !op.real {
		dim = 2 * n
	}
	a := mat.NewSymDense(dim, nil)
	for i := range n {
		a.SetSym(i, i, op.diag[i])
		if !op.real {
			a.SetSym(n+i, n+i, op.diag[i])
		}
		for k := op.ptr[i]; k < op.ptr[i+1]; k++ {
			j := int(op.col[k])
			if j < i {
				continue
			}
			v := op.val[k] // H[i][j]
			a.SetSym(i, j, a.At(i, j)+real(v))
			if !op.real {
				a.SetSym(n+i, n+j, a.At(n+i, n+j)+real(v))
				// Lower-left block B: B[i][j] = imag H[i][j], B[j][i] = −B[i][j].
				a.SetSym(n+i, j, a.At(n+i, j)+imag(v))
				a.SetSym(n+j, i, a.At(n+j, i)-imag(v))
			}
		}
	}
	var e mat.EigenSym
	if !e.Factorize(a, false) {
		return nil, fmt.Errorf("plate: the dense eigensolver did not converge on %d sites", n)
	}
	v := e.Values(nil)
	slices.Sort(v)
	if op.real {
		return v, nil
	}
	out := make([]float64, n)
	for k := range out {
		out[k] = (v[2*k] + v[2*k+1]) / 2
	}
	return out, nil
}
