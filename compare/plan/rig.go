package plan

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/identify/spectral"
	"github.com/ridemodes/ridemodes/ingest"
)

// RigTest is the conditions of a rig test: what the plan recommends and
// what its prediction and simulation use.
type RigTest struct {
	// RateHz is the logger's sample rate, DurationS the record length.
	RateHz, DurationS float64
	// SegmentSamples is the Welch segment length after the rig route's
	// decimation (the setup's [analysis] segment_samples).
	SegmentSamples int
	// DriveLowHz, DriveHighHz and DriveRMSMPerS2 are the band and RMS pan
	// acceleration of each axle's random drive: independent front and
	// rear, flat acceleration spectrum in the band (simulate.DriveRandom).
	DriveLowHz, DriveHighHz, DriveRMSMPerS2 float64
	// NoiseMPerS2 is the noise sd of each channel at RateHz (white).
	NoiseMPerS2 float64
}

// durationsS are the record lengths a rig plan chooses from: whole
// minutes, spaced about 1.4x.
var durationsS = []float64{60, 90, 120, 180, 240, 300, 420, 600, 900, 1200, 1800, 2400, 3600}

// segmentChoices is how many of the finest admissible Welch segment
// lengths are tried at each record length.
const segmentChoices = 2

// ditherShare is the dither added to the expected FRFs, in error-band sd.
const ditherShare = 1e-3

// expectedRig returns the FRF stage's result that the rig route reaches,
// in expectation, on a log of test t of car v with the given sensors: the
// expected Welch spectra of the pans and sensors (spectral.Expected) and
// the FRFs with their error bands estimated from them
// (spectral.EstimateFRF).
func expectedRig(v compare.Vehicle, sensors []ingest.Sensor, t RigTest, band [2]float64) (*identify.FRFResult, error) {
	q := identify.DecimationFactor(t.RateHz, band[1])
	fs := t.RateHz / float64(q)
	channels := []string{"front", "rear"}
	for _, s := range sensors {
		channels = append(channels, s.Channel)
	}
	nch := len(channels)
	// One-sided densities: the drive flat over its band, the noise white
	// up to the logger's Nyquist frequency (the same density after the
	// decimator, whose passband holds the band).
	guu := t.DriveRMSMPerS2 * t.DriveRMSMPerS2 / (t.DriveHighHz - t.DriveLowHz)
	gnn := t.NoiseMPerS2 * t.NoiseMPerS2 / (t.RateHz / 2)
	h := make([][2]complex128, len(sensors))
	// addTrue adds w times the true one-sided spectral matrix at fHz to
	// dst: G[x_a][x_a] = Guu + Gnn, G[x_a][y_k] = E[conj(X_a) Y_k] = H_ka Guu,
	// G[y_k][y_l] = sum_a conj(H_ka) H_la Guu (+ Gnn when k = l).
	addTrue := func(dst [][]complex128, fHz, w float64) {
		u := 0.0
		if fHz >= t.DriveLowHz && fHz <= t.DriveHighHz {
			u = guu
		}
		for k, s := range sensors {
			h[k][0], h[k][1] = v.Transmissibility(fHz, s.XM)
		}
		uw, nw := complex(u*w, 0), complex(gnn*w, 0)
		for a := range 2 {
			dst[a][a] += uw + nw
			for k := range sensors {
				c := h[k][a] * uw
				dst[a][2+k] += c
				dst[2+k][a] += cmplx.Conj(c)
			}
		}
		for k := range sensors {
			for l := range sensors {
				dst[2+k][2+l] += (cmplx.Conj(h[k][0])*h[l][0] + cmplx.Conj(h[k][1])*h[l][1]) * uw
			}
			dst[2+k][2+k] += nw
		}
	}
	// A Welch estimate is, in expectation, the true matrix smoothed by the
	// window's kernel (modal.WindowKernel): that lowers the coherence at
	// the peaks, and so widens the error bands, as it does on real logs.
	// The kernel's taps lie on a grid of sub steps per bin, on which the
	// true matrix is computed once.
	win, err := spectral.Hann.Values(t.SegmentSamples)
	if err != nil {
		return nil, err
	}
	kernel := modal.WindowKernel(win)
	sub := math.Round(1 / (kernel[1].OffsetBins - kernel[0].OffsetBins))
	reach := int(math.Round(-kernel[0].OffsetBins * sub))
	step := fs / float64(t.SegmentSamples)
	fine := make([][][]complex128, int(sub)*(t.SegmentSamples/2)+reach+1)
	for m := range fine {
		fine[m] = newMatrix(nch)
		addTrue(fine[m], float64(m)*step/sub, 1)
	}
	g := newMatrix(nch)
	expected := func(fHz float64) [][]complex128 {
		at := int(math.Round(fHz / step * sub))
		if !spectral.InBand(band, fHz) {
			return fine[at] // the fit sees the band only
		}
		for i := range g {
			clear(g[i])
		}
		for _, tap := range kernel {
			m := at + int(math.Round(tap.OffsetBins*sub))
			mirror := m < 0 // G(-f) = conj(G(f))
			if mirror {
				m = -m
			}
			w := complex(tap.Weight, 0)
			for i, row := range fine[m] {
				for j, x := range row {
					if mirror {
						x = cmplx.Conj(x)
					}
					g[i][j] += w * x
				}
			}
		}
		return g
	}
	sp, err := spectral.Expected(spectral.Config{FsHz: fs, SegmentLen: t.SegmentSamples, Overlap: t.SegmentSamples / 2,
		Window: spectral.Hann}, channels, int(t.DurationS*fs), expected)
	if err != nil {
		return nil, err
	}
	outputs := make([]int, len(sensors))
	for i := range outputs {
		outputs[i] = 2 + i
	}
	frf, err := spectral.EstimateFRF(sp, []int{0, 1}, outputs, spectral.FRFOptions{BandHz: band})
	if err != nil {
		return nil, err
	}
	// A dither of a thousandth of the error bands (fixed seed) keeps the
	// fit's order sweep regular: FRFs that are exactly a rational function
	// of two modes leave the equations of its higher orders singular. Its
	// share of the fit's chi-square is a millionth: the sd do not see it.
	rng := rand.New(rand.NewPCG(1, 1))
	for _, row := range frf.Pairs {
		for _, pr := range row {
			for k, x := range pr.H {
				if sd := ditherShare * cmplx.Abs(x) * pr.MagRelErr[k]; sd > 0 {
					pr.H[k] += complex(sd*rng.NormFloat64(), sd*rng.NormFloat64())
				}
			}
		}
	}
	return &identify.FRFResult{Spectra: sp, FRF: frf, DecimationFactor: q, InputRateHz: t.RateHz,
		BandLowHz: band[0], BandHighHz: band[1]}, nil
}

