package body

import (
	"math"
	"math/cmplx"
)

// MAC returns the modal assurance criterion of two complex shape vectors of
// the same length: |a^H b|^2 / ((a^H a)(b^H b)), from 0 (unrelated) to 1
// (the same shape up to scale and phase). It is NaN when a vector vanishes.
// Vectors of different lengths are a caller mistake and panic.
//
// References: R. J. Allemang and D. L. Brown, "A correlation coefficient for
// modal vector analysis", Proc. 1st International Modal Analysis Conference
// (IMAC), Orlando, 1982, pp. 110-116.
func MAC(a, b []complex128) float64 {
	if len(a) != len(b) {
		panic("body: MAC of shape vectors of different lengths")
	}
	var ab complex128
	var aa, bb float64
	for i := range a {
		ab += cmplx.Conj(a[i]) * b[i]
		aa += real(cmplx.Conj(a[i]) * a[i])
		bb += real(cmplx.Conj(b[i]) * b[i])
	}
	if aa == 0 || bb == 0 {
		return math.NaN()
	}
	n := cmplx.Abs(ab)
	return n * n / (aa * bb)
}
