package body

import (
	"fmt"
	"math"
)

// Kinematics turns a mode shape measured at body sensors into heave and
// pitch by the rigid-body relation of the package documentation,
// w(s_k) = z - s_k theta, in least squares over the sensors (exact for two).
// The normal equations [[n, -S1], [-S1, S2]] (z, theta) = (sum w, -sum s w),
// S1 = sum s_k, S2 = sum s_k^2, are real and solved in closed form, so
//
//	z     = sum_k ZWeights[k] w_k,     ZWeights[k]     = (S2 - S1 s_k)/D,
//	theta = sum_k ThetaWeights[k] w_k, ThetaWeights[k] = (S1 - n s_k)/D,
//
// with D = n S2 - S1^2, for the real and imaginary parts alike.
type Kinematics struct {
	ZWeights     []float64 // per sensor, 1 (z per unit w)
	ThetaWeights []float64 // per sensor, rad per m of w
	// ReachM is the largest |s_k| in m: the length over which NodeM judges a
	// pitch negligible.
	ReachM float64
}

// NewKinematics returns the Kinematics of sensors at positions sM (m from the
// CG, positive forward). Fewer than two distinct, finite positions are a
// caller mistake and panic.
func NewKinematics(sM []float64) Kinematics {
	n, s1, s2, det := spread(sM)
	if !(det > 0) || math.IsInf(det, 0) {
		panic(fmt.Sprintf("body: sensors at %v m cannot separate heave from pitch; "+
			"they must sit at two or more distinct, finite positions", sM))
	}
	var reach float64
	for _, s := range sM {
		reach = math.Max(reach, math.Abs(s))
	}
	k := Kinematics{ZWeights: make([]float64, len(sM)), ThetaWeights: make([]float64, len(sM)), ReachM: reach}
	for i, s := range sM {
		k.ZWeights[i] = (s2 - s1*s) / det
		k.ThetaWeights[i] = (s1 - n*s) / det
	}
	return k
}

// CanSeparate reports whether sensors at positions sM (m) can separate heave
// from pitch, which NewKinematics needs: two or more distinct, finite
// positions, within the range where the normal equations do not overflow.
func CanSeparate(sM []float64) bool {
	_, _, _, det := spread(sM)
	return det > 0 && !math.IsInf(det, 0)
}

// spread returns the count n, S1 = sum s_k and S2 = sum s_k^2 of the
// positions, and the determinant D = n S2 - S1^2 of the normal equations.
func spread(sM []float64) (n, s1, s2, det float64) {
	for _, s := range sM {
		n++
		s1 += s
		s2 += s * s
	}
	return n, s1, s2, n*s2 - s1*s1
}

// HeavePitch returns the heave z (m) and pitch theta (rad, positive
// nose-down) of the shape w (m at each sensor, in the order of the
// positions). A w of another length is a caller mistake and panics.
func (k Kinematics) HeavePitch(w []complex128) (z, theta complex128) {
	if len(w) != len(k.ZWeights) {
		panic(fmt.Sprintf("body: a shape of %d values for %d sensors", len(w), len(k.ZWeights)))
	}
	for i, v := range w {
		z += complex(k.ZWeights[i], 0) * v
		theta += complex(k.ThetaWeights[i], 0) * v
	}
	return z, theta
}

// NodeM returns the node 1/ppb of the pitch per bounce ppb = Re(theta/z)
// (rad/m): NodeM(ppb, k.ReachM).
func (k Kinematics) NodeM(ppb float64) float64 { return NodeM(ppb, k.ReachM) }

// negligiblePitchRad is the pitch (rad per m of bounce, times the length
// judged over) below which a mode has no node on any sensible scale.
const negligiblePitchRad = 1e-9

// NodeM returns the node of a mode, the position s (m from the CG) where
// w(s) = z - s theta vanishes: 1/ppb for the pitch per bounce ppb =
// Re(theta/z) in rad/m, or NaN when the pitch over the length lengthM (the
// wheelbase, or the sensors' reach) is negligible, |ppb| lengthM < 1e-9 rad:
// a pure bounce, without a node.
func NodeM(ppb, lengthM float64) float64 {
	if !(math.Abs(ppb)*lengthM >= negligiblePitchRad) {
		return math.NaN()
	}
	return 1 / ppb
}
