package compare

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/lsq"
)

// UpdateOptions steer UpdateModel.
type UpdateOptions struct {
	// FreePitchInertia lets the least-squares update adjust the pitch
	// inertia as well as the rates; it needs a measured mode shape beyond
	// what the rates alone use.
	FreePitchInertia bool
	// Correlation relates the measured figures (one fit's modes, from
	// identify: body.Correlation); nil treats them as independent.
	Correlation *body.Correlation
}

// Method names of an Update.
const (
	MethodUndamped     = "closed form, undamped (natural frequencies)"
	MethodDamped       = "closed form, damped (poles)"
	MethodLeastSquares = "weighted least squares (Levenberg-Marquardt)"
)

// Update is the model updated to the measured modes.
type Update struct {
	Vehicle    Vehicle // design body with the updated rates (and pitch inertia when freed)
	Damped     bool    // damping was measured and updated
	Method     string
	RootChoice string
	ClosedForm Rates   // the chosen closed-form root
	OtherRoots []Rates // the closed-form roots not chosen
	// Sigma holds one standard deviation of each updated rate and damping;
	// SigmaPitchInertiaKgm2 that of the pitch inertia when freed. HasSigma is
	// false when the measured modes came without uncertainties (and no
	// least-squares update ran).
	Sigma                 Rates
	SigmaPitchInertiaKgm2 float64
	PitchInertiaFreed     bool
	HasSigma              bool
	NominalWeights        bool         // some sigma was missing; nominal ones were used
	Residual              *FitResidual // least squares only
}

// Nominal standard deviations the least-squares update uses for measured
// values given without one (indicative choices of ours for a body-mode test).
const (
	nominalSigmaFrequencyFraction = 0.01 // of the natural frequency
	nominalSigmaDampingRatio      = 0.02
	nominalSigmaPitchPerBounce    = 0.05 // rad/m
)

// fdStep is the finite-difference step for Jacobians in the scaled
// variables (Hz, damping ratio, log of a parameter).
const fdStep = 1e-6

