package compare

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"github.com/ridemodes/ridemodes/identify/body"
)

// Monte Carlo check of the propagated uncertainty: perturb the measured
// values by their sigmas (independent Gaussians, seeded), back-calculate,
// and compare the spread of the results with the propagated sigma.
const (
	mcSamples = 3000
	// mcSigmaTol is the allowed relative difference of the sample standard
	// deviation from the propagated one: the sampling error of a standard
	// deviation from 3000 draws is about 1/sqrt(2 x 3000) = 1.3 %, and the
	// first-order propagation ignores curvature of a few percent at these
	// sigmas; 8 % covers both.
	mcSigmaTol = 0.08
)

// mcSpread returns the sample standard deviations of the back-calculated
// (kf, kr, cf, cr) chosen nearest to truth.
func mcSpread(t *testing.T, body Vehicle, ms []MeasuredMode, damped bool, truth Rates, seed uint64) []float64 {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 3))
	n := 2
	if damped {
		n = 4
	}
	cols := make([][]float64, n)
	sorted := ms
	if sorted[0].NaturalFrequencyHz > sorted[1].NaturalFrequencyHz {
		sorted = []MeasuredMode{ms[1], ms[0]}
	}
	for s := 0; s < mcSamples; s++ {
		y, sig, _ := closedFormInputs(sorted, damped)
		for i := range y {
			y[i] += sig[i] * rng.NormFloat64()
		}
		cands, err := closedForm(body, y, damped)
		if err != nil {
			t.Fatalf("sample %d: %v", s, err)
		}
		best := nearestRoot(cands, rateVector(truth, damped), damped)
		for k, v := range rateVector(cands[best], damped) {
			cols[k] = append(cols[k], v)
		}
	}
	out := make([]float64, n)
	for k := range cols {
		out[k] = stat.StdDev(cols[k], nil)
	}
	return out
}

func TestUncertaintyMonteCarlo(t *testing.T) {
	for _, c := range []struct {
		name   string
		v      Vehicle
		damped bool
	}{
		{"undamped Rao", raoBody.WithRates(Rates{FrontRateNPerM: raoFrontNPerM, RearRateNPerM: raoRearNPerM}), false},
		{"damped notes case", dampedCase, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			ms, err := c.v.Modes()
			if err != nil {
				t.Fatal(err)
			}
			meas := measuredFrom(ms, false, c.damped)
			for i := range meas {
				// Modal sigmas of a plausible test (our choice): 1 % of fn, 0.01 in zeta.
				meas[i].Sigma = ModeSigma{NaturalFrequencyHz: 0.01 * meas[i].NaturalFrequencyHz, DampingRatio: 0.01}
			}
			// No shapes: the closed form alone, its root chosen as the one
			// nearest the design (here the truth).
			u, err := UpdateModel(c.v, meas, nil, UpdateOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if !u.HasSigma || u.Method == MethodLeastSquares {
				t.Fatalf("want a closed form with sigmas, got %+v", u)
			}
			want := rateVector(u.Sigma, c.damped)
			got := mcSpread(t, c.v, meas, c.damped, c.v.RatesOf(), 11)
			for k := range got {
				if rel(got[k], want[k]) > mcSigmaTol {
					t.Errorf("value %d: Monte Carlo sigma %.2f, propagated %.2f", k, got[k], want[k])
				}
			}
			t.Logf("propagated %v, Monte Carlo %v", want, got)
		})
	}
}

// lsqTol is the agreement of a least-squares update with the truth when the
// measured values are exact (the fit stops at a relative cost change of
// 1e-12, and the finite-difference Jacobian limits it further).
const lsqTol = 1e-5

