package compare

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/body"
)

// Vehicle is the design model of the sprung body: a rigid body of mass m and
// pitch inertia J on a front and a rear axle spring and damper. See the package
// documentation for axes and signs.
type Vehicle struct {
	MassKg             float64 // sprung mass m
	PitchInertiaKgm2   float64 // pitch inertia J about the CG
	CGToFrontM         float64 // a: CG to front axle, positive
	CGToRearM          float64 // b: CG to rear axle, positive
	FrontRateNPerM     float64 // kf: effective ride rate of the front axle
	RearRateNPerM      float64 // kr
	FrontDampingNsPerM float64 // cf: effective damping of the front axle (0: undamped)
	RearDampingNsPerM  float64 // cr
}

// ErrOverdamped is returned when a mode of the model has no oscillating pole
// pair (a damping ratio of one or more).
var ErrOverdamped = errors.New("the design model has an overdamped mode (damping ratio 1 or more), which no car body has: " +
	"the damping is far too high for the rates and the mass; check front_damping_ns_per_m and rear_damping_ns_per_m in [vehicle]")

// WheelbaseM returns L = a + b.
func (v Vehicle) WheelbaseM() float64 { return v.CGToFrontM + v.CGToRearM }

// Validate reports the first physically impossible parameter.
func (v Vehicle) Validate() error {
	pos := []struct {
		name string
		val  float64
	}{
		{"mass", v.MassKg}, {"pitch inertia", v.PitchInertiaKgm2},
		{"CG to front axle", v.CGToFrontM}, {"CG to rear axle", v.CGToRearM},
		{"front rate", v.FrontRateNPerM}, {"rear rate", v.RearRateNPerM},
	}
	for _, p := range pos {
		if !(p.val > 0) || math.IsInf(p.val, 0) {
			return fmt.Errorf("%s must be positive and finite, got %g", p.name, p.val)
		}
	}
	for _, p := range []struct {
		name string
		val  float64
	}{{"front damping", v.FrontDampingNsPerM}, {"rear damping", v.RearDampingNsPerM}} {
		if !(p.val >= 0) || math.IsInf(p.val, 0) {
			return fmt.Errorf("%s must be zero or positive and finite, got %g", p.name, p.val)
		}
	}
	return nil
}

// axleMatrix returns the 2x2 body matrix [[f + r, -a f + b r], [-a f + b r, a^2 f + b^2 r]]
// of a front and rear axle coefficient (rates or damping).
func (v Vehicle) axleMatrix(f, r float64) [2][2]float64 {
	a, b := v.CGToFrontM, v.CGToRearM
	c := -a*f + b*r
	return [2][2]float64{{f + r, c}, {c, a*a*f + b*b*r}}
}

// inputMatrix returns [[f, r], [-a f, b r]], the map from pan motion (front,
// rear) to generalised forces (heave, pitch) for a front and rear coefficient.
func (v Vehicle) inputMatrix(f, r float64) [2][2]float64 {
	return [2][2]float64{{f, r}, {-v.CGToFrontM * f, v.CGToRearM * r}}
}

// Stiffness returns K in N/m, N and N m/rad for q = (z, theta).
func (v Vehicle) Stiffness() [2][2]float64 { return v.axleMatrix(v.FrontRateNPerM, v.RearRateNPerM) }

// Damping returns C, of the same form as K, in damping units.
func (v Vehicle) Damping() [2][2]float64 {
	return v.axleMatrix(v.FrontDampingNsPerM, v.RearDampingNsPerM)
}

// Mode is one body mode of the design model (a measured mode is a
// body.Mode of package identify/body).
type Mode struct {
	Label string // "bounce" or "pitch"
	// Pole is the eigenvalue lambda in rad/s (purely imaginary when undamped).
	Pole               complex128
	NaturalFrequencyHz float64 // |lambda|/(2 pi)
	DampedFrequencyHz  float64 // Im(lambda)/(2 pi)
	DampingRatio       float64 // -Re(lambda)/|lambda|
	// Shape is (z, theta) in (m, rad), scaled so that z = 1 where z is not
	// negligible; otherwise scaled so that theta = 1.
	Shape [2]complex128
	// PitchPerBounceRadPerM is Re(theta/z); NaN for a pure pitch shape.
	PitchPerBounceRadPerM float64
	// NodeM is the position s where w(s) vanishes, 1/Re(theta/z); NaN when
	// theta is negligible (pure bounce, no node).
	NodeM float64
}

