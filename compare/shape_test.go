package compare

import (
	"math"
	"math/cmplx"
	"testing"
)

// kinematicsTol is the agreement of a round trip through w(s) = z - s theta:
// rounding of sums over a few sensors.
const kinematicsTol = 1e-14

// TestKinematicsRoundTrip builds a shape from known (z, theta) with
// w(s) = z - s theta and recovers them, for two sensors (exact) and four
// (least squares of consistent values), and checks the node rule.
func TestKinematicsRoundTrip(t *testing.T) {
	z, theta := complex(0.8, -0.3), complex(0.25, 0.4)
	for _, pos := range [][]float64{{1.1, -1.4}, {1.3, 0.4, -0.2, -1.5}} {
		w := make([]complex128, len(pos))
		for k, s := range pos {
			w[k] = Mode{Shape: [2]complex128{z, theta}}.ShapeAt(s)
		}
		kin := NewKinematics(pos)
		gz, gt := kin.HeavePitch(w)
		if cmplx.Abs(gz-z) > kinematicsTol || cmplx.Abs(gt-theta) > kinematicsTol {
			t.Errorf("sensors %v: (z, theta) = (%v, %v), want (%v, %v)", pos, gz, gt, z, theta)
		}
		ppb := real(gt / gz)
		if n := kin.NodeM(ppb); math.Abs(n-1/ppb) > kinematicsTol*math.Abs(n) {
			t.Errorf("sensors %v: node %g, want %g", pos, n, 1/ppb)
		}
	}
	if n := NodeM(1e-12, 2.7); !math.IsNaN(n) {
		t.Errorf("node of a pitch of 1e-12 rad/m over 2.7 m: %g, want NaN (no node)", n)
	}
}

func TestBodyLabels(t *testing.T) {
	for _, c := range []struct {
		n0, n1 float64
		l0     string
	}{
		{-2.6, 0.3, "bounce"},
		{0.3, -2.6, "pitch"},
		{0.3, math.NaN(), "pitch"}, // no node: infinitely far
		{math.NaN(), -0.5, "bounce"},
	} {
		l0, l1 := BodyLabels(c.n0, c.n1)
		if l0 != c.l0 || l0 == l1 {
			t.Errorf("nodes %g, %g m: labels %s, %s; want %s first", c.n0, c.n1, l0, l1, c.l0)
		}
	}
}