func TestLeastSquaresRecoversTruth(t *testing.T) {
	for _, damped := range []bool{false, true} {
		v := dampedCase
		if !damped {
			v.FrontDampingNsPerM, v.RearDampingNsPerM = 0, 0
		}
		ms, err := v.Modes()
		if err != nil {
			t.Fatal(err)
		}
		meas := measuredFrom(ms, true, damped)
		for i := range meas {
			meas[i].Sigma = ModeSigma{NaturalFrequencyHz: 0.01, DampingRatio: 0.01, PitchPerBounceRadPerM: 0.03}
		}
		// The pitch inertia freed, from a design whose inertia is 12 % off.
		design := v
		design.PitchInertiaKgm2 *= 1.12
		u, err := UpdateModel(design, meas, []float64{1.1, -1.4}, UpdateOptions{FreePitchInertia: true})
		if err != nil {
			t.Fatal(err)
		}
		if u.Method != MethodLeastSquares || !u.PitchInertiaFreed {
			t.Fatalf("method %q, freed %v", u.Method, u.PitchInertiaFreed)
		}
		checkRates(t, u.Vehicle.RatesOf(), v.RatesOf(), lsqTol)
		if rel(u.Vehicle.PitchInertiaKgm2, v.PitchInertiaKgm2) > lsqTol {
			t.Errorf("J = %.3f, want %.3f", u.Vehicle.PitchInertiaKgm2, v.PitchInertiaKgm2)
		}
		const chiTiny = 1e-8
		if u.Residual.ChiSquare > chiTiny {
			t.Errorf("chi-square %g for exact data", u.Residual.ChiSquare)
		}
		j := u.JSON()
		if j.PitchInertiaKgm2 == nil || j.Uncertainty == nil || j.Uncertainty.PitchInertiaKgm2 == nil || j.ClosedForm == nil {
			t.Errorf("JSON lacks the freed inertia, its sigma or the closed form: %+v", j)
		}
		t.Logf("damped %v: J %.2f (sigma %.2f), sigmas %+v, dof %d", damped, u.Vehicle.PitchInertiaKgm2,
			u.SigmaPitchInertiaKgm2, u.Sigma, u.Residual.DegreesOfFreedom)
	}
}

func TestLeastSquaresMonteCarlo(t *testing.T) {
	// The least-squares sigma against the spread of updates from perturbed
	// measurements (undamped rates from frequencies and pitch per bounce).
	v := dampedCase
	v.FrontDampingNsPerM, v.RearDampingNsPerM = 0, 0
	ms, _ := v.Modes()
	meas := measuredFrom(ms, true, false)
	for i := range meas {
		meas[i].Sigma = ModeSigma{NaturalFrequencyHz: 0.01, PitchPerBounceRadPerM: 0.05}
	}
	u, err := UpdateModel(v, meas, nil, UpdateOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(21, 4))
	var kf, kr []float64
	for s := 0; s < mcSamples; s++ {
		p := append([]MeasuredMode(nil), meas...)
		for i := range p {
			p[i].NaturalFrequencyHz += p[i].Sigma.NaturalFrequencyHz * rng.NormFloat64()
			p[i].PitchPerBounceRadPerM += p[i].Sigma.PitchPerBounceRadPerM * rng.NormFloat64()
		}
		up, err := UpdateModel(v, p, nil, UpdateOptions{})
		if err != nil {
			t.Fatal(err)
		}
		kf = append(kf, up.Vehicle.FrontRateNPerM)
		kr = append(kr, up.Vehicle.RearRateNPerM)
	}
	got := []float64{stat.StdDev(kf, nil), stat.StdDev(kr, nil)}
	want := []float64{u.Sigma.FrontRateNPerM, u.Sigma.RearRateNPerM}
	for k := range got {
		if rel(got[k], want[k]) > mcSigmaTol {
			t.Errorf("rate %d: Monte Carlo sigma %.1f, reported %.1f", k, got[k], want[k])
		}
	}
	t.Logf("least squares: reported %v, Monte Carlo %v", want, got)
}

