package compare

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Rates are the effective axle rates and damping of the model: the part that a
// measurement updates (mass, inertia and geometry stay as designed).
// Units as in Vehicle: N/m and N s/m per axle.
type Rates struct {
	FrontRateNPerM     float64
	RearRateNPerM      float64
	FrontDampingNsPerM float64
	RearDampingNsPerM  float64
}

// RatesOf returns the rates and damping of v.
func (v Vehicle) RatesOf() Rates {
	return Rates{v.FrontRateNPerM, v.RearRateNPerM, v.FrontDampingNsPerM, v.RearDampingNsPerM}
}

// WithRates returns v with its rates and damping replaced by r.
func (v Vehicle) WithRates(r Rates) Vehicle {
	v.FrontRateNPerM, v.RearRateNPerM = r.FrontRateNPerM, r.RearRateNPerM
	v.FrontDampingNsPerM, v.RearDampingNsPerM = r.FrontDampingNsPerM, r.RearDampingNsPerM
	return v
}

// ErrNoFit is matched by errors.Is for every *NoFitError.
var ErrNoFit = errors.New("the measured modes cannot come from the model")

// NoFitError says that no rates of the model reproduce the measured modes
// with the setup's mass, pitch inertia and axle positions.
type NoFitError struct {
	// FrequencyRatio is the measured higher over lower natural frequency.
	FrequencyRatio float64
	// MinFrequencyRatio is the least ratio the body's mass, inertia and
	// geometry allow with any positive rates (undamped back-calculation; NaN
	// for the damped one, whose limit has no closed form).
	MinFrequencyRatio float64
	Damped            bool
}

func (e *NoFitError) Error() string {
	if !e.Damped {
		return fmt.Sprintf("the measured natural frequencies (ratio %.4f) lie closer together than "+
			"this body allows: with its mass, pitch inertia and axle positions any positive front and rear "+
			"rates give a ratio of at least %.4f; check the mass, pitch inertia and CG position in the setup, "+
			"and the identified frequencies", e.FrequencyRatio, e.MinFrequencyRatio)
	}
	return fmt.Sprintf("no positive front and rear rates with non-negative damping reproduce the "+
		"measured poles (natural frequency ratio %.4f) with this body's mass, pitch inertia and axle "+
		"positions; check those in the setup and the identified frequencies and damping ratios, or "+
		"back-calculate the rates alone by leaving the damping out", e.FrequencyRatio)
}

// Is makes errors.Is(err, ErrNoFit) true.
func (e *NoFitError) Is(target error) bool { return target == ErrNoFit }

// bodyCoefficients returns alpha = 1/m + a^2/J and beta = 1/m + b^2/J in 1/kg,
// and g = L^2/(m J) in 1/kg^2 (the factor of kf kr and cf cr in the
// characteristic polynomial).
func (v Vehicle) bodyCoefficients() (alpha, beta, g float64) {
	m, j, a, b := v.MassKg, v.PitchInertiaKgm2, v.CGToFrontM, v.CGToRearM
	L := v.WheelbaseM()
	return 1/m + a*a/j, 1/m + b*b/j, L * L / (m * j)
}

// checkBody validates the mass, inertia and geometry of body (its rates are
// not used).
func checkBody(body Vehicle) error {
	return body.WithRates(Rates{1, 1, 0, 0}).Validate()
}

// checkFrequencies checks two natural frequencies in Hz and returns them in
// rad/s, lower first.
func checkFrequencies(fn1Hz, fn2Hz float64) (w1, w2 float64, err error) {
	for _, f := range []float64{fn1Hz, fn2Hz} {
		if !(f > 0) || math.IsInf(f, 0) {
			return 0, 0, fmt.Errorf("a natural frequency of %g Hz cannot be used; "+
				"give two positive, finite natural frequencies", f)
		}
	}
	w1, w2 = 2*math.Pi*fn1Hz, 2*math.Pi*fn2Hz
	if w1 > w2 {
		w1, w2 = w2, w1
	}
	return w1, w2, nil
}

