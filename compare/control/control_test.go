package control_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/ridemodes/ridemodes/compare/control"
)

// TestFactorsFromTheNormalDistribution: the tabulated factors for n = 2
// (Montgomery 2012, Appendix VI: d2 = 1.128, D4 = 3.267) are the moments of
// the range of two independent standard normal values, to the 3 decimals
// of the table: E|X1 - X2| = 2/sqrt(pi), sd|X1 - X2| = sqrt(2 - 4/pi).
func TestFactorsFromTheNormalDistribution(t *testing.T) {
	const tableTol = 0.0005
	d2 := 2 / math.Sqrt(math.Pi)
	d3 := math.Sqrt(2 - 4/math.Pi)
	if math.Abs(control.D2-d2) > tableTol {
		t.Errorf("D2 = %g, 2/sqrt(pi) = %g", control.D2, d2)
	}
	if d4 := 1 + 3*d3/d2; math.Abs(control.D4-d4) > tableTol {
		t.Errorf("D4 = %g, 1 + 3 d3/d2 = %g", control.D4, d4)
	}
	if math.Abs(control.XFactor-2.66) > 0.005 {
		t.Errorf("3/d2 = %g, want 2.66", control.XFactor)
	}
}

// TestWorkedByHand: a short series worked out by hand. x = 10, 12, 11, 15,
// 10: mean 11.6; moving ranges 2, 1, 4, 5, mean 3; limits 11.6 ± 3*3/1.128;
// MR upper limit 3.267*3 = 9.801.
func TestWorkedByHand(t *testing.T) {
	const tol = 1e-12
	c, err := control.Individuals([]float64{10, 12, 11, 15, 10})
	if err != nil {
		t.Fatal(err)
	}
	half := 9 / 1.128
	for _, got := range []struct {
		name      string
		got, want float64
	}{
		{"center", c.Center, 11.6}, {"lower", c.Lower, 11.6 - half}, {"upper", c.Upper, 11.6 + half},
		{"mean MR", c.MeanMR, 3}, {"MR upper", c.UpperMR, 9.801}, {"sigma", c.Sigma, 3 / 1.128},
	} {
		if math.Abs(got.got-got.want) > tol {
			t.Errorf("%s = %.15g, want %.15g", got.name, got.got, got.want)
		}
	}
	want := []float64{2, 1, 4, 5}
	for i, mr := range c.MR {
		if mr != want[i] {
			t.Errorf("MR[%d] = %g, want %g", i, mr, want[i])
		}
	}
	if c.Side(19.6) != 1 || c.Side(3.6) != -1 || c.Side(11) != 0 || c.Side(c.Upper) != 0 {
		t.Error("Side misplaces a value")
	}
}

// TestInControlFalseAlarmRate: for a long seeded series of independent
// normal values, sigma = MRbar/d2 estimates the true standard deviation, and
// the fraction of values beyond the limits is that of a normal variable
// beyond 3 sigma, 2(1 - Phi(3)) = 0.0027 (standard normal table).
func TestInControlFalseAlarmRate(t *testing.T) {
	const (
		n, mean, sd = 200000, 1.35, 0.02
		sigmaTol    = 0.01 // relative; the estimate's own sd is about 0.2 % here
		wantRate    = 0.0027
	)
	rng := rand.New(rand.NewPCG(12, 0))
	x := make([]float64, n)
	for i := range x {
		x[i] = mean + sd*rng.NormFloat64()
	}
	c, err := control.Individuals(x)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(c.Sigma/sd-1) > sigmaTol {
		t.Errorf("sigma = %g, want %g within %g %%", c.Sigma, sd, 100*sigmaTol)
	}
	out := 0
	for _, v := range x {
		if c.Side(v) != 0 {
			out++
		}
	}
	// Binomial sd of the count: sqrt(n p) = 23; allow 5 of them.
	if got := float64(out); math.Abs(got-wantRate*n) > 5*math.Sqrt(wantRate*n) {
		t.Errorf("%d of %d values beyond the limits, want about %.0f", out, n, wantRate*n)
	}
}

// TestStepIsCaught: a series that steps by 8 of its short-term standard
// deviations (a spring change) has the values after the step beyond the
// upper limit and the jump beyond the moving-range limit.
func TestStepIsCaught(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 0))
	var x []float64
	for i := range 14 {
		v := 1.50 + 0.005*rng.NormFloat64()
		if i >= 10 {
			v += 0.04
		}
		x = append(x, v)
	}
	c, err := control.Individuals(x)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range x {
		want := 0
		if i >= 10 {
			want = 1
		}
		if c.Side(v) != want {
			t.Errorf("value %d (%.4f): side %d, want %d (limits %.4f..%.4f)", i, v, c.Side(v), want, c.Lower, c.Upper)
		}
	}
	for i := range c.MR {
		if c.JumpOut(i) != (i == 9) {
			t.Errorf("jump %d -> %d (%.4f): out %v, limit %.4f", i, i+1, c.MR[i], c.JumpOut(i), c.UpperMR)
		}
	}
}

// TestBadSeries: too few values or a NaN are errors, not a chart.
func TestBadSeries(t *testing.T) {
	for _, x := range [][]float64{nil, {1}, {1, math.NaN(), 2}, {1, math.Inf(1)}} {
		if _, err := control.Individuals(x); err == nil {
			t.Errorf("Individuals(%v) gave no error", x)
		}
	}
}