// ShapeAt returns the complex vertical motion w(s) = z - s theta of the mode
// shape at position s.
func (m Mode) ShapeAt(sM float64) complex128 {
	return m.Shape[0] - complex(sM, 0)*m.Shape[1]
}

// newMode fills a Mode from a pole and an unscaled shape (z, theta); lref is a
// length (the wheelbase) that decides when z or theta is negligible.
func newMode(pole complex128, z, theta complex128, lref float64) Mode {
	m := Mode{Pole: pole}
	w := cmplx.Abs(pole)
	m.NaturalFrequencyHz = w / (2 * math.Pi)
	m.DampedFrequencyHz = imag(pole) / (2 * math.Pi)
	if w > 0 {
		m.DampingRatio = -real(pole)/w + 0 // + 0 turns -0 into 0
	}
	const negligible = 1e-12
	switch {
	case cmplx.Abs(z) > negligible*cmplx.Abs(theta)*lref:
		r := theta / z
		m.Shape = [2]complex128{1, r}
		m.PitchPerBounceRadPerM = real(r)
		m.NodeM = body.NodeM(real(r), lref)
	default:
		m.Shape = [2]complex128{z / theta, 1}
		m.PitchPerBounceRadPerM = math.NaN()
		m.NodeM = real(z / theta)
	}
	return m
}

// labelModes sorts the two modes by natural frequency and labels them (body.BodyLabels).
func labelModes(ms []Mode) {
	sort.Slice(ms, func(i, j int) bool { return ms[i].NaturalFrequencyHz < ms[j].NaturalFrequencyHz })
	ms[0].Label, ms[1].Label = body.BodyLabels(ms[0].NodeM, ms[1].NodeM)
}

// UndampedModes returns the two modes of the undamped model (damping
// ignored), from the closed form of the generalised eigenproblem
// K phi = omega^2 M phi:
//
//	omega^2 = T/2 -+ sqrt(T^2/4 - D),
//	T = (kf + kr)/m + (a^2 kf + b^2 kr)/J,  D = kf kr L^2/(m J).
//
// Modes are sorted by frequency.
func (v Vehicle) UndampedModes() ([]Mode, error) {
	if err := v.Validate(); err != nil {
		return nil, err
	}
	K := v.Stiffness()
	m, j := v.MassKg, v.PitchInertiaKgm2
	L := v.WheelbaseM()
	T := K[0][0]/m + K[1][1]/j
	D := v.FrontRateNPerM * v.RearRateNPerM * L * L / (m * j)
	disc := math.Max(T*T/4-D, 0) // non-negative for a symmetric positive pair; clamp rounding
	w2 := [2]float64{T/2 - math.Sqrt(disc), T/2 + math.Sqrt(disc)}
	ms := make([]Mode, 2)
	for i, om2 := range w2 {
		A := [2][2]float64{{K[0][0] - om2*m, K[0][1]}, {K[1][0], K[1][1] - om2*j}}
		z, th := nullVector(A, i, m, j)
		ms[i] = newMode(complex(0, math.Sqrt(om2)), complex(z, 0), complex(th, 0), L)
	}
	labelModes(ms)
	return ms, nil
}

// nullVector returns a vector (z, theta) in the null space of the singular
// 2x2 matrix A, from its larger row. When A vanishes (a repeated eigenvalue)
// any shape is a mode; the M-orthogonal pair (1, 0) and (0, 1) is returned by
// index i.
func nullVector(A [2][2]float64, i int, m, j float64) (float64, float64) {
	n0 := math.Hypot(A[0][0], A[0][1])
	n1 := math.Hypot(A[1][0], A[1][1])
	scale := math.Max(m, j)
	const tiny = 1e-12
	switch {
	case n0 >= n1 && n0 > tiny*scale:
		return -A[0][1], A[0][0]
	case n1 > tiny*scale:
		return -A[1][1], A[1][0]
	case i == 0:
		return 1, 0
	default:
		return 0, 1
	}
}

// stateMatrix returns the 4x4 first-order system matrix for x = (z, theta, z', theta'):
// [[0, I], [-M^-1 K, -M^-1 C]].
func (v Vehicle) stateMatrix() *mat.Dense {
	K, C := v.Stiffness(), v.Damping()
	minv := [2]float64{1 / v.MassKg, 1 / v.PitchInertiaKgm2}
	A := mat.NewDense(4, 4, nil)
	A.Set(0, 2, 1)
	A.Set(1, 3, 1)
	for r := 0; r < 2; r++ {
		for c := 0; c < 2; c++ {
			A.Set(2+r, c, -minv[r]*K[r][c])
			A.Set(2+r, 2+c, -minv[r]*C[r][c])
		}
	}
	return A
}

