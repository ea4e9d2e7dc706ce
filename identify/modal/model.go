package modal

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// poleResidue is the parameter layout of the pole-residue model of a band:
// theta = [Re l_1, Im l_1, ..., Re l_m, Im l_m, then per FRF p:
// Re R_1p, Im R_1p, ..., Re R_mp, Im R_mp, U_p (if upper), L_p (if lower)].
type poleResidue struct {
	b            *band
	modes        int
	upper, lower bool
}

func (pr poleResidue) perPair() int {
	n := 2 * pr.modes
	if pr.upper {
		n++
	}
	if pr.lower {
		n++
	}
	return n
}

func (pr poleResidue) params() int { return 2*pr.modes + pr.b.pairs*pr.perPair() }
func (pr poleResidue) rows() int   { return 2 * pr.b.pairs * len(pr.b.omega) }

func (pr poleResidue) pole(theta []float64, r int) complex128 {
	return complex(theta[2*r], theta[2*r+1])
}

// pairParams returns the slice of theta holding FRF p's residues and residual terms.
func (pr poleResidue) pairParams(theta []float64, p int) []float64 {
	off := 2*pr.modes + p*pr.perPair()
	return theta[off : off+pr.perPair()]
}

// basis writes into dst the complex basis functions of one FRF at omega
// for the given poles, in the order of pairParams: per mode
// g1 + g2 and i g1 - i g2 with g1 = 1/(i omega - l), g2 = 1/(i omega - conj l),
// then 1 (upper residual) and -1/omega^2 (lower residual).
func (pr poleResidue) basis(dst []complex128, poles []complex128, omega float64) {
	iw := complex(0, omega)
	for r, l := range poles {
		g1, g2 := 1/(iw-l), 1/(iw-conj(l))
		dst[2*r], dst[2*r+1] = g1+g2, complex(0, 1)*(g1-g2)
	}
	n := 2 * len(poles)
	if pr.upper {
		dst[n] = 1
		n++
	}
	if pr.lower {
		dst[n] = complex(-1/(omega*omega), 0)
	}
}

func conj(z complex128) complex128 { return complex(real(z), -imag(z)) }

func (pr poleResidue) poles(theta []float64) []complex128 {
	ps := make([]complex128, pr.modes)
	for r := range ps {
		ps[r] = pr.pole(theta, r)
	}
	return ps
}

// residualsAndJacobian fills e (whitened residuals, model - data, Re and Im
// rows per bin) and, when J is not nil, the Jacobian de/dtheta. Rows are
// ordered pair by pair, bin by bin, Re then Im.
func (pr poleResidue) residualsAndJacobian(e []float64, J *mat.Dense, theta []float64) {
	poles := pr.poles(theta)
	pp := pr.perPair()
	bs := make([]complex128, pp)
	g1 := make([]complex128, pr.modes)
	g2 := make([]complex128, pr.modes)
	if J != nil {
		J.Zero()
	}
	row := 0
	for p := range pr.b.pairs {
		c := pr.pairParams(theta, p)
		off := 2*pr.modes + p*pp
		for n, om := range pr.b.omega {
			pr.basis(bs, poles, om)
			var h complex128
			for j, v := range bs {
				h += complex(c[j], 0) * v
			}
			sd := pr.b.sigma[p][n]
			d := (h - pr.b.h[p][n]) / complex(sd, 0)
			e[row], e[row+1] = real(d), imag(d)
			if J != nil {
				iw := complex(0, om)
				for r, l := range poles {
					g1[r], g2[r] = 1/(iw-l), 1/(iw-conj(l))
					R := complex(c[2*r], c[2*r+1])
					da := R*g1[r]*g1[r] + conj(R)*g2[r]*g2[r]
					db := complex(0, 1) * (R*g1[r]*g1[r] - conj(R)*g2[r]*g2[r])
					J.Set(row, 2*r, real(da)/sd)
					J.Set(row+1, 2*r, imag(da)/sd)
					J.Set(row, 2*r+1, real(db)/sd)
					J.Set(row+1, 2*r+1, imag(db)/sd)
				}
				for j, v := range bs {
					J.Set(row, off+j, real(v)/sd)
					J.Set(row+1, off+j, imag(v)/sd)
				}
			}
			row += 2
		}
	}
}

