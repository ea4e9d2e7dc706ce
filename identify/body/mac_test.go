package body

import (
	"math"
	"testing"
)

const macTol = 1e-12

func TestMACProperties(t *testing.T) {
	// Definition checks [published: Allemang & Brown, IMAC 1982]: 1 for the
	// same shape at any complex scale, 0 for orthogonal shapes, symmetric.
	a := []complex128{1, 2 - 1i, -0.5i}
	b := []complex128{(1 + 1i) * 1, (1 + 1i) * (2 - 1i), (1 + 1i) * (-0.5i)}
	if m := MAC(a, b); math.Abs(m-1) > macTol {
		t.Errorf("MAC of scaled shapes %g, want 1", m)
	}
	if m := MAC([]complex128{1, 0}, []complex128{0, 1}); m != 0 {
		t.Errorf("MAC of orthogonal shapes %g, want 0", m)
	}
	c := []complex128{1, 1, 1}
	if math.Abs(MAC(a, c)-MAC(c, a)) > macTol {
		t.Error("MAC not symmetric")
	}
	if !math.IsNaN(MAC([]complex128{0, 0}, []complex128{1, 1})) {
		t.Error("MAC of a zero shape should be NaN")
	}
}