// UpdateModel back-calculates the effective rates (and, with damping measured
// for both modes, the damping) that make design's body reproduce the two
// measured modes. The closed forms (BackCalcUndamped, BackCalcDamped) give the
// candidates and ChooseRoot picks one by the measured shapes. When more is
// measured than the unknowns need (a pitch per bounce besides the
// frequencies and damping), a weighted least-squares fit starts from that
// root, weights 1/sigma^2, by Levenberg-Marquardt (package identify/lsq)
// with central-difference Jacobians (gonum diff/fd); with
// opt.FreePitchInertia the pitch inertia is fitted too.
//
// Uncertainty: the measured values y_i have the covariance C_ij = rho_ij
// sigma_i sigma_j, rho from opt.Correlation (independent without it). For
// the closed form, sigma_p^2 = sum_ij (dp/dy_i) C_ij (dp/dy_j) over the
// frequencies and damping ratios, with the Jacobian by central differences
// (gonum diff/fd). The least squares whitens the residuals with the
// Cholesky factor of C (generalised least squares: A. C. Aitken, "On least
// squares and linear combination of observations", Proceedings of the Royal
// Society of Edinburgh 55:42-48, 1935), and the covariance of the
// parameters is (J^T J)^-1 with J the Jacobian of the whitened residuals at
// the minimum (first-order propagation; e.g. W. H. Press et al., Numerical
// Recipes, 3rd ed., Cambridge University Press, 2007, section 15.5). A C
// that does not factorise (correlations given inconsistently) falls back to
// independent values.
func UpdateModel(design Vehicle, measured []MeasuredMode, sensorsXM []float64, opt UpdateOptions) (*Update, error) {
	if len(measured) != 2 {
		return nil, fmt.Errorf("%w (got %d modes)", ErrModes, len(measured))
	}
	ms := []MeasuredMode{measured[0], measured[1]}
	sort.Slice(ms, func(i, j int) bool { return ms[i].NaturalFrequencyHz < ms[j].NaturalFrequencyHz })
	u := &Update{Damped: ms[0].HasDamping() && ms[1].HasDamping()}
	inputs, sigmas, names := closedFormInputs(ms, u.Damped)
	cands, err := closedForm(design, inputs, u.Damped)
	if err != nil {
		return nil, err
	}
	best, reason, err := ChooseRoot(design, cands, ms, sensorsXM, design.RatesOf())
	if err != nil {
		return nil, err
	}
	u.RootChoice, u.ClosedForm = reason, cands[best]
	for i, c := range cands {
		if i != best {
			u.OtherRoots = append(u.OtherRoots, c)
		}
	}
	u.Method, u.Vehicle = MethodUndamped, design.WithRates(u.ClosedForm)
	if u.Damped {
		u.Method = MethodDamped
	} else {
		u.Vehicle.FrontDampingNsPerM, u.Vehicle.RearDampingNsPerM = 0, 0
	}

	obs := observations(ms, u.Damped)
	nPar := 2
	if u.Damped {
		nPar = 4
	}
	if opt.FreePitchInertia {
		nPar++
	}
	if len(obs) <= nPar || !(ms[0].HasShape() || ms[1].HasShape()) {
		if opt.FreePitchInertia {
			return nil, fmt.Errorf("freeing the pitch inertia needs more measured values than "+
				"unknowns (%d values for %d unknowns); measure the pitch per bounce of both modes, "+
				"or keep the pitch inertia fixed", len(obs), nPar)
		}
		u.Sigma, u.HasSigma = closedFormSigma(design, inputs, covarianceOf(names, sigmas, opt.Correlation),
			u.ClosedForm, u.Damped)
		return u, nil
	}
	if err := u.leastSquares(obs, opt.FreePitchInertia, opt.Correlation); err != nil {
		return nil, err
	}
	u.Method = MethodLeastSquares
	return u, nil
}

// closedFormInputs returns (fn1, fn2[, zeta1, zeta2]) of modes sorted by
// frequency, their standard deviations and their names (body.FigureName).
func closedFormInputs(ms []MeasuredMode, damped bool) (y, sig []float64, names []string) {
	y = []float64{ms[0].NaturalFrequencyHz, ms[1].NaturalFrequencyHz}
	sig = []float64{ms[0].Sigma.NaturalFrequencyHz, ms[1].Sigma.NaturalFrequencyHz}
	names = []string{body.FigureName(ms[0].Label, body.FigureNaturalFrequency),
		body.FigureName(ms[1].Label, body.FigureNaturalFrequency)}
	if damped {
		y = append(y, ms[0].DampingRatio, ms[1].DampingRatio)
		sig = append(sig, ms[0].Sigma.DampingRatio, ms[1].Sigma.DampingRatio)
		names = append(names, body.FigureName(ms[0].Label, body.FigureDampingRatio),
			body.FigureName(ms[1].Label, body.FigureDampingRatio))
	}
	return y, sig, names
}

// covarianceOf returns C_ij = rho_ij sig_i sig_j of the values named names
// with standard deviations sig, rho from corr (nil: independent).
func covarianceOf(names []string, sig []float64, corr *body.Correlation) *mat.SymDense {
	c := mat.NewSymDense(len(names), nil)
	for i := range names {
		for j := i; j < len(names); j++ {
			c.SetSym(i, j, corr.Coefficient(names[i], names[j])*sig[i]*sig[j])
		}
	}
	return c
}

// closedForm returns the closed-form candidates for inputs (fn1, fn2[, zeta1, zeta2]).
func closedForm(body Vehicle, y []float64, damped bool) ([]Rates, error) {
	if damped {
		return BackCalcDamped(body, y[0], y[2], y[1], y[3])
	}
	r, err := BackCalcUndamped(body, y[0], y[1])
	if err != nil {
		return nil, err
	}
	return r[:], nil
}