// BackCalcUndamped returns the two sets of front and rear rates (N/m) that
// give an undamped body the natural frequencies fn1Hz and fn2Hz (in either
// order), with the mass, pitch inertia and axle positions of body (its rates
// and damping are ignored). Both roots reproduce the frequencies; only one
// reproduces the mode shapes, so the caller chooses (ChooseRoot). The root
// with the larger rear rate comes first.
//
// The closed form: with w = 2 pi fn, alpha = 1/m + a^2/J, beta = 1/m + b^2/J,
//
//	kf kr = P = m J w1^2 w2^2 / L^2
//	alpha kf + beta kr = S = w1^2 + w2^2
//
// so beta kr^2 - S kr + alpha P = 0 and kf = P/kr. Both roots are positive
// when the discriminant S^2 - 4 alpha beta P is not negative; when it is, a
// *NoFitError gives the least frequency ratio the body allows.
//
// References: the two-degree-of-freedom bounce-pitch model as in S. S. Rao,
// Mechanical Vibrations (any edition, the automobile pitch-and-bounce
// example); the inversion is derived in the package's design notes.
func BackCalcUndamped(body Vehicle, fn1Hz, fn2Hz float64) ([2]Rates, error) {
	var out [2]Rates
	if err := checkBody(body); err != nil {
		return out, err
	}
	w1, w2, err := checkFrequencies(fn1Hz, fn2Hz)
	if err != nil {
		return out, err
	}
	alpha, beta, g := body.bodyCoefficients()
	P := w1 * w1 * w2 * w2 / g
	S := w1*w1 + w2*w2
	disc := S*S - 4*alpha*beta*P
	if disc < 0 {
		// (1 + r)^2 / r >= gamma with r = (w2/w1)^2, gamma = 4 alpha beta / g >= 4.
		gamma := 4 * alpha * beta / g
		rMin := ((gamma - 2) + math.Sqrt(math.Max(gamma*(gamma-4), 0))) / 2
		return out, &NoFitError{FrequencyRatio: w2 / w1, MinFrequencyRatio: math.Sqrt(rMin)}
	}
	// The larger root without cancellation, the smaller from the product of the roots.
	krHi := (S + math.Sqrt(disc)) / (2 * beta)
	krLo := alpha * P / (beta * krHi)
	for i, kr := range []float64{krHi, krLo} {
		out[i] = Rates{FrontRateNPerM: P / kr, RearRateNPerM: kr}
	}
	return out, nil
}

// BackCalcDamped returns every set of positive front and rear rates (N/m) and
// non-negative damping (N s/m) that gives the model the two measured poles,
// each given by its natural frequency |lambda|/(2 pi) in Hz and damping ratio
// -Re(lambda)/|lambda| (in either order), with the mass, pitch inertia and
// axle positions of body (its rates and damping are ignored). Solutions are
// sorted by rear rate, largest first; the caller chooses by the mode shapes
// (ChooseRoot). It returns a *NoFitError when no physical set exists.
//
// Derivation. Dividing det(lambda^2 M + lambda C + K) by m J and matching it
// with (lambda^2 + 2 z1 w1 lambda + w1^2)(lambda^2 + 2 z2 w2 lambda + w2^2)
// gives, with alpha, beta as in BackCalcUndamped and g = L^2/(m J):
//
//	g kf kr                         = w1^2 w2^2                      (1)
//	alpha cf + beta cr              = Q = 2 z1 w1 + 2 z2 w2           (2)
//	g (cf kr + cr kf)               = 2 z1 w1 w2^2 + 2 z2 w2 w1^2     (3)
//	alpha kf + beta kr + g cf cr    = w1^2 + w2^2 + 4 z1 z2 w1 w2     (4)
//
// Let P = w1^2 w2^2/g and R = (right side of (3))/g. (1) gives kr = P/kf;
// (2) and (3) are linear in cf, cr and give, with D = beta P - alpha kf^2,
//
//	cf = kf (beta R - Q kf) / D,   cr = (Q P - alpha R kf) / D.
//
// Put into (4) and multiplied by kf D^2, with x = kf/sqrt(P) and everything
// multiplied by m^3 to make it dimensionless, this is a polynomial of degree
// six in x:
//
//	(alpha x^2 - S x/p + beta)(beta - alpha x^2)^2 + (g/P) x^2 (beta R/p - Q x)(Q p - alpha R x) = 0
//
// with p = sqrt(P) and S the right side of (4). Its roots are the eigenvalues
// of the companion matrix (gonum mat.Eigen). Real positive roots with
// positive kr and non-negative cf, cr are kept, and each is confirmed by
// recomputing the model's poles with Vehicle.DampedModes (the factor D^2 can
// bring in roots that solve the polynomial but not (2)-(4)).
func BackCalcDamped(body Vehicle, fn1Hz, zeta1, fn2Hz, zeta2 float64) ([]Rates, error) {
	if err := checkBody(body); err != nil {
		return nil, err
	}
	for _, z := range []float64{zeta1, zeta2} {
		if !(z >= 0 && z < 1) {
			return nil, fmt.Errorf("a damping ratio of %g cannot be used; give damping ratios "+
				"from 0 up to (not including) 1, or back-calculate the rates alone", z)
		}
	}
	if fn1Hz > fn2Hz {
		fn1Hz, fn2Hz, zeta1, zeta2 = fn2Hz, fn1Hz, zeta2, zeta1
	}
	w1, w2, err := checkFrequencies(fn1Hz, fn2Hz)
	if err != nil {
		return nil, err
	}
	alpha, beta, g := body.bodyCoefficients()
	m := body.MassKg
	P := w1 * w1 * w2 * w2 / g
	p := math.Sqrt(P)
	Q := 2*zeta1*w1 + 2*zeta2*w2
	R := (2*zeta1*w1*w2*w2 + 2*zeta2*w2*w1*w1) / g
	S := w1*w1 + w2*w2 + 4*zeta1*zeta2*w1*w2

	// Dimensionless coefficients (times m^3), ascending powers of x.
	am, bm, sm := alpha*m, beta*m, S*m/p
	quad := []float64{bm, -sm, am}
	dd := []float64{bm, 0, -am}
	first := polyMul(quad, polyMul(dd, dd))
	gp := g * m * m * m / P
	second := polyMul([]float64{0, 0, gp}, polyMul([]float64{beta * R / p, -Q}, []float64{Q * p, -alpha * R}))
	roots, err := polyRoots(polyAdd(first, second))
	if err != nil {
		return nil, err
	}
	var sols []Rates
	for _, x := range roots {
		const imagTol = 1e-7 // relative imaginary part below which a root counts as real
		if real(x) <= 0 || math.Abs(imag(x)) > imagTol*cmplx.Abs(x) {
			continue
		}
		kf := p * real(x)
		D := beta*P - alpha*kf*kf
		r := Rates{FrontRateNPerM: kf, RearRateNPerM: P / kf,
			FrontDampingNsPerM: kf * (beta*R - Q*kf) / D, RearDampingNsPerM: (Q*P - alpha*R*kf) / D}
		// A root on the edge of the physical region (a damper of exactly
		// zero) comes out slightly negative by rounding.
		const edgeTol = 1e-9
		cScale := math.Max(math.Abs(r.FrontDampingNsPerM), math.Abs(r.RearDampingNsPerM))
		if r.FrontDampingNsPerM < -edgeTol*cScale || r.RearDampingNsPerM < -edgeTol*cScale {
			continue
		}
		r.FrontDampingNsPerM = math.Max(r.FrontDampingNsPerM, 0)
		r.RearDampingNsPerM = math.Max(r.RearDampingNsPerM, 0)
		if reproducesPoles(body.WithRates(r), fn1Hz, zeta1, fn2Hz, zeta2) && !hasRoot(sols, r) {
			sols = append(sols, r)
		}
	}
	if len(sols) == 0 {
		return nil, &NoFitError{FrequencyRatio: fn2Hz / fn1Hz, MinFrequencyRatio: math.NaN(), Damped: true}
	}
	sort.Slice(sols, func(i, j int) bool { return sols[i].RearRateNPerM > sols[j].RearRateNPerM })
	return sols, nil
}

