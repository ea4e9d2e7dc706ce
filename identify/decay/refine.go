package decay

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Levenberg-Marquardt settings.
const (
	lmMaxIterations = 200
	lmRelTol        = 1e-12 // stop when a step lowers the cost by less than this fraction
	lmLambdaStart   = 1e-3
	lmLambdaMax     = 1e12
)

// expModel is the sum of damped exponentials with common poles fitted to the
// free decay:
//
//	y_c(t) = sum_r exp(-sigma_r t) (a_rc cos(omega_r t) + b_rc sin(omega_r t)) + d_c
//	       = sum_r 2 Re(A_rc exp(lambda_r t)) + d_c,
//	lambda_r = -sigma_r + i omega_r,  A_rc = (a_rc - i b_rc)/2,
//
// with t from the first sample of the window. The parameter vector is
// (sigma_0, omega_0, sigma_1, omega_1, ..., then per mode r and channel c
// a_rc, b_rc, then d_c per channel).
type expModel struct {
	tS    []float64   // sample times
	y     [][]float64 // y[c][k]
	modes int
}

func (m expModel) nch() int              { return len(m.y) }
func (m expModel) rows() int             { return len(m.tS) * m.nch() }
func (m expModel) params() int           { return 2*m.modes + 2*m.modes*m.nch() + m.nch() }
func (m expModel) ampIndex(r, c int) int { return 2*m.modes + 2*(r*m.nch()+c) }
func (m expModel) offIndex(c int) int    { return 2*m.modes + 2*m.modes*m.nch() + c }

// pole returns lambda_r of parameter vector p.
func (m expModel) pole(p []float64, r int) complex128 { return complex(-p[2*r], p[2*r+1]) }

// amplitude returns A_rc of parameter vector p.
func (m expModel) amplitude(p []float64, r, c int) complex128 {
	i := m.ampIndex(r, c)
	return complex(p[i], -p[i+1]) / 2
}

// evaluate fills the residual (data minus model), and the Jacobian of the
// model when jac is not nil. Row k*nch + c is sample k of channel c.
func (m expModel) evaluate(p []float64, res []float64, jac *mat.Dense) {
	nch := m.nch()
	for k, t := range m.tS {
		for c := 0; c < nch; c++ {
			res[k*nch+c] = m.y[c][k] - p[m.offIndex(c)]
			if jac != nil {
				jac.Set(k*nch+c, m.offIndex(c), 1)
			}
		}
		for r := 0; r < m.modes; r++ {
			e := math.Exp(-p[2*r] * t)
			sn, cs := math.Sincos(p[2*r+1] * t)
			ec, es := e*cs, e*sn
			for c := 0; c < nch; c++ {
				i := m.ampIndex(r, c)
				a, b := p[i], p[i+1]
				v := a*ec + b*es
				res[k*nch+c] -= v
				if jac != nil {
					row := k*nch + c
					jac.Set(row, 2*r, -t*v)
					jac.Set(row, 2*r+1, t*(b*ec-a*es))
					jac.Set(row, i, ec)
					jac.Set(row, i+1, es)
				}
			}
		}
	}
}

// linearStart fills the amplitudes and offsets of p (poles already set) by
// linear least squares, channel by channel (QR, gonum's mat.Dense.Solve).
func (m expModel) linearStart(p []float64) error {
	cols := 2*m.modes + 1
	basis := mat.NewDense(len(m.tS), cols, nil)
	for k, t := range m.tS {
		for r := 0; r < m.modes; r++ {
			e := math.Exp(-p[2*r] * t)
			sn, cs := math.Sincos(p[2*r+1] * t)
			basis.Set(k, 2*r, e*cs)
			basis.Set(k, 2*r+1, e*sn)
		}
		basis.Set(k, cols-1, 1)
	}
	for c, yc := range m.y {
		var x mat.VecDense
		if err := x.SolveVec(basis, mat.NewVecDense(len(yc), append([]float64(nil), yc...))); err != nil {
			return errNumerical("the starting amplitudes are singular: " + err.Error())
		}
		for r := 0; r < m.modes; r++ {
			i := m.ampIndex(r, c)
			p[i], p[i+1] = x.AtVec(2*r), x.AtVec(2*r+1)
		}
		p[m.offIndex(c)] = x.AtVec(cols - 1)
	}
	return nil
}

// refine minimises the sum of squared residuals over p in place by
// Levenberg-Marquardt with Marquardt's scaling (the damping term is lambda
// times the diagonal of J^T J), solving each step by Cholesky (gonum's mat).
// It returns the final residual sum of squares, the Jacobian at the solution
// and the number of iterations.
//
// References: K. Levenberg, "A method for the solution of certain non-linear
// problems in least squares", Quarterly of Applied Mathematics 2:164-168,
// 1944; D. W. Marquardt, "An algorithm for least-squares estimation of
// nonlinear parameters", Journal of the Society for Industrial and Applied
// Mathematics 11(2):431-441, 1963.
func (m expModel) refine(p []float64) (rss float64, jac *mat.Dense, iters int) {
	nr, np := m.rows(), m.params()
	res := make([]float64, nr)
	trial := make([]float64, nr)
	jac = mat.NewDense(nr, np, nil)
	m.evaluate(p, res, jac)
	rss = sumSquares(res)
	lambda := lmLambdaStart
	var jtj mat.SymDense
	var g, step mat.VecDense
	cand := make([]float64, np)
	for iters = 0; iters < lmMaxIterations; iters++ {
		jtj.SymOuterK(1, jac.T())
		g.MulVec(jac.T(), mat.NewVecDense(nr, res)) // J^T r: the model's Jacobian, r = data - model
		improved := false
		for lambda <= lmLambdaMax {
			aug := mat.NewSymDense(np, nil)
			aug.CopySym(&jtj)
			for i := 0; i < np; i++ {
				aug.SetSym(i, i, jtj.At(i, i)*(1+lambda))
			}
			var ch mat.Cholesky
			if !ch.Factorize(aug) {
				lambda *= 10
				continue
			}
			if err := ch.SolveVecTo(&step, &g); err != nil {
				lambda *= 10
				continue
			}
			for i := range cand {
				cand[i] = p[i] + step.AtVec(i)
			}
			m.evaluate(cand, trial, nil)
			if r := sumSquares(trial); r < rss {
				done := rss-r < lmRelTol*rss
				copy(p, cand)
				rss = r
				lambda = math.Max(lambda/10, 1e-12)
				improved = true
				if done {
					m.evaluate(p, res, jac)
					return rss, jac, iters + 1
				}
				break
			}
			lambda *= 10
		}
		if !improved {
			break // no step lowers the cost: a minimum to working precision
		}
		m.evaluate(p, res, jac)
	}
	m.evaluate(p, res, jac)
	return rss, jac, iters
}

// covariance returns kappa * s^2 (J^T J)^-1 with s^2 = rss/(rows - params).
func (m expModel) covariance(jac *mat.Dense, rss, kappa float64) (*mat.SymDense, error) {
	dof := m.rows() - m.params()
	if dof <= 0 {
		return nil, errNumerical("no degrees of freedom are left for the noise estimate")
	}
	var jtj mat.SymDense
	jtj.SymOuterK(1, jac.T())
	var ch mat.Cholesky
	if !ch.Factorize(&jtj) {
		return nil, errNumerical("the fitted parameters are not identifiable (J^T J is singular)")
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return nil, errNumerical("the covariance is singular: " + err.Error())
	}
	cov.ScaleSym(kappa*rss/float64(dof), &cov)
	return &cov, nil
}

func sumSquares(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return s
}