func newMatrix(n int) [][]complex128 {
	m := make([][]complex128, n)
	for i := range m {
		m[i] = make([]complex128, n)
	}
	return m
}

// predictRig returns the modes that the rig route's fit finds, in
// expectation, on a log of test t (expectedRig): their values are the
// expected estimates, which the spectral window biases, and their sd the
// random error alone, from the fit's covariance with the FRFs' error
// bands; the fit's budget for the resolution bias is left out, since the
// bias itself is in the values (planner.predicted combines the two).
func predictRig(v compare.Vehicle, sensors []ingest.Sensor, t RigTest, band [2]float64) ([]body.Mode, error) {
	frf, err := expectedRig(v, sensors, t, band)
	if err != nil {
		return nil, err
	}
	set, err := modal.FromSpectral(frf.FRF, frf.Spectra, ingest.SensorPositionsM(sensors))
	if err != nil {
		return nil, err
	}
	set.Kernel = nil
	fit, err := modal.Fit(set, modal.Options{BandLowHz: band[0], BandHighHz: band[1]})
	if err != nil {
		return nil, fmt.Errorf("plan: the fit of the expected FRFs failed (%w); widen the band or check the car's modes", err)
	}
	return fit.Modes, nil
}

// rigKey identifies a rig prediction: the sensor positions and the test.
type rigKey struct {
	positions string
	test      RigTest
}

// rigPrediction is a cached predictRig outcome.
type rigPrediction struct {
	modes []body.Mode
	err   error
}