// DampedModes returns the two modes of the damped model from the eigenvalues
// and right eigenvectors of the first-order state matrix (gonum's mat.Eigen),
// one pole of each complex-conjugate pair (Im lambda > 0). Modes are sorted by
// natural frequency. It returns ErrOverdamped when a mode does not oscillate.
func (v Vehicle) DampedModes() ([]Mode, error) {
	if err := v.Validate(); err != nil {
		return nil, err
	}
	var eig mat.Eigen
	if ok := eig.Factorize(v.stateMatrix(), mat.EigenRight); !ok {
		return nil, errors.New("the eigenvalue solver did not converge")
	}
	vals := eig.Values(nil)
	var vecs mat.CDense
	eig.VectorsTo(&vecs)
	ms := make([]Mode, 0, 2)
	for i, lam := range vals {
		if imag(lam) <= 0 {
			continue
		}
		ms = append(ms, newMode(lam, vecs.At(0, i), vecs.At(1, i), v.WheelbaseM()))
	}
	if len(ms) != 2 {
		return nil, ErrOverdamped
	}
	labelModes(ms)
	return ms, nil
}

// Damped reports whether the model has any damping.
func (v Vehicle) Damped() bool { return v.FrontDampingNsPerM != 0 || v.RearDampingNsPerM != 0 }

// Modes returns DampedModes when the model has damping and UndampedModes
// otherwise.
func (v Vehicle) Modes() ([]Mode, error) {
	if !v.Damped() {
		return v.UndampedModes()
	}
	return v.DampedModes()
}

// BaseResponse returns the complex amplitudes Q of (z, theta) per unit pan
// motion at angular frequency omega (rad/s): column 0 for the front pan,
// column 1 for the rear. Q = (K - omega^2 M + i omega C)^-1 (Kin + i omega Cin).
// Because the map is linear, the same ratio holds for displacement, velocity
// and acceleration amplitudes.
func (v Vehicle) BaseResponse(omega float64) [2][2]complex128 {
	K, C := v.Stiffness(), v.Damping()
	Kin := v.inputMatrix(v.FrontRateNPerM, v.RearRateNPerM)
	Cin := v.inputMatrix(v.FrontDampingNsPerM, v.RearDampingNsPerM)
	Mv := [2]float64{v.MassKg, v.PitchInertiaKgm2}
	var D, R [2][2]complex128
	for r := 0; r < 2; r++ {
		for c := 0; c < 2; c++ {
			D[r][c] = complex(K[r][c], omega*C[r][c])
			R[r][c] = complex(Kin[r][c], omega*Cin[r][c])
		}
		D[r][r] -= complex(omega*omega*Mv[r], 0)
	}
	det := D[0][0]*D[1][1] - D[0][1]*D[1][0]
	inv := [2][2]complex128{{D[1][1] / det, -D[0][1] / det}, {-D[1][0] / det, D[0][0] / det}}
	var Q [2][2]complex128
	for r := 0; r < 2; r++ {
		for c := 0; c < 2; c++ {
			Q[r][c] = inv[r][0]*R[0][c] + inv[r][1]*R[1][c]
		}
	}
	return Q
}

// Transmissibility returns the complex ratio of the body's vertical motion at
// position sM to the front and to the rear pan motion at freqHz (acceleration
// over acceleration, equal to displacement over displacement).
func (v Vehicle) Transmissibility(freqHz, sM float64) (front, rear complex128) {
	Q := v.BaseResponse(2 * math.Pi * freqHz)
	s := complex(sM, 0)
	return Q[0][0] - s*Q[1][0], Q[0][1] - s*Q[1][1]
}

// StaticResponse returns (z, theta) of the body at rest when the pans are held
// at fixed heights (uf, ur) in m: K^-1 Kin u.
func (v Vehicle) StaticResponse(ufM, urM float64) (zM, thetaRad float64) {
	Q := v.BaseResponse(0)
	return real(Q[0][0])*ufM + real(Q[0][1])*urM, real(Q[1][0])*ufM + real(Q[1][1])*urM
}
