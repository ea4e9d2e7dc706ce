package lsq

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// rosenbrock is Rosenbrock's function written as least squares,
// e = (10 (x2 - x1^2), 1 - x1), with its minimum cost 0 at (1, 1) (H. H.
// Rosenbrock, The Computer Journal 3(3):175-184, 1960).
func rosenbrock(e []float64, J *mat.Dense, x []float64) {
	e[0], e[1] = 10*(x[1]-x[0]*x[0]), 1-x[0]
	if J != nil {
		J.Set(0, 0, -20*x[0])
		J.Set(0, 1, 10)
		J.Set(1, 0, -1)
		J.Set(1, 1, 0)
	}
}

// rosenbrockTol is the distance from (1, 1) allowed: the stopping rule
// (relative cost change 1e-12) leaves the cost at rounding level or the
// minimum exact.
const rosenbrockTol = 1e-8

func TestRosenbrock(t *testing.T) {
	for _, c := range []struct {
		name string
		f    Func
	}{
		{"analytic", rosenbrock},
		{"central differences", Differenced(func(e, x []float64) { rosenbrock(e, nil, x) }, fd.Central, 1e-6)},
	} {
		x := []float64{-1.2, 1} // the customary start
		r, err := Minimize(c.f, 2, x, Settings{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if math.Hypot(x[0]-1, x[1]-1) > rosenbrockTol || r.Cost > rosenbrockTol {
			t.Errorf("%s: minimum at %v (cost %g, %d iterations), want (1, 1)", c.name, x, r.Cost, r.Iterations)
		}
	}
}

func TestMaxIterations(t *testing.T) {
	x := []float64{-1.2, 1}
	r, err := Minimize(rosenbrock, 2, x, Settings{MaxIterations: 2})
	if !errors.Is(err, ErrMaxIterations) {
		t.Fatalf("error %v, want ErrMaxIterations", err)
	}
	start := make([]float64, 2)
	rosenbrock(start, nil, []float64{-1.2, 1})
	if r.Iterations != 2 || !(r.Cost < sumSquares(start)) {
		t.Errorf("%d iterations, cost %g from %g: want 2 iterations that lowered the cost", r.Iterations, r.Cost,
			sumSquares(start))
	}
}

// NIST Statistical Reference Datasets, nonlinear regression, Misra1a
// (lower difficulty): y = b1 (1 - exp(-b2 x)), 14 observations, with the
// certified parameters and residual sum of squares [memory: values recalled,
// and the fit below reproduces them to ten digits].
var (
	misra1aX = []float64{77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1,
		689.1, 760.0}
	misra1aY = []float64{10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.40,
		75.47, 81.78}
	misra1aB   = []float64{2.3894212918e+02, 5.5015643181e-04}
	misra1aRSS = 1.2455138894e-01
)

// nistTol is the relative agreement with the certified values, which carry
// 11 significant digits.
const nistTol = 1e-8

func TestMisra1a(t *testing.T) {
	f := func(e []float64, J *mat.Dense, b []float64) {
		for i, x := range misra1aX {
			ex := math.Exp(-b[1] * x)
			e[i] = b[0]*(1-ex) - misra1aY[i]
			if J != nil {
				J.Set(i, 0, 1-ex)
				J.Set(i, 1, b[0]*x*ex)
			}
		}
	}
	for _, start := range [][]float64{{500, 1e-4}, {250, 5e-4}} { // NIST's starts 1 and 2
		b := append([]float64(nil), start...)
		r, err := Minimize(f, len(misra1aX), b, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for k := range b {
			if rel(b[k], misra1aB[k]) > nistTol {
				t.Errorf("start %v: b%d = %.10e, certified %.10e", start, k+1, b[k], misra1aB[k])
			}
		}
		if rel(r.Cost, misra1aRSS) > nistTol {
			t.Errorf("start %v: residual sum of squares %.10e, certified %.10e", start, r.Cost, misra1aRSS)
		}
	}
}

// linearTol is the relative agreement of the solver with the QR solution of
// a well-conditioned linear problem: rounding, and the stopping rule on a
// cost that Gauss-Newton steps reach exactly.
const linearTol = 1e-9

// TestLinear checks a linear problem, e = A x - y, against gonum's QR
// least-squares solution, and the returned Jacobian against A.
func TestLinear(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	const rows, cols = 25, 4
	A := mat.NewDense(rows, cols, nil)
	y := mat.NewVecDense(rows, nil)
	for i := range rows {
		for j := range cols {
			A.Set(i, j, rng.NormFloat64())
		}
		y.SetVec(i, rng.NormFloat64())
	}
	var want mat.VecDense
	if err := want.SolveVec(A, y); err != nil {
		t.Fatal(err)
	}
	f := func(e []float64, J *mat.Dense, x []float64) {
		ev := mat.NewVecDense(rows, e)
		ev.MulVec(A, mat.NewVecDense(cols, x))
		ev.SubVec(ev, y)
		if J != nil {
			J.Copy(A)
		}
	}
	x := make([]float64, cols)
	r, err := Minimize(f, rows, x, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for j := range x {
		if math.Abs(x[j]-want.AtVec(j)) > linearTol*math.Max(1, math.Abs(want.AtVec(j))) {
			t.Errorf("x%d = %.12g, QR gives %.12g", j, x[j], want.AtVec(j))
		}
	}
	if !mat.Equal(r.J, A) {
		t.Error("the returned Jacobian is not A")
	}
}

// roundTripTol is the relative agreement with the parameters that made
// noise-free data, for a forward-difference Jacobian: the minimum is exact
// (cost 0) and the Jacobian's truncation error only slows the approach.
const roundTripTol = 1e-7

// TestRoundTrip fits a damped cosine y = a exp(-s t) cos(w t + p), made
// without noise from known parameters, from a start 10-20 % off, with a
// forward-difference Jacobian.
func TestRoundTrip(t *testing.T) {
	truth := []float64{2.5, 0.8, 7.0, 0.3} // a, s [1/s], w [rad/s], p [rad]
	model := func(p []float64, t float64) float64 { return p[0] * math.Exp(-p[1]*t) * math.Cos(p[2]*t+p[3]) }
	const n = 200
	ts := make([]float64, n)
	y := make([]float64, n)
	for k := range ts {
		ts[k] = 0.01 * float64(k)
		y[k] = model(truth, ts[k])
	}
	resid := func(e, p []float64) {
		for k, tk := range ts {
			e[k] = model(p, tk) - y[k]
		}
	}
	x := []float64{2.0, 0.95, 7.7, 0.25}
	r, err := Minimize(Differenced(resid, fd.Forward, 0), n, x, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for k := range x {
		if rel(x[k], truth[k]) > roundTripTol {
			t.Errorf("parameter %d: %.10g, want %.10g (cost %g after %d iterations)", k, x[k], truth[k], r.Cost,
				r.Iterations)
		}
	}
}

func rel(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }
