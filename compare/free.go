package compare

import (
	"errors"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// State is the body state (z, theta, z', theta') in m, rad, m/s, rad/s,
// measured from static equilibrium.
type State [4]float64

// FreeResponse is the motion of the body left to itself from an initial state,
// as a sum of its modes: x(t) = sum_i v_i exp(lambda_i t) (u_i^H x0)/(u_i^H v_i),
// with right and left eigenvectors v_i, u_i of the state matrix.
type FreeResponse struct {
	poles []complex128
	right [][4]complex128 // v_i
	coef  []complex128    // (u_i^H x0)/(u_i^H v_i)
	a     *mat.Dense      // state matrix, for accelerations
}

// NewFreeResponse prepares the free response of v from the initial state x0.
// It works for underdamped and overdamped models alike; it fails only for a
// defective state matrix (repeated poles without a full set of eigenvectors),
// which a physical model meets only by coincidence.
func (v Vehicle) NewFreeResponse(x0 State) (*FreeResponse, error) {
	if err := v.Validate(); err != nil {
		return nil, err
	}
	A := v.stateMatrix()
	var eig mat.Eigen
	if ok := eig.Factorize(A, mat.EigenBoth); !ok {
		return nil, errors.New("the eigenvalue solver did not converge")
	}
	var R, L mat.CDense
	eig.VectorsTo(&R)
	eig.LeftVectorsTo(&L)
	fr := &FreeResponse{poles: eig.Values(nil), a: A}
	for i := range fr.poles {
		var vi [4]complex128
		var uhx, uhv complex128
		for r := 0; r < 4; r++ {
			vi[r] = R.At(r, i)
			u := cmplx.Conj(L.At(r, i))
			uhx += u * complex(x0[r], 0)
			uhv += u * vi[r]
		}
		if cmplx.Abs(uhv) < 1e-12 {
			return nil, errors.New("the state matrix is defective; perturb a parameter slightly")
		}
		fr.right = append(fr.right, vi)
		fr.coef = append(fr.coef, uhx/uhv)
	}
	return fr, nil
}

// At returns the state at time tS after release and the body accelerations
// (second derivatives of z and theta) in m/s^2 and rad/s^2.
func (fr *FreeResponse) At(tS float64) (x State, acc [2]float64) {
	var xc [4]complex128
	for i, lam := range fr.poles {
		e := fr.coef[i] * cmplx.Exp(lam*complex(tS, 0))
		for r := 0; r < 4; r++ {
			xc[r] += fr.right[i][r] * e
		}
	}
	for r := 0; r < 4; r++ {
		x[r] = real(xc[r])
	}
	for r := 0; r < 2; r++ {
		for c := 0; c < 4; c++ {
			acc[r] += fr.a.At(2+r, c) * x[c]
		}
	}
	return x, acc
}

// StepState returns the body state, measured from the new static equilibrium,
// just after the pans step by (dufM, durM) at rest: the car dropped onto its
// wheels is a step down (negative). The displacement is minus the new static
// deflection, -K^-1 Kin du, and the damper impulse Cin du gives the body an
// initial velocity M^-1 Cin du.
func (v Vehicle) StepState(dufM, durM float64) State {
	z, th := v.StaticResponse(dufM, durM)
	cin := v.inputMatrix(v.FrontDampingNsPerM, v.RearDampingNsPerM)
	return State{
		-z, -th,
		(cin[0][0]*dufM + cin[0][1]*durM) / v.MassKg,
		(cin[1][0]*dufM + cin[1][1]*durM) / v.PitchInertiaKgm2,
	}
}

// StateMatrix returns a copy of the 4x4 first-order matrix
// [[0, I], [-M^-1 K, -M^-1 C]] for x = (z, theta, z', theta').
func (v Vehicle) StateMatrix() *mat.Dense { return v.stateMatrix() }
