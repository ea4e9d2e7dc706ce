package lsq

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// Func fills e with the residuals at x and, when J is not nil, J with their
// Jacobian de/dx (rows by len(x); every element is to be set). The cost
// Minimize lowers is sum e_i^2, so residuals carry whatever weights the fit
// wants (for a weighted fit, (model - data)/sigma).
type Func func(e []float64, J *mat.Dense, x []float64)

// Defaults of Settings.
const (
	DefaultMaxIterations     = 200
	DefaultRelativeTolerance = 1e-12
	DefaultInitialDamping    = 1e-3
)

// Limits of the damping mu (relative to diag(J^T J)).
const (
	minDamping = 1e-12
	maxDamping = 1e12
	// dampingFactor divides mu after an accepted step and multiplies it
	// after a rejected one.
	dampingFactor = 10
)

// Settings steer Minimize; a zero field takes its default.
type Settings struct {
	// MaxIterations is the most accepted steps (Jacobian evaluations after
	// the first); DefaultMaxIterations when 0.
	MaxIterations int
	// RelativeTolerance stops the solver after a step that lowers the cost
	// by less than this fraction of it; DefaultRelativeTolerance when 0.
	RelativeTolerance float64
	// InitialDamping is mu at the start, relative to diag(J^T J);
	// DefaultInitialDamping when 0.
	InitialDamping float64
}

func (s Settings) withDefaults() Settings {
	if s.MaxIterations == 0 {
		s.MaxIterations = DefaultMaxIterations
	}
	if s.RelativeTolerance == 0 {
		s.RelativeTolerance = DefaultRelativeTolerance
	}
	if s.InitialDamping == 0 {
		s.InitialDamping = DefaultInitialDamping
	}
	if s.MaxIterations < 0 || !(s.RelativeTolerance > 0) || !(s.InitialDamping > 0) {
		panic(fmt.Sprintf("lsq: settings %+v must be positive", s))
	}
	return s
}

// Result is the outcome of Minimize.
type Result struct {
	// Cost is sum e_i^2 at the returned x, in the squared units of e.
	Cost float64
	// Iterations is the number of accepted steps.
	Iterations int
	// J is the Jacobian de/dx at the returned x (rows by len(x)), for the
	// covariance of the fit.
	J *mat.Dense
}

// ErrMaxIterations is returned by Minimize, with the last iterate and its
// Result, when Settings.MaxIterations steps all lowered the cost by more than
// the relative tolerance.
var ErrMaxIterations = errors.New("the cost was still falling after the most iterations allowed")

// Minimize lowers sum e_i^2 of the rows residuals of f over x, in place from
// the start x, as the package documentation describes. It returns the cost,
// the iteration count and the Jacobian at the final x; the error is
// ErrMaxIterations when the iterations ran out (x and the Result still hold
// the last, best iterate). A zero cost is a minimum and returns at once.
// rows or x of length zero is a caller mistake and panics.
func Minimize(f Func, rows int, x []float64, s Settings) (Result, error) {
	n := len(x)
	if rows < 1 || n < 1 {
		panic(fmt.Sprintf("lsq: %d residuals of %d parameters; need at least one of each", rows, n))
	}
	s = s.withDefaults()
	e := make([]float64, rows)
	et := make([]float64, rows)
	trial := make([]float64, n)
	res := Result{J: mat.NewDense(rows, n, nil)}
	f(e, res.J, x)
	res.Cost = sumSquares(e)
	if res.Cost == 0 {
		return res, nil
	}
	mu := s.InitialDamping
	var jtj mat.SymDense
	damped := mat.NewSymDense(n, nil)
	var g, step mat.VecDense
	var chol mat.Cholesky
	for res.Iterations = 0; res.Iterations < s.MaxIterations; res.Iterations++ {
		jtj.SymOuterK(1, res.J.T())
		g.MulVec(res.J.T(), mat.NewVecDense(rows, e))
		improved := false
		for ; mu <= maxDamping; mu *= dampingFactor {
			damped.CopySym(&jtj)
			for j := range n {
				damped.SetSym(j, j, jtj.At(j, j)*(1+mu))
			}
			if !chol.Factorize(damped) {
				continue
			}
			if err := chol.SolveVecTo(&step, &g); err != nil {
				continue
			}
			for j := range n {
				trial[j] = x[j] - step.AtVec(j)
			}
			f(et, nil, trial)
			if c := sumSquares(et); c < res.Cost {
				done := res.Cost-c < s.RelativeTolerance*res.Cost
				copy(x, trial)
				res.Cost = c
				mu = math.Max(mu/dampingFactor, minDamping)
				improved = true
				f(e, res.J, x)
				if done {
					res.Iterations++
					return res, nil
				}
				break
			}
		}
		if !improved {
			return res, nil // no step lowers the cost: a minimum to working precision
		}
	}
	return res, ErrMaxIterations
}

func sumSquares(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return s
}

// Differenced returns a Func for residuals without an analytic Jacobian:
// resid fills e at x, and the Jacobian comes from finite differences of
// resid (gonum's diff/fd) with the given formula (fd.Forward or fd.Central)
// and step in the units of x (0: fd's default for the formula). A forward
// difference reuses the residuals at x; each Jacobian costs len(x) calls of
// resid (forward) or 2 len(x) (central). The differenced Jacobian errs by
// about the step (forward) or its square (central) times the curvature of e,
// plus rounding of order 1e-16/step; the solver stops where J^T e vanishes
// for that Jacobian, which lies off the true minimum by about the Jacobian's
// error times the residuals: not at all for data fitted exactly.
func Differenced(resid func(e, x []float64), formula fd.Formula, step float64) Func {
	return func(e []float64, J *mat.Dense, x []float64) {
		resid(e, x)
		if J != nil {
			fd.Jacobian(J, resid, x, &fd.JacobianSettings{Formula: formula, Step: step, OriginValue: e})
		}
	}
}