// TestCorrelatedMonteCarlo: measured values correlated as a drop fit's are
// (the pitch per bounce of one mode with the frequency and damping of the
// other; coefficients of our choice, in the range identify/decay measures
// on simulated drops). Perturbed by correlated Gaussians (seeded), the
// updates spread as the sigmas propagated with the correlation say, for
// the closed form (no shapes) and the least squares (with shapes). For the
// least squares, the drop route's case, the sigmas propagated as if
// independent miss the spread of at least one value by more than
// corrSigmaTol (by 16 % when measured; by up to 9 % for the closed form,
// whose inputs correlate less here).
func TestCorrelatedMonteCarlo(t *testing.T) {
	const samples = 1000
	ms, err := dampedCase.DampedModes()
	if err != nil {
		t.Fatal(err)
	}
	b, p := ms[0].Label, ms[1].Label
	name := func(label, key string) string { return body.FigureName(label, key) }
	figs := []string{name(b, body.FigureNaturalFrequency), name(b, body.FigureDampingRatio),
		name(b, body.FigurePitchPerBounce), name(p, body.FigureNaturalFrequency), name(p, body.FigureDampingRatio),
		name(p, body.FigurePitchPerBounce)}
	rho := [][]float64{
		{1, 0.2, 0, 0.6, 0, 0},
		{0.2, 1, 0, 0, 0.6, 0.4},
		{0, 0, 1, 0.4, -0.4, 0},
		{0.6, 0, 0.4, 1, 0, 0},
		{0, 0.6, -0.4, 0, 1, 0},
		{0, 0.4, 0, 0, 0, 1},
	}
	corr := &body.Correlation{Figures: figs, Matrix: rho}
	var chol mat.Cholesky
	sym := mat.NewSymDense(len(figs), nil)
	for i := range rho {
		for j := i; j < len(rho); j++ {
			sym.SetSym(i, j, rho[i][j])
		}
	}
	if !chol.Factorize(sym) {
		t.Fatal("the test's correlation matrix is not positive definite")
	}
	var l mat.TriDense
	chol.LTo(&l)
	for _, shapes := range []bool{false, true} {
		meas := measuredFrom(ms, shapes, true)
		for i := range meas {
			meas[i].Sigma = ModeSigma{NaturalFrequencyHz: 0.01 * meas[i].NaturalFrequencyHz, DampingRatio: 0.01,
				PitchPerBounceRadPerM: 0.05}
		}
		sensors := []float64{1.1, -1.4}
		with, err := UpdateModel(dampedCase, meas, sensors, UpdateOptions{Correlation: corr})
		if err != nil {
			t.Fatal(err)
		}
		without, err := UpdateModel(dampedCase, meas, sensors, UpdateOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if (with.Method == MethodLeastSquares) != shapes {
			t.Fatalf("shapes %v: method %q", shapes, with.Method)
		}
		rng := rand.New(rand.NewPCG(31, 5))
		cols := make([][]float64, 4)
		for range samples {
			z := mat.NewVecDense(len(figs), nil)
			for i := range len(figs) {
				z.SetVec(i, rng.NormFloat64())
			}
			var x mat.VecDense
			x.MulVec(&l, z) // correlated unit normals in the order of figs
			pm := append([]MeasuredMode(nil), meas...)
			for i := range pm {
				pm[i].NaturalFrequencyHz += pm[i].Sigma.NaturalFrequencyHz * x.AtVec(3*i)
				pm[i].DampingRatio += pm[i].Sigma.DampingRatio * x.AtVec(3*i+1)
				if shapes {
					pm[i].PitchPerBounceRadPerM += pm[i].Sigma.PitchPerBounceRadPerM * x.AtVec(3*i+2)
				}
			}
			up, err := UpdateModel(dampedCase, pm, sensors, UpdateOptions{Correlation: corr})
			if err != nil {
				t.Fatal(err)
			}
			for k, v := range rateVector(up.Vehicle.RatesOf(), true) {
				cols[k] = append(cols[k], v)
			}
		}
		wantWith, wantWithout := rateVector(with.Sigma, true), rateVector(without.Sigma, true)
		worstWithout := 0.0
		for k := range cols {
			got := stat.StdDev(cols[k], nil)
			if rel(got, wantWith[k]) > corrSigmaTol {
				t.Errorf("shapes %v, value %d: Monte Carlo sigma %.2f, propagated with the correlation %.2f", shapes, k,
					got, wantWith[k])
			}
			worstWithout = math.Max(worstWithout, rel(got, wantWithout[k]))
			t.Logf("shapes %v, value %d: Monte Carlo %.2f, with the correlation %.2f, as if independent %.2f", shapes,
				k, got, wantWith[k], wantWithout[k])
		}
		if shapes && worstWithout <= corrSigmaTol {
			t.Errorf("shapes %v: the sigmas as if independent match within %.2f; the test's correlation shows nothing",
				shapes, worstWithout)
		}
	}
}

// corrSigmaTol: the sampling error of a standard deviation from 1000 draws
// is about 2.2 %, and the first-order propagation ignores curvature of a
// few percent; 10 % covers both.
const corrSigmaTol = 0.10