// linearResidues sets the residues and residual terms of theta for the
// poles already in theta by weighted linear least squares, FRF by FRF.
func (pr poleResidue) linearResidues(theta []float64) error {
	poles := pr.poles(theta)
	pp := pr.perPair()
	nb := len(pr.b.omega)
	A := mat.NewDense(2*nb, pp, nil)
	y := mat.NewVecDense(2*nb, nil)
	bs := make([]complex128, pp)
	var x mat.VecDense
	for p := range pr.b.pairs {
		for n, om := range pr.b.omega {
			pr.basis(bs, poles, om)
			sd := pr.b.sigma[p][n]
			for j, v := range bs {
				A.Set(2*n, j, real(v)/sd)
				A.Set(2*n+1, j, imag(v)/sd)
			}
			h := pr.b.h[p][n]
			y.SetVec(2*n, real(h)/sd)
			y.SetVec(2*n+1, imag(h)/sd)
		}
		if err := x.SolveVec(A, y); err != nil {
			return fmt.Errorf("residues of FRF %d: %w", p, err)
		}
		copy(pr.pairParams(theta, p), x.RawVector().Data)
	}
	return nil
}

// covariance returns the covariance of theta from the whitened Jacobian J
// at the optimum: the sandwich B^-1 M B^-1 with B = J^T J and M = J^T C J,
// C the correlation of the whitened residuals: between bins whose errors
// correlate (set.ErrorCorrelation) and between outputs on the same input
// (set.OutputCorrelation, at every lag times the bins' correlation), times
// max(1, chi^2/dof). M is built as J^T W with W = C J, row by row: each
// residual row of W is its correlated rows of J weighted by their
// correlation.
func (pr poleResidue) covariance(J *mat.Dense, cost float64) (*mat.SymDense, float64, error) {
	np, nr := pr.params(), pr.rows()
	var B mat.SymDense
	B.SymOuterK(1, J.T())
	set := pr.b.set
	rho := set.ErrorCorrelation
	nb, npair := len(pr.b.bins), pr.b.pairs
	row := func(p, n, c int) []float64 { return J.RawRowView(2*(p*nb+n) + c) }
	// S: each row of J plus its neighbours along the bins, weighted by the
	// bins' correlation.
	S := mat.NewDense(nr, np, nil)
	S.Copy(J)
	if len(rho) > 0 {
		for n := range nb {
			for m := n + 1; m < nb && pr.b.bins[m]-pr.b.bins[n] <= len(rho); m++ {
				r := rho[pr.b.bins[m]-pr.b.bins[n]-1]
				for p := range npair {
					for c := range 2 {
						floats.AddScaled(S.RawRowView(2*(p*nb+n)+c), r, row(p, m, c))
						floats.AddScaled(S.RawRowView(2*(p*nb+m)+c), r, row(p, n, c))
					}
				}
			}
		}
	}
	W := S
	if oc := set.OutputCorrelation; oc != nil {
		ni := set.inputs()
		W = mat.NewDense(nr, np, nil)
		W.Copy(S)
		srow := func(p, n, c int) []float64 { return S.RawRowView(2*(p*nb+n) + c) }
		for o := range set.outputs() {
			for o2 := range set.outputs() {
				if o2 == o {
					continue
				}
				for n, k := range pr.b.bins {
					c := oc[o][o2][k]
					for i := range ni {
						p, p2 := o*ni+i, o2*ni+i
						re, im := W.RawRowView(2*(p*nb+n)), W.RawRowView(2*(p*nb+n)+1)
						// Corr(Re e_o, Re e_o2) = Corr(Im, Im) = Re c,
						// Corr(Re e_o, Im e_o2) = -Im c, Corr(Im e_o, Re e_o2) = Im c.
						floats.AddScaled(re, real(c), srow(p2, n, 0))
						floats.AddScaled(re, -imag(c), srow(p2, n, 1))
						floats.AddScaled(im, imag(c), srow(p2, n, 0))
						floats.AddScaled(im, real(c), srow(p2, n, 1))
					}
				}
			}
		}
	}
	var meat mat.Dense
	meat.Mul(J.T(), W)
	var chol mat.Cholesky
	if !chol.Factorize(&B) {
		return nil, 0, fmt.Errorf("the fit's normal matrix is singular: the data do not determine every parameter; " +
			"widen the band or drop residual terms")
	}
	var binv mat.SymDense
	if err := chol.InverseTo(&binv); err != nil {
		return nil, 0, fmt.Errorf("inverting the fit's normal matrix: %w", err)
	}
	var t, cov mat.Dense
	t.Mul(&binv, &meat)
	cov.Mul(&t, &binv)
	dof := float64(nr - np)
	chi2 := cost / dof
	scale := math.Max(1, chi2)
	out := mat.NewSymDense(np, nil)
	for i := range np {
		for j := i; j < np; j++ {
			out.SetSym(i, j, scale*(cov.At(i, j)+cov.At(j, i))/2)
		}
	}
	return out, chi2, nil
}
