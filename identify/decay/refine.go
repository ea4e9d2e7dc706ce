package decay

import (
	"math"

	"gonum.org/v1/gonum/mat"
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
// a_rc, b_rc, then d_c per channel). With weight set, channel c's residuals
// (and their Jacobian rows) are multiplied by weight[c].
type expModel struct {
	tS     []float64   // sample times
	y      [][]float64 // y[c][k]
	modes  int
	weight []float64 // per channel, 1/(its noise sd); nil: unweighted
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

// evaluate fills res with the residuals, model minus data (times the
// channel's weight when set), and jac (when not nil) with their Jacobian: an
// lsq.Func. Row k*nch + c is sample k of channel c.
func (m expModel) evaluate(res []float64, jac *mat.Dense, p []float64) {
	nch := m.nch()
	for k, t := range m.tS {
		for c := 0; c < nch; c++ {
			res[k*nch+c] = p[m.offIndex(c)] - m.y[c][k]
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
				res[k*nch+c] += v
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
	if m.weight == nil {
		return
	}
	for i := range res {
		w := m.weight[i%nch]
		res[i] *= w
		if jac != nil {
			row := jac.RawRowView(i)
			for j := range row {
				row[j] *= w
			}
		}
	}
}

// unweighted returns m without channel weights.
func (m expModel) unweighted() expModel {
	m.weight = nil
	return m
}

// channelWeights returns, for each channel, 1/s_c at the parameters p of
// the unweighted model, s_c^2 its residual variance (with the degrees of
// freedom shared out as in covariance: rss_c/len(tS) times
// rows/(rows - params)). A channel whose residual is under minWeightedSD of
// the largest is given that floor (a noise-free channel would otherwise
// weigh without bound); nil when every residual is zero (noise-free data
// fitted exactly: weights are moot).
func (m expModel) channelWeights(p []float64) []float64 {
	nch := m.nch()
	res := make([]float64, m.rows())
	m.unweighted().evaluate(res, nil, p)
	ss := make([]float64, nch)
	for i, e := range res {
		ss[i%nch] += e * e
	}
	var top float64
	for _, v := range ss {
		top = math.Max(top, v)
	}
	if !(top > 0) {
		return nil
	}
	scale := float64(m.rows()) / float64(len(m.tS)*max(m.rows()-m.params(), 1))
	w := make([]float64, nch)
	for c, v := range ss {
		w[c] = 1 / math.Sqrt(math.Max(v, minWeightedSD*minWeightedSD*top)*scale)
	}
	return w
}

// minWeightedSD is the smallest residual sd, as a share of the largest
// channel's, that channelWeights lets a channel have.
const minWeightedSD = 1e-6

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

// covariance returns kappa s^2 (J^T J)^-1 and kappa s^2, with J the
// Jacobian and rss the residual sum of squares of m (weighted, when m is) at
// the solution and s^2 = rss/(rows - params).
func (m expModel) covariance(jac *mat.Dense, rss, kappa float64) (*mat.SymDense, float64, error) {
	dof := m.rows() - m.params()
	if dof <= 0 {
		return nil, 0, errNumerical("no degrees of freedom are left for the noise estimate")
	}
	var jtj mat.SymDense
	jtj.SymOuterK(1, jac.T())
	var ch mat.Cholesky
	if !ch.Factorize(&jtj) {
		return nil, 0, errNumerical("the fitted parameters are not identifiable (J^T J is singular)")
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return nil, 0, errNumerical("the covariance is singular: " + err.Error())
	}
	s2 := kappa * rss / float64(dof)
	cov.ScaleSym(s2, &cov)
	return &cov, s2, nil
}