// rateVector returns (kf, kr[, cf, cr]).
func rateVector(r Rates, damped bool) []float64 {
	if damped {
		return []float64{r.FrontRateNPerM, r.RearRateNPerM, r.FrontDampingNsPerM, r.RearDampingNsPerM}
	}
	return []float64{r.FrontRateNPerM, r.RearRateNPerM}
}

// closedFormSigma propagates the covariance cov of the closed-form inputs y
// to the chosen root (followed by continuity: the candidate nearest to it).
func closedFormSigma(car Vehicle, y []float64, cov *mat.SymDense, chosen Rates, damped bool) (Rates, bool) {
	given := false
	for i := range y {
		given = given || cov.At(i, i) > 0
	}
	if !given {
		return Rates{}, false
	}
	ref := rateVector(chosen, damped)
	n := len(ref)
	f := func(dst, x []float64) {
		cands, err := closedForm(car, x, damped)
		if err != nil {
			for i := range dst {
				dst[i] = math.NaN()
			}
			return
		}
		copy(dst, rateVector(cands[nearestRoot(cands, ref, damped)], damped))
	}
	jac := mat.NewDense(n, len(y), nil)
	fd.Jacobian(jac, f, y, &fd.JacobianSettings{Formula: fd.Central, Step: fdStep})
	out := make([]float64, n)
	for r := 0; r < n; r++ {
		g := mat.NewVecDense(len(y), mat.Row(nil, r, jac))
		out[r] = math.Sqrt(math.Max(mat.Inner(g, cov, g), 0))
	}
	s := Rates{FrontRateNPerM: out[0], RearRateNPerM: out[1]}
	if damped {
		s.FrontDampingNsPerM, s.RearDampingNsPerM = out[2], out[3]
	}
	return s, true
}

// observation is one measured value for the least squares: of the model mode
// of frequency rank mode, quantity kind.
type observation struct {
	name    string
	figure  string // body.FigureName
	mode    int
	kind    int // obsFrequency, obsDamping, obsPitchPerBounce
	value   float64
	sigma   float64
	nominal bool
}

const (
	obsFrequency = iota
	obsDamping
	obsPitchPerBounce
)

// observations lists the measured values of modes sorted by frequency.
func observations(ms []MeasuredMode, damped bool) []observation {
	var out []observation
	add := func(label, key string, mode, kind int, value, sigma, nominal float64) {
		o := observation{name: label + " " + key, figure: body.FigureName(label, key), mode: mode, kind: kind,
			value: value, sigma: sigma}
		if !(sigma > 0) {
			o.sigma, o.nominal = nominal, true
		}
		out = append(out, o)
	}
	for i, m := range ms {
		add(m.Label, body.FigureNaturalFrequency, i, obsFrequency, m.NaturalFrequencyHz, m.Sigma.NaturalFrequencyHz,
			nominalSigmaFrequencyFraction*m.NaturalFrequencyHz)
		if damped {
			add(m.Label, body.FigureDampingRatio, i, obsDamping, m.DampingRatio, m.Sigma.DampingRatio,
				nominalSigmaDampingRatio)
		}
		if !math.IsNaN(m.PitchPerBounceRadPerM) {
			add(m.Label, body.FigurePitchPerBounce, i, obsPitchPerBounce, m.PitchPerBounceRadPerM,
				m.Sigma.PitchPerBounceRadPerM, nominalSigmaPitchPerBounce)
		}
	}
	return out
}

// ErrNotIdentifiable is returned when the measured values do not fix every
// parameter of a least-squares update.
var ErrNotIdentifiable = errors.New("the measured values do not determine every updated parameter " +
	"(singular normal equations); keep the pitch inertia fixed or measure the mode shapes")

