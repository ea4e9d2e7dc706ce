package spectral

import (
	"fmt"
	"math"
)

// hermitian holds the input spectral matrix Gxx at one frequency, Hermitian
// positive semi-definite, of one or two inputs (a rig's front and rear
// pans), and its inverse in closed form. For two inputs,
// G = [[a, b], [conj(b), d]] with a, d real: det = a d - |b|^2, the
// eigenvalues are (a+d)/2 +- sqrt(((a-d)/2)^2 + |b|^2) (the smaller taken
// as det over the larger, which does not cancel), and
// G^-1 = [[d, -b], [-conj(b), a]] / det [textbook linear algebra].
type hermitian struct {
	q       int
	a, d    float64
	b       complex128
	det     float64
	inverse [2][2]complex128
}

func newHermitian(q int) *hermitian {
	if q < 1 || q > 2 {
		panic(fmt.Sprintf("spectral: %d inputs; the FRF estimators take one or two", q))
	}
	return &hermitian{q: q}
}

// load sets the matrix to g[idx[i]][idx[k]].
func (h *hermitian) load(g [][]complex128, idx []int) {
	h.a = real(g[idx[0]][idx[0]])
	if h.q == 2 {
		h.b = g[idx[0]][idx[1]]
		h.d = real(g[idx[1]][idx[1]])
		h.det = h.a*h.d - (real(h.b)*real(h.b) + imag(h.b)*imag(h.b))
	}
}

// positive reports whether the matrix is positive definite.
func (h *hermitian) positive() bool {
	return h.a > 0 && (h.q == 1 || h.det > 0)
}

// condition returns the 2-norm condition number lambda_max/lambda_min; +Inf
// when the matrix is singular or not positive definite.
func (h *hermitian) condition() float64 {
	if !h.positive() {
		return math.Inf(1)
	}
	if h.q == 1 {
		return 1
	}
	half := (h.a - h.d) / 2
	hi := (h.a+h.d)/2 + math.Sqrt(half*half+real(h.b)*real(h.b)+imag(h.b)*imag(h.b))
	return hi * hi / h.det
}

// invert computes the inverse for invAt; it reports false when the matrix
// is not positive definite.
func (h *hermitian) invert() bool {
	if !h.positive() {
		return false
	}
	if h.q == 1 {
		h.inverse[0][0] = complex(1/h.a, 0)
		return true
	}
	s := 1 / h.det
	h.inverse = [2][2]complex128{
		{complex(h.d*s, 0), -h.b * complex(s, 0)},
		{complex(-real(h.b)*s, imag(h.b)*s), complex(h.a*s, 0)},
	}
	return true
}

// invAt returns element (i, k) of the inverse after a successful invert.
func (h *hermitian) invAt(i, k int) complex128 { return h.inverse[i][k] }