// predictRig is predictRig for the planner's car and band, each sensor
// layout and test computed once: the searches ask for the same ones again
// as the realism factors change.
func (p *planner) predictRig(sensors []ingest.Sensor, t RigTest) ([]body.Mode, error) {
	key := rigKey{fmt.Sprint(ingest.SensorPositionsM(sensors)), t}
	if c, ok := p.rigCache[key]; ok {
		return c.modes, c.err
	}
	ms, err := predictRig(p.car, sensors, t, p.band)
	if p.rigCache == nil {
		p.rigCache = map[rigKey]rigPrediction{}
	}
	p.rigCache[key] = rigPrediction{ms, err}
	return ms, err
}

// drive returns the rig's drive: the band from the analysis band's lower
// edge to twice its upper edge (what the rig route keeps; below the
// logger's 0.4 fs), at the largest RMS pan acceleration that keeps its
// peaks (4 sd) within the request's acceleration and travel limits. The
// displacement of a flat acceleration density G over f1-f2 has the
// variance G (f1^-3 - f2^-3)/(3 (2 pi)^4).
func (p *planner) drive() (t RigTest, travelM float64) {
	lo, hi := p.band[0], math.Min(2*p.band[1], 0.4*p.rateHz)
	perUnit := math.Sqrt((math.Pow(lo, -3) - math.Pow(hi, -3)) / (3 * (hi - lo) * math.Pow(2*math.Pi, 4)))
	rms := math.Min(p.req.MaxDriveRMSMPerS2, p.req.MaxPanTravelM/(4*perUnit))
	return RigTest{RateHz: p.rateHz, DriveLowHz: lo, DriveHighHz: hi, DriveRMSMPerS2: rms, NoiseMPerS2: p.noise}, 4 * perUnit * rms
}

// segments returns the Welch segment lengths to try for a record of
// durationS, finest first: powers of two whose segments give at least
// identify.FitMinAverages effective averages (k/1.056 for k Hann segments
// at 50 % overlap, package spectral), at most segmentChoices of them.
func (p *planner) segments(durationS float64) []int {
	fs := p.rateHz / float64(identify.DecimationFactor(p.rateHz, p.band[1]))
	samples := int(durationS * fs)
	var out []int
	for n := 1 << 14; n >= 64 && len(out) < segmentChoices; n /= 2 {
		if k := (samples-n)/(n/2) + 1; samples >= n && float64(k)/1.056 >= identify.FitMinAverages {
			out = append(out, n)
		}
	}
	return out
}

// rigAt returns, for sensors and a record of durationS, the test with the
// best of the candidate segment lengths, its asymptotic modes and worst
// ratio predicted/wanted (with the realism factors found so far).
func (p *planner) rigAt(sensors []ingest.Sensor, durationS float64) (RigTest, []body.Mode, float64, error) {
	t, _ := p.drive()
	t.DurationS = durationS
	var (
		best  RigTest
		bestM []body.Mode
		worst = math.Inf(1)
		err   error
	)
	for _, n := range p.segments(durationS) {
		t.SegmentSamples = n
		ms, e := p.predictRig(sensors, t)
		if e != nil {
			err = e
			continue
		}
		if _, w := p.checks(p.predicted(sensors, ms, 1)); w < worst || bestM == nil {
			best, bestM, worst = t, ms, w
		}
	}
	if bestM == nil {
		if err == nil {
			err = fmt.Errorf("plan: %g s at %g Hz is too short for a rig record", durationS, p.rateHz)
		}
		return t, nil, math.NaN(), err
	}
	return best, bestM, worst, nil
}

// rigDurations lists the record lengths from the shortest the rig route
// reads (identify.MinRigRecordS) to the request's longest.
func (p *planner) rigDurations() []float64 {
	var ds []float64
	for _, d := range durationsS {
		if d >= identify.MinRigRecordS(p.band[0]) && d < p.req.MaxDurationS {
			ds = append(ds, d)
		}
	}
	return append(ds, p.req.MaxDurationS)
}

