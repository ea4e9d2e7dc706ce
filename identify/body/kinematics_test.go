package body

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
			w[k] = z - complex(s, 0)*theta
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
