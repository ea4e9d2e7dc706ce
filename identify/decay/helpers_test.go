package decay

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

// scenario is one synthetic drop test with known truth: an invented car
// (compare.Vehicle), its sensors, the log conditions and per-channel offsets
// added on top of simulate's common offset.
type scenario struct {
	car     compare.Vehicle
	sensors []ingest.Sensor
	opt     simulate.Options
	extra   []float64 // per-channel DC offsets [m/s^2]
}

// Ranges of the accuracy scenarios (the brief's test conditions).
const (
	minTruthZeta, maxTruthZeta      = 0.1, 0.4
	minSeparation, maxSeparation    = 0.15, 0.40 // f2/f1 - 1
	truthBandLowHz, truthBandHighHz = 0.9, 2.6
	scenarioNoise                   = 0.02 // of each channel's peak
)

// randomScenario draws an invented car whose damped modes (the truth, from
// compare.Vehicle.DampedModes) have damping ratios in [0.1, 0.4] and
// natural frequencies 15-40 % apart inside 0.9-2.6 Hz, by rejection from
// seeded draws. Sensors sit inboard of the axles (never at them).
func randomScenario(seed uint64, rateHz float64) scenario {
	rng := rand.New(rand.NewPCG(seed, 0x64726f70))
	u := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	for {
		m := u(1100, 1900)
		a, b := u(0.95, 1.45), u(1.15, 1.65)
		gyr := u(1.0, 1.45)
		fb := u(1.0, 1.9)
		ratio := u(1.1, 1.5)
		if rng.IntN(2) == 0 {
			ratio = 1 / ratio
		}
		split := u(0.75, 1.25)
		kTot := m * sq(2*math.Pi*fb)
		kf, kr := kTot*split/(1+split), kTot/(1+split)
		j := m * gyr * gyr
		fp := fb * ratio
		// Pitch inertia and geometry set the pitch frequency: scale the rates'
		// moment arm through J.
		j = (a*a*kf + b*b*kr) / sq(2*math.Pi*fp)
		zt := u(0.08, 0.45)
		cTot := 2 * zt * math.Sqrt(kTot*m)
		cs := u(0.7, 1.4)
		car := compare.Vehicle{MassKg: m, PitchInertiaKgm2: j, CGToFrontM: a, CGToRearM: b,
			FrontRateNPerM: kf, RearRateNPerM: kr,
			FrontDampingNsPerM: cTot * cs / (1 + cs), RearDampingNsPerM: cTot / (1 + cs)}
		ms, err := car.DampedModes()
		if err != nil {
			continue
		}
		sep := ms[1].NaturalFrequencyHz/ms[0].NaturalFrequencyHz - 1
		ok := sep >= minSeparation && sep <= maxSeparation
		for _, md := range ms {
			ok = ok && md.DampingRatio >= minTruthZeta && md.DampingRatio <= maxTruthZeta &&
				md.NaturalFrequencyHz >= truthBandLowHz && md.NaturalFrequencyHz <= truthBandHighHz
		}
		if !ok {
			continue
		}
		sensors := []ingest.Sensor{{Channel: "front", XM: a - u(0.15, 0.4)}, {Channel: "rear", XM: -b + u(0.15, 0.4)}}
		if rng.IntN(3) == 0 {
			sensors = append(sensors, ingest.Sensor{Channel: "mid", XM: u(-0.4, 0.4)})
		}
		o := simulate.Defaults("drop")
		o.RateHz, o.Seed, o.NoiseFraction = rateHz, seed, scenarioNoise
		o.OffsetMPerS2 = u(-1, 1)
		o.DurationS, o.PreTriggerS, o.DropHeightM = 10, u(0.8, 1.5), u(0.03, 0.06)
		extra := make([]float64, len(sensors))
		for i := range extra {
			extra[i] = u(-0.5, 0.5)
		}
		return scenario{car: car, sensors: sensors, opt: o, extra: extra}
	}
}

func sq(x float64) float64 { return x * x }

// Rear delays of the roll-off scenarios: wheelbase / rolling speed for a
// car pushed off the blocks at walking pace (about 2.5-3 m at 3.5-14 km/h).
const minRearDelayS, maxRearDelayS = 0.2, 0.8