// leastSquares fits the rates (damping when measured, pitch inertia when
// freed) to obs, correlated by corr, from u.Vehicle, and fills u.
func (u *Update) leastSquares(obs []observation, freeJ bool, corr *body.Correlation) error {
	start := u.Vehicle
	// Parameters are logs of the values over their starting values; a
	// damper that starts at zero starts instead at a small fraction of the
	// critical damping of its axle, so that its log exists.
	scale := rateVector(start.RatesOf(), u.Damped)
	if u.Damped {
		for i, k := range []float64{start.FrontRateNPerM, start.RearRateNPerM} {
			const floorFraction = 1e-3
			scale[2+i] = math.Max(scale[2+i], floorFraction*2*math.Sqrt(k*start.MassKg/2))
		}
	}
	if freeJ {
		scale = append(scale, start.PitchInertiaKgm2)
	}
	vehicleAt := func(x []float64) Vehicle {
		v := start
		v.FrontRateNPerM, v.RearRateNPerM = scale[0]*math.Exp(x[0]), scale[1]*math.Exp(x[1])
		if u.Damped {
			v.FrontDampingNsPerM, v.RearDampingNsPerM = scale[2]*math.Exp(x[2]), scale[3]*math.Exp(x[3])
		}
		if freeJ {
			v.PitchInertiaKgm2 = scale[len(scale)-1] * math.Exp(x[len(x)-1])
		}
		return v
	}
	fitted := func(v Vehicle) ([]float64, error) {
		var ms []Mode
		var err error
		if u.Damped {
			ms, err = v.DampedModes()
		} else {
			ms, err = v.UndampedModes()
		}
		if err != nil {
			return nil, err
		}
		sort.Slice(ms, func(i, j int) bool { return ms[i].NaturalFrequencyHz < ms[j].NaturalFrequencyHz })
		out := make([]float64, len(obs))
		for i, o := range obs {
			switch o.kind {
			case obsFrequency:
				out[i] = ms[o.mode].NaturalFrequencyHz
			case obsDamping:
				out[i] = ms[o.mode].DampingRatio
			default:
				out[i] = ms[o.mode].PitchPerBounceRadPerM
			}
		}
		return out, nil
	}
	resid := func(dst, x []float64) {
		f, err := fitted(vehicleAt(x))
		for i, o := range obs {
			if err != nil {
				// Outside the oscillating region: a large, finite misfit
				// steers the line search back.
				const outside = 1e6
				dst[i] = outside
				continue
			}
			dst[i] = (f[i] - o.value) / o.sigma
		}
	}
	x := make([]float64, len(scale))
	lm, err := lsq.Minimize(lsq.Differenced(resid, fd.Central, fdStep), len(obs), x, lsq.Settings{})
	if err != nil {
		return fmt.Errorf("the least-squares update did not converge in %d iterations; "+
			"check the measured modes and their uncertainties", lsq.DefaultMaxIterations)
	}
	v := vehicleAt(x)
	f, err := fitted(v)
	if err != nil {
		return fmt.Errorf("the least-squares update ended outside the oscillating region: %w", err)
	}

	var jtj mat.SymDense
	jtj.SymOuterK(1, lm.J.T())
	var chol mat.Cholesky
	if !chol.Factorize(&jtj) {
		return ErrNotIdentifiable
	}
	var binv mat.SymDense
	if err := chol.InverseTo(&binv); err != nil {
		return ErrNotIdentifiable
	}
	// The sandwich B^-1 (J^T R J) B^-1, B = J^T J: the fit weights each
	// value by its own sigma alone; R carries the correlation into the
	// covariance of the estimate.
	var jr, meat, left, cov mat.Dense
	jr.Mul(lm.J.T(), correlationOf(obs, corr))
	meat.Mul(&jr, lm.J)
	left.Mul(&binv, &meat)
	cov.Mul(&left, &binv)
	par := rateVector(v.RatesOf(), u.Damped)
	if freeJ {
		par = append(par, v.PitchInertiaKgm2)
	}
	sig := make([]float64, len(par))
	for i := range par {
		sig[i] = par[i] * math.Sqrt(cov.At(i, i)) // d p = p d(log p)
	}
	u.Vehicle = v
	u.Sigma = Rates{FrontRateNPerM: sig[0], RearRateNPerM: sig[1]}
	if u.Damped {
		u.Sigma.FrontDampingNsPerM, u.Sigma.RearDampingNsPerM = sig[2], sig[3]
	}
	if freeJ {
		u.SigmaPitchInertiaKgm2, u.PitchInertiaFreed = sig[len(sig)-1], true
	}
	u.HasSigma = true
	fr := &FitResidual{DegreesOfFreedom: len(obs) - len(x)}
	for i, o := range obs {
		n := (f[i] - o.value) / o.sigma
		fr.ChiSquare += n * n
		fr.Observations = append(fr.Observations, Observation{Name: o.name, Measured: o.value, Fitted: f[i],
			Sigma: o.sigma, Normalised: n})
		u.NominalWeights = u.NominalWeights || o.nominal
	}
	u.Residual = fr
	return nil
}