// poleCheckTol is the relative agreement of natural frequencies, and the
// absolute agreement of damping ratios, that confirms a damped root.
const poleCheckTol = 1e-6

// reproducesPoles reports whether v has the two given poles.
func reproducesPoles(v Vehicle, fn1Hz, zeta1, fn2Hz, zeta2 float64) bool {
	ms, err := v.DampedModes()
	if err != nil {
		return false
	}
	want := [2][2]float64{{fn1Hz, zeta1}, {fn2Hz, zeta2}}
	for i, md := range ms {
		if math.Abs(md.NaturalFrequencyHz-want[i][0]) > poleCheckTol*want[i][0] ||
			math.Abs(md.DampingRatio-want[i][1]) > poleCheckTol {
			return false
		}
	}
	return true
}

// hasRoot reports whether sols already holds r (a repeated polynomial root).
func hasRoot(sols []Rates, r Rates) bool {
	const same = 1e-9
	for _, s := range sols {
		if math.Abs(s.FrontRateNPerM-r.FrontRateNPerM) <= same*r.FrontRateNPerM {
			return true
		}
	}
	return false
}

// polyMul returns the product of two polynomials with ascending coefficients.
func polyMul(p, q []float64) []float64 {
	out := make([]float64, len(p)+len(q)-1)
	for i, a := range p {
		for j, b := range q {
			out[i+j] += a * b
		}
	}
	return out
}

// polyAdd returns the sum of two polynomials with ascending coefficients.
func polyAdd(p, q []float64) []float64 {
	if len(p) < len(q) {
		p, q = q, p
	}
	out := append([]float64(nil), p...)
	for i, b := range q {
		out[i] += b
	}
	return out
}

// polyRoots returns the roots of the polynomial with ascending coefficients c
// as the eigenvalues of its companion matrix (gonum mat.Eigen, which balances
// the matrix first). Vanishing leading coefficients are dropped.
func polyRoots(c []float64) ([]complex128, error) {
	scale := 0.0
	for _, x := range c {
		scale = math.Max(scale, math.Abs(x))
	}
	n := len(c) - 1
	for n > 0 && math.Abs(c[n]) <= 1e-14*scale {
		n--
	}
	if n < 1 {
		return nil, nil
	}
	A := mat.NewDense(n, n, nil)
	for i := 1; i < n; i++ {
		A.Set(i, i-1, 1)
	}
	for i := 0; i < n; i++ {
		A.Set(i, n-1, -c[i]/c[n])
	}
	var eig mat.Eigen
	if !eig.Factorize(A, mat.EigenNone) {
		return nil, errors.New("the eigenvalue solver did not converge on the back-calculation polynomial")
	}
	return eig.Values(nil), nil
}
