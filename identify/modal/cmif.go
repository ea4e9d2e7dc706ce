package modal

import (
	"gonum.org/v1/gonum/mat"
)

// CMIF is the complex mode indicator function of an FRFSet: at each
// frequency the singular values of the FRF matrix (outputs x inputs), in
// decreasing order. A mode shows as a peak of one of the curves; two close
// modes as peaks of the first and second curve.
//
// Reference: Shih, Tsuei, Allemang & Brown, MSSP 2(4), 1988 (see the
// package documentation).
type CMIF struct {
	FreqHz []float64
	// Singular[j][k] is the j-th largest singular value at bin k
	// (dimensionless); NaN where the bin is not usable.
	Singular [][]float64
}

// Indicator returns the CMIF of set over all its bins.
func Indicator(set *FRFSet) CMIF {
	set.check()
	no, ni, nf := set.outputs(), set.inputs(), len(set.FreqHz)
	nsv := min(no, ni)
	c := CMIF{FreqHz: append([]float64(nil), set.FreqHz...), Singular: make([][]float64, nsv)}
	for j := range c.Singular {
		c.Singular[j] = make([]float64, nf)
	}
	m := make([][]complex128, no)
	for o := range m {
		m[o] = make([]complex128, ni)
	}
	var sv []float64
	for k := range nf {
		if !set.usable(k) {
			for j := range c.Singular {
				c.Singular[j][k] = nan()
			}
			continue
		}
		for o := range no {
			for i := range ni {
				m[o][i] = set.H[o][i][k]
			}
		}
		sv, _ = complexSVD(m, sv, false)
		for j := range c.Singular {
			c.Singular[j][k] = sv[j]
		}
	}
	return c
}

// complexSVD returns the singular values (decreasing) of the complex matrix
// a (rows x cols) and, when left is true, the dominant left singular vector.
// It works on the real embedding [[Re a, -Im a], [Im a, Re a]], whose
// singular values are those of a, each twice, with gonum's mat.SVD: gonum
// has no complex SVD. The dominant left singular vector (u1, u2) of the
// embedding gives u = u1 + i u2, defined up to a complex unit factor.
func complexSVD(a [][]complex128, dst []float64, left bool) ([]float64, []complex128) {
	r, c := len(a), len(a[0])
	e := mat.NewDense(2*r, 2*c, nil)
	for i := range r {
		for j := range c {
			re, im := real(a[i][j]), imag(a[i][j])
			e.Set(i, j, re)
			e.Set(i, c+j, -im)
			e.Set(r+i, j, im)
			e.Set(r+i, c+j, re)
		}
	}
	var svd mat.SVD
	kind := mat.SVDNone
	if left {
		kind = mat.SVDThinU
	}
	if !svd.Factorize(e, kind) {
		// The embedding of finite numbers always factorises; a failure means
		// non-finite input, which usable() excludes.
		panic("modal: SVD did not converge")
	}
	all := svd.Values(nil)
	n := min(r, c)
	dst = dst[:0]
	for j := range n {
		dst = append(dst, all[2*j])
	}
	if !left {
		return dst, nil
	}
	var u mat.Dense
	svd.UTo(&u)
	vec := make([]complex128, r)
	for i := range r {
		vec[i] = complex(u.At(i, 0), u.At(r+i, 0))
	}
	return dst, vec
}