// rollOffScenario is randomScenario's car, sensors and log conditions,
// rolled forward off the blocks instead of dropped at once: the rear axle
// drops a seeded delay in [minRearDelayS, maxRearDelayS] after the front
// (drawn from a stream of its own, so the car is the same).
func rollOffScenario(seed uint64, rateHz float64) scenario {
	s := randomScenario(seed, rateHz)
	rng := rand.New(rand.NewPCG(seed, 0x726f6c6c))
	s.opt.RearDelayS = minRearDelayS + (maxRearDelayS-minRearDelayS)*rng.Float64()
	return s
}

// freeState is the body state (compare.State, from the final static
// equilibrium) at which the free decay begins: just after the step of both
// axles, or for a car rolled off the blocks just after the rear step,
// exp(A tau) StepState(-h, 0) + StepState(0, -h) (the front step's response
// propagated over the delay tau, plus the rear step's jump).
func (s scenario) freeState() compare.State {
	h := s.opt.DropHeightM
	if s.opt.RearDelayS == 0 {
		return s.car.StepState(-h, -h)
	}
	var at, phi mat.Dense
	at.Scale(s.opt.RearDelayS, s.car.StateMatrix())
	phi.Exp(&at)
	front, rear := s.car.StepState(-h, 0), s.car.StepState(0, -h)
	var x compare.State
	for r := range x {
		x[r] = rear[r]
		for c := range front {
			x[r] += phi.At(r, c) * front[c]
		}
	}
	return x
}

// log simulates the scenario and returns the channels and sensor positions.
func (s scenario) log(t testing.TB) ([][]float64, []float64) {
	t.Helper()
	lg, err := simulate.Drop(s.car, s.sensors, s.opt)
	if err != nil {
		t.Fatal(err)
	}
	ch := make([][]float64, len(lg.Columns))
	pos := make([]float64, len(s.sensors))
	for i, c := range lg.Columns {
		ch[i] = c.Data
		for k := range ch[i] {
			ch[i][k] += s.extra[i]
		}
		pos[i] = s.sensors[i].XM
	}
	return ch, pos
}

// truth returns the model's damped modes, sorted by natural frequency.
func (s scenario) truth(t testing.TB) []compare.Mode {
	t.Helper()
	ms, err := s.car.DampedModes()
	if err != nil {
		t.Fatal(err)
	}
	return ms
}

// modeShare returns, for each damped mode of the car sorted by natural
// frequency, the largest over sensors of the mode's initial acceleration
// amplitude 2|lambda^2 c (v_z - s v_theta)| divided by that sensor's peak
// absolute acceleration, for the drop of the scenario: how strongly the drop
// excites the mode where it is best seen. The amplitudes are those at the
// start of the free decay (freeState). The modal decomposition is that of
// compare.FreeResponse (right and left eigenvectors of the state matrix).
func (s scenario) modeShare(t testing.TB, peaks []float64) [2]float64 {
	t.Helper()
	x0 := s.freeState()
	var eig mat.Eigen
	if !eig.Factorize(s.car.StateMatrix(), mat.EigenBoth) {
		t.Fatal("eigen")
	}
	var r, l mat.CDense
	eig.VectorsTo(&r)
	eig.LeftVectorsTo(&l)
	type mc struct {
		fn   float64
		amps []float64
	}
	var ms []mc
	for i, lam := range eig.Values(nil) {
		if imag(lam) <= 0 {
			continue
		}
		var uhx, uhv complex128
		for k := 0; k < 4; k++ {
			u := cmplx.Conj(l.At(k, i))
			uhx += u * complex(x0[k], 0)
			uhv += u * r.At(k, i)
		}
		c := uhx / uhv
		m := mc{fn: cmplx.Abs(lam) / (2 * math.Pi)}
		for _, sn := range s.sensors {
			m.amps = append(m.amps, 2*cmplx.Abs(lam*lam*c*(r.At(0, i)-complex(sn.XM, 0)*r.At(1, i))))
		}
		ms = append(ms, m)
	}
	if ms[1].fn < ms[0].fn {
		ms[0], ms[1] = ms[1], ms[0]
	}
	var out [2]float64
	for i, m := range ms {
		for k, a := range m.amps {
			out[i] = math.Max(out[i], a/peaks[k])
		}
	}
	return out
}