// rigConditions returns the shortest record of rigDurations whose
// prediction meets every wanted sd with the margin, by
// bisection (the worst ratio falls with the record length), or the longest
// when none does.
func (p *planner) rigConditions(sensors []ingest.Sensor) (RigTest, []body.Mode, error) {
	ds := p.rigDurations()
	meets := func(i int) (RigTest, []body.Mode, bool, error) {
		t, ms, w, err := p.rigAt(sensors, ds[i])
		return t, ms, w*Margin <= 1, err
	}
	lo, hi := 0, len(ds)-1
	t, ms, ok, err := meets(hi)
	if err != nil || !ok {
		return t, ms, err
	}
	for lo < hi {
		mid := (lo + hi) / 2
		tm, mm, okm, err := meets(mid)
		if err == nil && okm {
			hi, t, ms = mid, tm, mm
		} else {
			lo = mid + 1
		}
	}
	return t, ms, nil
}

// planRig plans a rig test: the conditions for the given sensors, the
// sensor layout at those conditions, the conditions again for the new
// layout, then the refinement (settle).
func (p *planner) planRig(ctx context.Context) (*Plan, error) {
	t, ms, err := p.rigConditions(p.sensors)
	if err != nil {
		return nil, err
	}
	given := p.sensors
	p.sensors = p.searchLayout(p.sensors, func(s []ingest.Sensor) float64 {
		m, err := p.predictRig(s, t)
		if err != nil {
			return math.Inf(1)
		}
		_, w := p.checks(p.predicted(s, m, 1))
		return w
	})
	if !sameLayout(given, p.sensors) {
		if t, ms, err = p.rigConditions(p.sensors); err != nil {
			return nil, err
		}
	}
	p.rig = t
	ref, ms, err := p.settle(ctx, ms, func() ([]body.Mode, bool, error) {
		t, ms, err := p.rigConditions(p.sensors)
		changed := t != p.rig
		p.rig = t
		return ms, changed, err
	})
	if err != nil {
		return nil, err
	}
	_, travel := p.drive()
	t = p.rig
	fs := t.RateHz / float64(identify.DecimationFactor(t.RateHz, p.band[1]))
	out := &Plan{DurationS: t.DurationS,
		Rig: &RigJSON{SegmentSamples: t.SegmentSamples, ResolutionHz: fs / float64(t.SegmentSamples), DecimatedRateHz: fs,
			BandLowHz: p.band[0], BandHighHz: p.band[1], DriveLowHz: t.DriveLowHz, DriveHighHz: t.DriveHighHz,
			DriveRMSMPerS2: t.DriveRMSMPerS2, PanTravelM: travel, PanPeakAccelMPerS2: 4 * t.DriveRMSMPerS2}}
	out.Prediction = p.predictionJSON(ref, "rig: the expected Welch spectra through the rig route's own FRF error bands "+
		"(Bendat and Piersol) and fit, whose covariance gives the random sd and whose values the window's bias")
	p.finish(out, ms, 1)
	out.Curve = p.rigCurve()
	if !out.Meets {
		out.Warnings = append(out.Warnings, fmt.Sprintf("even %g s does not meet every wanted sd: raise the drive (within the rig's "+
			"limits), quieten the sensors, or accept a larger sd", p.req.MaxDurationS))
	}
	return out, nil
}

// rigCurve returns the ratios predicted/wanted against the record length
// at the planned segment length (or the finest admissible one for records
// too short for it).
func (p *planner) rigCurve() Curve {
	c := Curve{XLabel: "record length [s]", Chosen: p.rig.DurationS}
	for _, d := range p.rigDurations() {
		t := p.rig
		t.DurationS = d
		if segs := p.segments(d); len(segs) == 0 {
			continue
		} else if t.SegmentSamples > segs[0] {
			t.SegmentSamples = segs[0]
		}
		ms, err := p.predictRig(p.sensors, t)
		if err != nil {
			continue
		}
		cs, _ := p.checks(p.predicted(p.sensors, ms, 1))
		c.add(d, cs)
	}
	return c
}

// add appends a point of the curve: the ratio of every check. A point
// where a check has no prediction is left out.
func (c *Curve) add(x float64, cs []Check) {
	for _, ch := range cs {
		if ch.Ratio == nil {
			return
		}
	}
	if len(c.Series) == 0 {
		for _, ch := range cs {
			c.Series = append(c.Series, CurveSeries{Name: ch.Name})
		}
	}
	c.X = append(c.X, x)
	for i, ch := range cs {
		c.Series[i].Ratio = append(c.Series[i].Ratio, *ch.Ratio)
	}
}