// correlationOf returns the correlation matrix of the values obs (corr; a
// value with a nominal sigma correlates with nothing).
func correlationOf(obs []observation, corr *body.Correlation) *mat.SymDense {
	n := len(obs)
	r := mat.NewSymDense(n, nil)
	for i := range obs {
		for j := i; j < n; j++ {
			if i != j && (obs[i].nominal || obs[j].nominal) {
				continue
			}
			r.SetSym(i, j, corr.Coefficient(obs[i].figure, obs[j].figure))
		}
	}
	return r
}

// JSON returns the contract's form of the update.
func (u *Update) JSON() *Updated {
	r := u.Vehicle.RatesOf()
	out := &Updated{
		FrontRateNPerM: r.FrontRateNPerM, RearRateNPerM: r.RearRateNPerM,
		DampingEstimated: u.Damped, Method: u.Method, RootChoice: u.RootChoice,
		OtherRoots: []RatesJSON{}, Residual: u.Residual,
	}
	if u.Damped {
		out.FrontDampingNsPerM, out.RearDampingNsPerM = r.FrontDampingNsPerM, r.RearDampingNsPerM
	}
	for _, o := range u.OtherRoots {
		out.OtherRoots = append(out.OtherRoots, RatesJSON(o))
	}
	if u.Method == MethodLeastSquares {
		cf := RatesJSON(u.ClosedForm)
		out.ClosedForm = &cf
	}
	freedJ := u.PitchInertiaFreed
	if freedJ {
		out.PitchInertiaKgm2 = Finite(u.Vehicle.PitchInertiaKgm2)
	}
	if u.HasSigma {
		uu := &UpdatedUncertainty{FrontRateNPerM: u.Sigma.FrontRateNPerM, RearRateNPerM: u.Sigma.RearRateNPerM,
			NominalWeights: u.NominalWeights}
		if u.Damped {
			uu.FrontDampingNsPerM, uu.RearDampingNsPerM = Finite(u.Sigma.FrontDampingNsPerM), Finite(u.Sigma.RearDampingNsPerM)
		}
		if freedJ {
			uu.PitchInertiaKgm2 = Finite(u.SigmaPitchInertiaKgm2)
		}
		out.Uncertainty = uu
	}
	return out
}

// nearestRoot returns the index of the candidate whose rate vector lies
// nearest ref in relative terms.
func nearestRoot(cands []Rates, ref []float64, damped bool) int {
	best, bestD := 0, math.Inf(1)
	for i, c := range cands {
		d := 0.0
		for k, v := range rateVector(c, damped) {
			d += sq((v - ref[k]) / ref[k])
		}
		if d < bestD {
			best, bestD = i, d
		}
	}
	return best
}
