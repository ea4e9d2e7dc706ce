package spectral

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/floats"
)

// rigSystem is a body on two suspensions (heave z, pitch theta, front axle
// at +aM, rear at -bM) driven at the two wheel pans: an invented car, not
// any real one, with modes at 1.18 Hz (zeta 0.32) and 1.37 Hz (zeta 0.36)
// for the default damping (eigenvalues checked with numpy.linalg.eigvals of
// the state matrix). Sensor k measures w(s) = z - s theta at sensorsM[k].
type rigSystem struct {
	mKg, jKgm2, aM, bM float64
	kfNPerM, krNPerM   float64
	cfNsPerM, crNsPerM float64
	sensorsM           []float64
}

func testCar() rigSystem {
	return rigSystem{mKg: 1350, jKgm2: 2050, aM: 1.25, bM: 1.45,
		kfNPerM: 38e3, krNPerM: 41e3, cfNsPerM: 3300, crNsPerM: 3400, sensorsM: []float64{1.0, -1.2}}
}

// frf returns the exact transmissibility [sensor][pan] at fHz: pan
// acceleration to body acceleration equals pan displacement to body
// displacement, Phi (K + i w C - w^2 M)^-1 (Kin + i w Cin), e^{+i w t}.
func (r rigSystem) frf(fHz float64) [][]complex128 {
	w := 2 * math.Pi * fHz
	iw := complex(0, w)
	kf, kr, cf, cr, a, b := r.kfNPerM, r.krNPerM, r.cfNsPerM, r.crNsPerM, r.aM, r.bM
	d := [2][2]complex128{
		{complex(kf+kr, 0) + iw*complex(cf+cr, 0) - complex(w*w*r.mKg, 0), complex(-a*kf+b*kr, 0) + iw*complex(-a*cf+b*cr, 0)},
		{complex(-a*kf+b*kr, 0) + iw*complex(-a*cf+b*cr, 0), complex(a*a*kf+b*b*kr, 0) + iw*complex(a*a*cf+b*b*cr, 0) - complex(w*w*r.jKgm2, 0)},
	}
	in := [2][2]complex128{
		{complex(kf, 0) + iw*complex(cf, 0), complex(kr, 0) + iw*complex(cr, 0)},
		{complex(-a*kf, 0) + iw*complex(-a*cf, 0), complex(b*kr, 0) + iw*complex(b*cr, 0)},
	}
	det := d[0][0]*d[1][1] - d[0][1]*d[1][0]
	inv := [2][2]complex128{{d[1][1] / det, -d[0][1] / det}, {-d[1][0] / det, d[0][0] / det}}
	h := make([][]complex128, len(r.sensorsM))
	for k, s := range r.sensorsM {
		h[k] = make([]complex128, 2)
		for j := 0; j < 2; j++ {
			z := inv[0][0]*in[0][j] + inv[0][1]*in[1][j]
			th := inv[1][0]*in[0][j] + inv[1][1]*in[1][j]
			h[k][j] = z - complex(s, 0)*th
		}
	}
	return h
}

// drive says how the two pans move.
type drive int

const (
	independentPans drive = iota // two independent white inputs
	frontOnly                    // rear pan held still
	roadLike                     // rear = front delayed by delayS
)

// rigRecord is a synthetic log: channels pan_f, pan_r, body_front,
// body_rear.
type rigRecord struct {
	fsHz     float64
	channels [][]float64
}

var rigChannels = []string{"pan_f", "pan_r", "body_front", "body_rear"}

// synthRig makes n samples of white pan accelerations (unit variance) and
// the exact periodic responses of sys computed in the frequency domain, then
// adds white measurement noise of outNoise (inNoise) times the RMS of each
// output (input) channel. Seeded PCG.
func synthRig(sys rigSystem, d drive, delayS, fsHz float64, n int, seed uint64, outNoise, inNoise float64) rigRecord {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	u := [2][]float64{make([]float64, n), make([]float64, n)}
	for i := 0; i < n; i++ {
		u[0][i] = rng.NormFloat64()
		if d == independentPans {
			u[1][i] = rng.NormFloat64()
		}
	}
	fft := fourier.NewFFT(n)
	uf := [2][]complex128{fft.Coefficients(nil, u[0]), fft.Coefficients(nil, u[1])}
	if d == roadLike {
		for k := range uf[1] {
			w := 2 * math.Pi * fft.Freq(k) * fsHz
			uf[1][k] = uf[0][k] * cmplx.Exp(complex(0, -w*delayS))
		}
		if n%2 == 0 { // keep the Nyquist bin real so the delayed signal is real
			uf[1][n/2] = complex(real(uf[1][n/2]), 0)
		}
		u[1] = fft.Sequence(nil, uf[1])
		floats.Scale(1/float64(n), u[1])
	}
	ch := [][]float64{u[0], u[1]}
	for s := range sys.sensorsM {
		yf := make([]complex128, len(uf[0]))
		for k := range yf {
			h := sys.frf(fft.Freq(k) * fsHz)
			yf[k] = h[s][0]*uf[0][k] + h[s][1]*uf[1][k]
		}
		if n%2 == 0 {
			yf[n/2] = complex(real(yf[n/2]), 0)
		}
		y := fft.Sequence(nil, yf)
		floats.Scale(1/float64(n), y)
		ch = append(ch, y)
	}
	for c, x := range ch {
		frac := outNoise
		if c < 2 {
			frac = inNoise
		}
		if frac == 0 {
			continue
		}
		rms := math.Sqrt(floats.Dot(x, x) / float64(n))
		for i := range x {
			x[i] += frac * rms * rng.NormFloat64()
		}
	}
	return rigRecord{fsHz: fsHz, channels: ch}
}

// spectraOf runs an Accumulator with cfg over the record in blocks of
// blockLen samples.
func spectraOf(rec rigRecord, cfg Config, blockLen int) (*Spectra, error) {
	acc, err := NewAccumulator(cfg, rigChannels)
	if err != nil {
		return nil, err
	}
	writeBlocks(acc, rec.channels, blockLen)
	return acc.Spectra()
}

func writeBlocks(w BlockWriter, channels [][]float64, blockLen int) {
	n := len(channels[0])
	block := make([][]float64, len(channels))
	for off := 0; off < n; off += blockLen {
		end := min(n, off+blockLen)
		for c, x := range channels {
			block[c] = x[off:end]
		}
		w.Write(block)
	}
}
