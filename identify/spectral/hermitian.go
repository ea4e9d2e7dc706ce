package spectral

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// hermitian factors small Hermitian positive semi-definite matrices (the
// input spectral matrix Gxx at one frequency) through their real embedding
// [[Re, -Im], [Im, Re]], a symmetric matrix of twice the size with the same
// eigenvalues, each twice, so gonum's real EigenSym and Cholesky serve.
// Buffers are reused from one frequency to the next.
type hermitian struct {
	q     int
	emb   *mat.SymDense
	eig   mat.EigenSym
	chol  mat.Cholesky
	inv   *mat.SymDense
	evals []float64
}

func newHermitian(q int) *hermitian {
	return &hermitian{
		q:     q,
		emb:   mat.NewSymDense(2*q, nil),
		inv:   mat.NewSymDense(2*q, nil),
		evals: make([]float64, 2*q),
	}
}

// load sets the matrix to g[idx[i]][idx[k]].
func (h *hermitian) load(g [][]complex128, idx []int) {
	q := h.q
	for i := 0; i < q; i++ {
		for k := i; k < q; k++ {
			v := g[idx[i]][idx[k]]
			h.emb.SetSym(i, k, real(v))
			h.emb.SetSym(q+i, q+k, real(v))
			h.emb.SetSym(q+i, k, imag(v))
			h.emb.SetSym(i, q+k, -imag(v))
		}
	}
}

// condition returns the 2-norm condition number lambda_max/lambda_min; +Inf
// when the matrix is singular or not positive definite.
func (h *hermitian) condition() float64 {
	if !h.eig.Factorize(h.emb, false) {
		return math.Inf(1)
	}
	h.eig.Values(h.evals)
	lo, hi := h.evals[0], h.evals[len(h.evals)-1]
	if !(lo > 0) {
		return math.Inf(1)
	}
	return hi / lo
}

// invert factors the matrix for invAt; it reports false when the matrix is
// not positive definite.
func (h *hermitian) invert() bool {
	return h.chol.Factorize(h.emb) && h.chol.InverseTo(h.inv) == nil
}

// invAt returns element (i, k) of the inverse after a successful invert.
func (h *hermitian) invAt(i, k int) complex128 {
	return complex(h.inv.At(i, k), h.inv.At(h.q+i, k))
}
