package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

// boundParams is the number of real parameters of one FRF in the rig
// fit's model: two residues (complex) and the upper and lower residual
// terms (package identify/modal).
const boundParams = 6

// modeBound is the Cramer-Rao bound of one mode's natural frequency and
// damping ratio.
type modeBound struct {
	label                            string
	naturalFrequencyHz, dampingRatio float64 // the truth
	sdFrequencyHz, sdDampingRatio    float64
}

// rigBound returns the Cramer-Rao bound (S. M. Kay, Fundamentals of
// Statistical Signal Processing: Estimation Theory, Prentice Hall, 1993,
// ch. 3 and 15) on the natural frequency and damping ratio of both modes
// for the rig log of car c under condition cond with seed: the log the
// sweep would simulate, but noise-free, from which the bound's ingredients
// are taken. The model is the rig fit's (identify/modal): every FRF from a
// pan to a body sensor is a sum over the two modes of R/(i omega - lambda)
// + conj(R)/(i omega - conj(lambda)), plus an upper (constant) and a lower
// (-1/omega^2) residual term, with common poles. The data are the whole
// record's DFT over the bins of the default band, Y = H U + noise; the
// output noise (cond.noise of each body channel's RMS) and the pans'
// measured noise (cond.noise of each pan's RMS, which the sweep adds too)
// make the residual Y - H U_measured of each bin complex Gaussian with
// covariance N (diag(sigma_y^2) + H diag(sigma_u^2) H^H) across the
// sensors. The Fisher information is the sum over the bins of
// 2 Re(D^H S^-1 D), D the derivative of H U with respect to the
// parameters at the truth (the residues from the exact transmissibility,
// compare.Vehicle.Transmissibility, by least squares at the true poles):
// the information of the frequency-domain errors-in-variables maximum
// likelihood estimator (R. Pintelon and J. Schoukens, System
// Identification: A Frequency Domain Approach, 2nd ed., Wiley-IEEE Press,
// 2012, ch. 7 and 10), with the dependence of S on the parameters left
// out. Leakage is absent from the bound: the simulation is periodic over
// its FFT, so Y = H U holds bin by bin.
func rigBound(c car, cond condition, seed uint64) ([]modeBound, error) {
	var sensors []ingest.Sensor
	for i, x := range c.sensorsXM {
		sensors = append(sensors, ingest.Sensor{Channel: fmt.Sprintf("body_%d", i+1), XM: x})
	}
	o := simulate.Defaults(routeRig)
	o.DurationS, o.RateHz, o.Seed, o.NoiseFraction = cond.durationS, cond.rateHz, seed, 0
	lg, err := simulate.Rig(c.vehicle, sensors, []ingest.Input{{Channel: "pan_front", Axle: "front"},
		{Channel: "pan_rear", Axle: "rear"}}, o)
	if err != nil {
		return nil, err
	}
	n := len(lg.Columns[0].Data)
	rmsOf := func(x []float64) float64 {
		var s float64
		for _, v := range x {
			s += v * v
		}
		return math.Sqrt(s / float64(len(x)))
	}
	fft := fourier.NewFFT(n)
	var u [2][]complex128
	var sdIn [2]float64
	for in := range u {
		u[in] = fft.Coefficients(nil, lg.Columns[in].Data)
		sdIn[in] = cond.noise * rmsOf(lg.Columns[in].Data)
	}
	nout := len(sensors)
	sdOut := make([]float64, nout)
	for k := range sdOut {
		sdOut[k] = cond.noise * rmsOf(lg.Columns[2+k].Data)
	}
	truth, err := c.vehicle.DampedModes()
	if err != nil {
		return nil, err
	}
	poles := []complex128{truth[0].Pole, truth[1].Pole}
	basis := func(omega float64) []complex128 {
		iw := complex(0, omega)
		var b []complex128
		for _, l := range poles {
			g1, g2 := 1/(iw-l), 1/(iw-cmplx.Conj(l))
			b = append(b, g1+g2, complex(0, 1)*(g1-g2))
		}
		return append(b, 1, complex(-1/(omega*omega), 0))
	}
	hz := func(k int) float64 { return float64(k) * cond.rateHz / float64(n) }
	var bins []int
	for k := 1; k < n/2; k++ {
		if f := hz(k); f >= ingest.DefaultBandLowHz && f <= ingest.DefaultBandHighHz {
			bins = append(bins, k)
		}
	}
	// The true coefficients of each FRF (sensor k, pan in: index 2k + in).
	coef := make([][]float64, 2*nout)
	for k, s := range sensors {
		for in := range 2 {
			a := mat.NewDense(2*len(bins), boundParams, nil)
			y := mat.NewVecDense(2*len(bins), nil)
			for i, bin := range bins {
				front, rear := c.vehicle.Transmissibility(hz(bin), s.XM)
				h := front
				if in == 1 {
					h = rear
				}
				for j, bj := range basis(2 * math.Pi * hz(bin)) {
					a.Set(2*i, j, real(bj))
					a.Set(2*i+1, j, imag(bj))
				}
				y.SetVec(2*i, real(h))
				y.SetVec(2*i+1, imag(h))
			}
			var x mat.VecDense
			if err := x.SolveVec(a, y); err != nil {
				return nil, err
			}
			coef[2*k+in] = x.RawVector().Data
		}
	}
	np := 2*len(poles) + 2*nout*boundParams
	fisher := mat.NewSymDense(np, nil)
	d := make([][]complex128, nout)
	h := make([][2]complex128, nout)
	real2 := mat.NewDense(2*nout, 2*nout, nil)
	for _, bin := range bins {
		omega := 2 * math.Pi * hz(bin)
		iw := complex(0, omega)
		b := basis(omega)
		for k := range sensors {
			d[k] = make([]complex128, np)
			for in := range 2 {
				p := 2*k + in
				x := coef[p]
				h[k][in] = 0
				for j := range boundParams {
					h[k][in] += complex(x[j], 0) * b[j]
					d[k][2*len(poles)+p*boundParams+j] = b[j] * u[in][bin]
				}
				for r, l := range poles {
					res := complex(x[2*r], x[2*r+1])
					g1, g2 := 1/(iw-l), 1/(iw-cmplx.Conj(l))
					d[k][2*r] += (res*g1*g1 + cmplx.Conj(res)*g2*g2) * u[in][bin]
					d[k][2*r+1] += complex(0, 1) * (res*g1*g1 - cmplx.Conj(res)*g2*g2) * u[in][bin]
				}
			}
		}
		// S^-1 through the real form [[Re, -Im], [Im, Re]] of S.
		for a := range nout {
			for k := range nout {
				var v complex128
				for in := range 2 {
					v += h[a][in] * cmplx.Conj(h[k][in]) * complex(sdIn[in]*sdIn[in], 0)
				}
				if a == k {
					v += complex(sdOut[a]*sdOut[a], 0)
				}
				v *= complex(float64(n), 0)
				real2.Set(a, k, real(v))
				real2.Set(a, nout+k, -imag(v))
				real2.Set(nout+a, k, imag(v))
				real2.Set(nout+a, nout+k, real(v))
			}
		}
		var inv mat.Dense
		if err := inv.Inverse(real2); err != nil {
			return nil, fmt.Errorf("bound: the residual covariance at %.3f Hz is singular: %w", hz(bin), err)
		}
		for a := range np {
			for bb := a; bb < np; bb++ {
				var v complex128
				for k1 := range nout {
					if d[k1][a] == 0 {
						continue
					}
					for k2 := range nout {
						if d[k2][bb] == 0 {
							continue
						}
						sinv := complex(inv.At(k1, k2), inv.At(nout+k1, k2))
						v += cmplx.Conj(d[k1][a]) * sinv * d[k2][bb]
					}
				}
				if v != 0 {
					fisher.SetSym(a, bb, fisher.At(a, bb)+2*real(v))
				}
			}
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(fisher) {
		return nil, fmt.Errorf("bound: the Fisher information of %s is singular", c.name)
	}
	var cov mat.SymDense
	if err := chol.InverseTo(&cov); err != nil {
		return nil, err
	}
	var out []modeBound
	for r, l := range poles {
		w := cmplx.Abs(l)
		// fn = |lambda|/(2 pi), zeta = -Re(lambda)/|lambda|, as functions
		// of (Re lambda, Im lambda).
		gf := [2]float64{real(l) / (w * 2 * math.Pi), imag(l) / (w * 2 * math.Pi)}
		gz := [2]float64{-1/w + real(l)*real(l)/(w*w*w), real(l) * imag(l) / (w * w * w)}
		sd := func(g [2]float64) float64 {
			var v float64
			for i := range 2 {
				for j := range 2 {
					v += g[i] * g[j] * cov.At(2*r+i, 2*r+j)
				}
			}
			return math.Sqrt(v)
		}
		out = append(out, modeBound{label: truth[r].Label, naturalFrequencyHz: truth[r].NaturalFrequencyHz,
			dampingRatio: truth[r].DampingRatio, sdFrequencyHz: sd(gf), sdDampingRatio: sd(gz)})
	}
	return out, nil
}

// printBounds writes the bounds of every selected car under every
// selected 5-minute rig condition (seed: the sweep's first of that car and
// condition) as a Markdown table.
func printBounds(w io.Writer, selCars []car, selConds, allConds []condition, firstSeed int) error {
	fmt.Fprintln(w, "| car | condition | mode | natural frequency Hz | bound sd (%) | damping ratio | bound sd |")
	fmt.Fprintln(w, "| --- | --- | --- | --- | --- | --- | --- |")
	for _, c := range selCars {
		for _, cond := range selConds {
			if !cond.fiveMinute() {
				continue
			}
			bs, err := rigBound(c, cond, seedOf(c, cond, allConds, firstSeed))
			if err != nil {
				return err
			}
			for _, b := range bs {
				fmt.Fprintf(w, "| %s | %s | %s | %.4f | %.4f | %.3f | %.5f |\n", c.name, cond.name, b.label,
					b.naturalFrequencyHz, 100*b.sdFrequencyHz/b.naturalFrequencyHz, b.dampingRatio, b.sdDampingRatio)
			}
		}
	}
	return nil
}
