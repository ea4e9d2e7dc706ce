package decay

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"strings"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/lsq"
	"github.com/ridemodes/ridemodes/identify/spectral"
	"github.com/ridemodes/ridemodes/ingest"
)

// Fit defaults and limits.
const (
	DefaultMaxOrder = 20
	// DefaultSettleS is the time after the release (after the last step of
	// the pans, when there are several) that is left out of the fit. The
	// release is not free decay: in a real drop the wheels fall onto the
	// tyres, and the tyre contact and wheel hop (10-15 Hz) ring for a few of
	// their own time constants (at 12 Hz and damping ratio 0.25,
	// 1/(zeta omega) = 0.053 s); the model, by contrast, applies an ideal step.
	// 0.1 s is about two such time constants and under a quarter of a body
	// cycle, so little of the decay is lost.
	DefaultSettleS = 0.1
	// decimatedRatePerBandHz: the log is decimated to about this many times
	// the band's upper edge (200 Hz for 4 Hz) - oversampled enough that the
	// anti-alias filter is short (0.065 s of half-length) and the body modes
	// lie deep in its passband, coarse enough to keep the Hankel matrix and
	// the refinement small.
	decimatedRatePerBandHz = 50
	// minFitSamples is the fewest decimated samples per channel worth a fit
	// with 5 parameters per channel plus four pole parameters.
	minFitSamples = 30
	// bodyModes is the number of modes fitted: bounce and pitch.
	bodyModes = 2
)

// Options set the fit. Zero values take the defaults.
type Options struct {
	// BandLowHz and BandHighHz bound the natural frequencies of the body
	// modes (defaults ingest.DefaultBandLowHz, ingest.DefaultBandHighHz).
	BandLowHz, BandHighHz float64
	// Event is the index (from 0) of the event to analyse; default the first.
	Event int
	// MaxOrder is the highest ERA model order of the sweep (even, at least
	// 4; default DefaultMaxOrder). It is lowered when the window is short.
	MaxOrder int
	// SettleS is the time after the event's last step (the release, unless
	// the axles came off the blocks one after the other) left out of the fit
	// (default DefaultSettleS).
	SettleS float64
	// Detect sets the event detector.
	Detect DetectOptions
}

func (o Options) withDefaults() Options {
	if o.BandLowHz == 0 && o.BandHighHz == 0 {
		o.BandLowHz, o.BandHighHz = ingest.DefaultBandLowHz, ingest.DefaultBandHighHz
	}
	if o.MaxOrder == 0 {
		o.MaxOrder = DefaultMaxOrder
	}
	if o.SettleS == 0 {
		o.SettleS = DefaultSettleS
	}
	o.Detect = o.Detect.withDefaults()
	switch {
	case !(o.BandLowHz > 0 && o.BandHighHz > o.BandLowHz) || math.IsInf(o.BandHighHz, 0):
		panic(fmt.Sprintf("decay: band %g-%g Hz must satisfy 0 < low < high", o.BandLowHz, o.BandHighHz))
	case o.MaxOrder < 4 || o.MaxOrder%2 == 1:
		panic(fmt.Sprintf("decay: MaxOrder %d must be even and at least 4 (two modes)", o.MaxOrder))
	case !(o.SettleS >= 0) || math.IsInf(o.SettleS, 0):
		panic(fmt.Sprintf("decay: settling time %g s must be zero or positive", o.SettleS))
	case o.Event < 0:
		panic(fmt.Sprintf("decay: event index %d is negative", o.Event))
	}
	return o
}

// Curves are the measured and fitted signals over the fit window, for a
// plot: decimated, in the log's units, at the log's times.
type Curves struct {
	TimeS    []float64
	Measured [][]float64 // [channel][sample]
	Fitted   [][]float64
}

// WarningCode classifies a Warning.
type WarningCode string

// Warning codes.
const (
	// WarnUnsettled: the decay had not died into the noise when the log (or
	// the next event) began; the window ends early.
	WarnUnsettled WarningCode = "unsettled"
	// WarnSeveralEvents: the log holds more than one release; one was analysed.
	WarnSeveralEvents WarningCode = "several-events"
	// WarnExtraModes: more than two stable pole groups in the band; the two
	// stable at the most orders were kept.
	WarnExtraModes WarningCode = "extra-modes"
	// WarnNodeUndetermined: a mode's pitch per bounce is zero within
	// body.NodeDeterminedSDs of its sd, so its node is undetermined. (A poor
	// fit, a mode near the band edge and large standard deviations flag the
	// mode instead: body.Mode.Flagged.)
	WarnNodeUndetermined WarningCode = "node-undetermined"
)

// Warning is a condition the user should know about, returned as data.
type Warning struct {
	Code    WarningCode
	Message string
}

// Result is the outcome of Fit.
type Result struct {
	Events     []Event // every release found in the log
	EventIndex int     // the one analysed
	Event      Event
	// WindowStartS and WindowEndS are the log times of the first and last
	// samples fitted.
	WindowStartS, WindowEndS float64
	DecimationFactor         int
	FitRateHz                float64 // sample rate of the fitted samples
	// NoiseInflation is the factor applied to the residual variance for the
	// correlation of the filtered noise (1 without decimation); see Fit.
	NoiseInflation float64
	// Modes are bounce and pitch, sorted by natural frequency and labelled
	// (body.SortAndLabel); RankOneRatio is 0 (no measured input).
	Modes []body.Mode
	// Correlation relates the modes' natural frequencies, damping ratios
	// and pitch per bounce (delta method on the fit's covariance).
	Correlation *body.Correlation
	// MAC is the modal assurance criterion of the two modes' sensor shapes.
	MAC float64
	// NormalisedResidual is sqrt(sum of squared residuals / sum of squared
	// signal about the fitted offsets) over all channels in the window.
	NormalisedResidual float64
	// ResidualSD is the residual standard deviation per channel.
	ResidualSD []float64
	// Offsets are the fitted constants per channel, in the log's units.
	Offsets       []float64
	Order         int // the ERA order whose poles started the refinement
	Iterations    int // Levenberg-Marquardt iterations
	Stabilisation []StabilisationPoint
	Curves        Curves
	// LogDecrement is the one-mode quick estimate per channel.
	LogDecrement []LogDecrement
	// Support is the evidence on which the modes were flagged (see
	// body.Mode.Flagged and the package documentation).
	Support  Support
	Reasons  []string // why the event, window and order were chosen
	Warnings []Warning
}

// Fit finds the releases in a drop-test log of vertical body accelerations
// (channels[c][i], sampled at rateHz, any units) from sensors at
// longitudinal positions posM (m from the CG, positive forward), and fits
// the free decay of the chosen event with two modes of common poles:
//
//  1. Detect the releases; analyse event opt.Event.
//  2. Window: from SettleS after the last step of the event (the release,
//     or for a car rolled off the blocks the rear wheels landing; see
//     Event.Steps) to the rest found by Detect (where the decay has sunk to
//     about 1.6 noise sd).
//  3. Subtract the pre-release rest level, low-pass and decimate to about
//     decimatedRatePerBandHz times the band's upper edge with the Kaiser
//     FIR of package spectral; the first fitted sample is centred
//     max(SettleS, filter half-length) after the last step, so the filter
//     never reaches back before it.
//  4. ERA (eraSweep) for orders 2..MaxOrder with a stabilisation check; the
//     two pole groups stable at the most orders start the refinement.
//  5. Amplitudes and offsets by linear least squares, then a
//     Levenberg-Marquardt refinement of poles, amplitudes and offsets
//     against every fitted sample (expModel); then a refit with each
//     channel weighted by the inverse of its residual sd (reweighted).
//  6. Shapes, heave and pitch by kinematics, labels, MAC; standard
//     deviations from kappa s^2 (J^T J)^-1 by the delta method, where s^2
//     is the weighted residual variance and kappa = 1/(q sum h^2) accounts
//     for the filtered noise: for white sensor noise through taps h and
//     keeping one sample in q, the noise density at the body modes (where
//     |H| = 1) is kappa times that of white noise of the same variance, so
//     the fitted samples count as N/kappa independent ones. The pitch per
//     bounce of a bounce-like shape takes its sd from the profile
//     likelihood (profilePPBSD); Result.Correlation relates the figures.
//  7. The log decrement per channel as a quick, one-mode estimate.
//
// Data problems return errors (*NoEventError, *ConstantChannelError,
// *NonFiniteError, *EventRangeError, *ShortDecayError, *ModeCountError, or a
// numerical failure with a hint). Fewer than two channels, a mismatch of
// posM and channels, sensors at one position or bad options are caller
// mistakes and panic.
func Fit(rateHz float64, channels [][]float64, posM []float64, opt Options) (*Result, error) {
	checkChannels(rateHz, channels)
	checkPositions(posM, len(channels))
	opt = opt.withDefaults()
	for c, x := range channels {
		for i, v := range x {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &NonFiniteError{Channel: c, Index: i}
			}
		}
	}
	events, err := Detect(rateHz, channels, opt.Detect)
	if err != nil {
		return nil, err
	}
	if opt.Event >= len(events) {
		return nil, &EventRangeError{Asked: opt.Event, Found: len(events)}
	}
	ev := events[opt.Event]
	res := &Result{Events: events, EventIndex: opt.Event, Event: ev}
	res.Reasons = append(res.Reasons, fmt.Sprintf(
		"event %d of %d: release at %.3f s, where a channel first departs from rest by more than %g noise sd "+
			"(peak departure %.0f sd)", opt.Event, len(events), ev.ReleaseS, opt.Detect.ThresholdK, ev.PeakDeparture))
	if len(events) > 1 {
		res.Warnings = append(res.Warnings, Warning{WarnSeveralEvents, fmt.Sprintf(
			"the log holds %d releases; release %d (counted from 0) was analysed; --event chooses another", len(events), opt.Event)})
	}
	if !ev.Settled {
		res.Warnings = append(res.Warnings, Warning{WarnUnsettled, fmt.Sprintf(
			"the decay had not sunk into the noise by %.3f s, the end of the log; record longer after the drop", ev.RestS)})
	}

	dec, err := decimateWindow(rateHz, channels, ev, opt)
	if err != nil {
		return nil, err
	}
	res.DecimationFactor, res.FitRateHz, res.NoiseInflation = dec.factor, rateHz/float64(dec.factor), dec.kappa
	res.WindowStartS, res.WindowEndS = dec.tS[0], dec.tS[len(dec.tS)-1]
	after := "release"
	if len(ev.Steps) > 1 {
		at := make([]string, len(ev.Steps))
		for k, i := range ev.Steps {
			at[k] = fmt.Sprintf("%.3f s", float64(i)/rateHz)
		}
		res.Reasons = append(res.Reasons, fmt.Sprintf(
			"the event holds %d steps of the pans, at %s (the body's acceleration jumps at once by more than %g "+
				"times the noise of the jump measure and %.2g of its largest jump in the event, as no free decay does): the car came off the "+
				"blocks one axle after the other, and the decay is free only after the last step",
			len(ev.Steps), strings.Join(at, ", "), opt.Detect.StepThresholdK, stepShare))
		after = "last step"
	}
	res.Reasons = append(res.Reasons, fmt.Sprintf(
		"window %.3f-%.3f s: the first fitted sample lies %.3g s after the %s (the settling time, or the "+
			"anti-alias filter's half-length %.3g s if longer, so that the filter reaches back no further than the "+
			"%s): the %s is not free decay, the wheels land on the tyres; the last lies where the body is "+
			"at rest again (standard deviation over %.3g s within %.3g noise sd: a decay amplitude under about 1.6 sd)",
		res.WindowStartS, res.WindowEndS, math.Max(opt.SettleS, dec.halfLengthS), after, dec.halfLengthS,
		after, after, opt.Detect.RestS, quietFactor))
	if dec.factor > 1 {
		res.Reasons = append(res.Reasons, fmt.Sprintf(
			"decimated by %d to %.4g Hz (low-pass anti-alias filter, Kaiser-window FIR); residual variance scaled by %.4f for the "+
				"filtered noise", dec.factor, res.FitRateHz, dec.kappa))
	}

	dtS := float64(dec.factor) / rateHz
	maxOrder := opt.MaxOrder
	es, ok := newERASetup(len(dec.tS), len(channels), dtS, opt.BandHighHz, maxOrder)
	for !ok && maxOrder > 4 {
		maxOrder -= 2
		es, ok = newERASetup(len(dec.tS), len(channels), dtS, opt.BandHighHz, maxOrder)
	}
	if !ok {
		return nil, dec.shortError(opt.Event, minFitSamples)
	}
	pts, err := eraSweep(dec.y, dtS, es, maxOrder, opt.BandLowHz, opt.BandHighHz)
	if err != nil {
		return nil, err
	}
	res.Stabilisation = pts
	m := expModel{tS: make([]float64, len(dec.tS)), y: dec.y, modes: bodyModes}
	for k := range m.tS {
		m.tS[k] = float64(k) * dtS
	}
	pick, err := choosePair(m, pts, opt.BandLowHz, opt.BandHighHz)
	if err != nil {
		return nil, err
	}
	p, rss, jac := pick.params, pick.rss, pick.jac
	res.Iterations = pick.iterations
	cov, s2, err := m.covariance(jac, rss, dec.kappa)
	if err != nil {
		return nil, err
	}
	// Weighted refit; kept unless its poles leave the band or the data no
	// longer determine its parameters.
	if w := m.channelWeights(p); w != nil {
		mw := m
		mw.weight = w
		pw, rssW, jacW, its := reweighted(mw, p, opt.BandLowHz, opt.BandHighHz)
		res.Iterations += its
		sds := make([]string, len(w))
		for c, wc := range w {
			sds[c] = fmt.Sprintf("%.3g", 1/wc)
		}
		if covW, s2W, errW := mw.covariance(jacW, rssW, dec.kappa); errW == nil {
			m, p, rss, cov, s2 = mw, pw, rssW, covW, s2W
			res.Reasons = append(res.Reasons, fmt.Sprintf(
				"each channel weighted by the inverse of its residual sd (%s, in the log's unit): "+
					"sensors of unequal noise count by their own noise, and the standard deviations follow",
				strings.Join(sds, ", ")))
		} else {
			res.Reasons = append(res.Reasons, fmt.Sprintf(
				"the refit weighted by the channels' residual sd (%s) left parameters undetermined (%v); the "+
					"unweighted fit stands", strings.Join(sds, ", "), errW))
		}
	}
	res.Order = max(pick.groups[0].lowestOrder(), pick.groups[1].lowestOrder())
	res.Reasons = append(res.Reasons, fmt.Sprintf(
		"ERA orders 2-%d (Hankel %d x %d, lag step %.3g s): %d pole groups in the band, %d of them stable; "+
			"of the pairs of the %d leading groups, the one whose refinement leaves the least residual starts from "+
			"groups stable at %d and %d orders (first at order %d), each group's median pole",
		maxOrder, es.blockRows*len(channels), es.cols, float64(es.step)*dtS, pick.nGroups, pick.nStable,
		pick.nTried, pick.groups[0].stableCount(), pick.groups[1].stableCount(), res.Order))
	if pick.nStable > bodyModes {
		res.Warnings = append(res.Warnings, Warning{WarnExtraModes, fmt.Sprintf(
			"%d stable pole groups in %.3g-%.3g Hz; kept the pair that fits the decay best", pick.nStable,
			opt.BandLowHz, opt.BandHighHz)})
	}
	res.Modes, res.Correlation = modesWithSD(m, p, cov, posM, rss, s2)
	res.MAC = body.MAC(res.Modes[0].Shape, res.Modes[1].Shape)
	m = m.unweighted()
	fillCurves(res, m, p, dec, ev)
	res.LogDecrement = make([]LogDecrement, len(channels))
	for c := range channels {
		res.LogDecrement[c] = logDecrement(c, dec.y[c], dtS, ev.NoiseSD[c]*dec.noiseGain, res.Modes)
	}
	res.Support = support(res, m, p, channels, ev, dec)
	flagModes(res, posM, opt)
	res.Warnings = append(res.Warnings, qualityWarnings(res)...)
	return res, nil
}

// checkPositions panics unless there are two or more sensors, one position
// per channel, at two or more distinct positions.
func checkPositions(posM []float64, nch int) {
	if nch < 2 {
		panic(fmt.Sprintf("decay: %d channel(s); a fit of bounce and pitch needs two or more body sensors", nch))
	}
	if len(posM) != nch {
		panic(fmt.Sprintf("decay: %d sensor positions for %d channels", len(posM), nch))
	}
	lo, hi := floats.Min(posM), floats.Max(posM)
	if !(hi > lo) || math.IsInf(hi-lo, 0) {
		panic("decay: the sensors must sit at two or more distinct, finite positions to separate bounce from pitch")
	}
}

// decimated is the fit window after offset removal, filtering and
// decimation.
type decimated struct {
	y           [][]float64 // [channel][sample], rest level removed
	tS          []float64   // log time of each sample
	factor      int
	kappa       float64 // noise variance inflation 1/(q sum h^2)
	noiseGain   float64 // sd of the filtered noise per sd of white input noise, sqrt(sum h^2)
	halfLengthS float64
	rawSamples  int
	rateHz      float64
}

// collector keeps the blocks a spectral.Decimator passes on.
type collector struct{ y [][]float64 }

func (c *collector) Write(block [][]float64) {
	for ch, x := range block {
		c.y[ch] = append(c.y[ch], x...)
	}
}

// decimateWindow cuts the fit window out of the log, removes the rest level
// and decimates it.
func decimateWindow(rateHz float64, channels [][]float64, ev Event, opt Options) (decimated, error) {
	q := max(1, min(int(math.Floor(rateHz/(decimatedRatePerBandHz*opt.BandHighHz))),
		spectral.DecimationFactor(rateHz, opt.BandHighHz)))
	col := &collector{y: make([][]float64, len(channels))}
	d, err := spectral.NewDecimator(q, len(channels), rateHz, col)
	if err != nil {
		panic(err) // q >= 1 and the rate is checked: cannot fail
	}
	taps := d.Taps()
	half := (len(taps) - 1) / 2
	// The first output is centred max(SettleS, half-length) after the last
	// step; its filter reaches back half a length, never before that step.
	i0 := ev.LastStepIndex() + max(int(math.Round(opt.SettleS*rateHz)), half) - half
	i1 := ev.RestIndex + half
	out := decimated{factor: q, halfLengthS: float64(half) / rateHz, rawSamples: max(i1-i0, 0), rateHz: rateHz}
	var h2 float64
	for _, h := range taps {
		h2 += h * h
	}
	out.kappa, out.noiseGain = 1/(float64(q)*h2), math.Sqrt(h2)
	i1 = min(i1, len(channels[0]))
	if i1-i0 < len(taps)+minFitSamples*q {
		return out, out.shortError(opt.Event, minFitSamples)
	}
	block := make([][]float64, len(channels))
	for c, x := range channels {
		block[c] = make([]float64, i1-i0)
		for i := range block[c] {
			block[c][i] = x[i0+i] - ev.RestLevel[c]
		}
	}
	d.Write(block)
	out.y = col.y
	out.tS = make([]float64, len(out.y[0]))
	for k := range out.tS {
		out.tS[k] = float64(i0+half+k*q) / rateHz
	}
	return out, nil
}

func (d decimated) shortError(event, need int) error {
	n := len(d.tS)
	w := 0.0
	if n > 0 {
		w = d.tS[n-1] - d.tS[0]
	} else {
		w = math.Max(float64(d.rawSamples)/d.rateHz-2*d.halfLengthS, 0)
	}
	return &ShortDecayError{WindowS: w, NeedS: float64(need*d.factor) / d.rateHz, Samples: n, NeedSamples: need,
		EventIndex: event}
}

// modesWithSD builds the modes from the refined parameters and their
// covariance (delta method), with heave and pitch by the sensors'
// kinematics (body.Kinematics), sorts them by frequency and labels them
// (body.SortAndLabel). The pitch per bounce of a shape whose node lies
// beyond the sensors' reach takes its sd from the profile likelihood
// (profilePPBSD; rss and s2 as there), its node's sd following. It also
// returns the correlation of the modes' natural frequencies, damping
// ratios and pitch per bounce, by the delta method.
func modesWithSD(m expModel, p []float64, cov *mat.SymDense, posM []float64, rss, s2 float64) ([]body.Mode,
	*body.Correlation) {
	nch := m.nch()
	kin := body.NewKinematics(posM)
	np := m.params()
	ms := make([]body.Mode, m.modes)
	// grads[r] holds the gradients of mode r's natural frequency, damping
	// ratio and pitch per bounce.
	grads := make([][3][]float64, m.modes)
	for r := range ms {
		lam := m.pole(p, r)
		w := cmplx.Abs(lam)
		sig, om := -real(lam), imag(lam)
		md := body.Mode{Pole: lam, NaturalFrequencyHz: w / (2 * math.Pi), DampedFrequencyHz: om / (2 * math.Pi),
			DampingRatio: sig / w}
		psi := make([]complex128, nch)
		for c := range psi {
			psi[c] = m.amplitude(p, r, c)
		}
		z, th := kin.HeavePitch(psi)
		md.HeaveAndPitch = [2]complex128{1, th / z}
		md.Shape = make([]complex128, nch)
		for c := range psi {
			md.Shape[c] = psi[c] / z
		}
		ppb, gp := pitchPerBounce(m, kin, p, r)
		md.PitchPerBounceRadPerM = ppb
		md.NodeM = kin.NodeM(ppb)
		// Gradients with respect to the parameter vector (for the
		// amplitudes' part see pitchPerBounce; besides, d Im f/da = Im f'/2
		// and d Im f/db = -Re f'/2).
		gf := make([]float64, np)
		gz := make([]float64, np)
		gd := make([]float64, np)
		gf[2*r], gf[2*r+1] = sig/(w*2*math.Pi), om/(w*2*math.Pi)
		gz[2*r], gz[2*r+1] = om*om/(w*w*w), -sig*om/(w*w*w)
		gd[2*r+1] = 1 / (2 * math.Pi)
		grads[r] = [3][]float64{gf, gz, gp}
		sdPPB := quadSD(gp, cov)
		if math.Abs(kin.ReachM*ppb) <= 1 {
			sdPPB = profilePPBSD(m, kin, p, r, rss, s2, ppb, sdPPB)
		}
		md.SD = body.SD{
			NaturalFrequencyHz:    quadSD(gf, cov),
			DampedFrequencyHz:     quadSD(gd, cov),
			DampingRatio:          quadSD(gz, cov),
			PitchPerBounceRadPerM: sdPPB,
			NodeM:                 sdPPB / (ppb * ppb),
		}
		gRe, gIm := make([]float64, np), make([]float64, np)
		for k := range psi {
			for c := range psi {
				// d(psi_k/z)/d psi_c = (delta_kc - Shape[k] ZWeights[c])/z.
				d := -md.Shape[k] * complex(kin.ZWeights[c], 0) / z
				if c == k {
					d += 1 / z
				}
				i := m.ampIndex(r, c)
				gRe[i], gRe[i+1] = real(d)/2, imag(d)/2
				gIm[i], gIm[i+1] = imag(d)/2, -real(d)/2
			}
			md.SD.ShapeRe = append(md.SD.ShapeRe, quadSD(gRe, cov))
			md.SD.ShapeIm = append(md.SD.ShapeIm, quadSD(gIm, cov))
		}
		ms[r] = md
	}
	body.SortAndLabel(ms)
	var names []string
	var gs [][]float64
	for _, md := range ms {
		for r := range grads {
			if m.pole(p, r) != md.Pole {
				continue
			}
			for k, key := range []string{body.FigureNaturalFrequency, body.FigureDampingRatio, body.FigurePitchPerBounce} {
				names = append(names, body.FigureName(md.Label, key))
				gs = append(gs, grads[r][k])
			}
		}
	}
	fc := make([][]float64, len(gs))
	for i, gi := range gs {
		fc[i] = make([]float64, len(gs))
		for j, gj := range gs {
			fc[i][j] = mat.Inner(mat.NewVecDense(np, gi), cov, mat.NewVecDense(np, gj))
		}
	}
	return ms, body.CorrelationOf(names, fc)
}

// quadSD returns sqrt(g^T C g).
func quadSD(g []float64, cov *mat.SymDense) float64 {
	v := mat.NewVecDense(len(g), g)
	return math.Sqrt(math.Max(mat.Inner(v, cov, v), 0))
}

// fillCurves stores the measured and fitted curves (log units), the
// offsets, the residual per channel and the normalised residual.
func fillCurves(res *Result, m expModel, p []float64, dec decimated, ev Event) {
	nch := m.nch()
	resid := make([]float64, m.rows())
	m.evaluate(resid, nil, p)
	res.Curves = Curves{TimeS: dec.tS, Measured: make([][]float64, nch), Fitted: make([][]float64, nch)}
	res.Offsets = make([]float64, nch)
	res.ResidualSD = make([]float64, nch)
	var rss, sig float64
	for c := 0; c < nch; c++ {
		res.Offsets[c] = p[m.offIndex(c)] + ev.RestLevel[c]
		res.Curves.Measured[c] = make([]float64, len(m.tS))
		res.Curves.Fitted[c] = make([]float64, len(m.tS))
		var rc float64
		for k := range m.tS {
			e := resid[k*nch+c]
			res.Curves.Measured[c][k] = m.y[c][k] + ev.RestLevel[c]
			res.Curves.Fitted[c][k] = res.Curves.Measured[c][k] + e
			rc += e * e
			s := m.y[c][k] - p[m.offIndex(c)]
			sig += s * s
		}
		rss += rc
		res.ResidualSD[c] = math.Sqrt(rc / float64(len(m.tS)))
	}
	res.NormalisedResidual = math.Sqrt(rss / sig)
}

func qualityWarnings(res *Result) []Warning {
	var ws []Warning
	for _, md := range res.Modes {
		if md.NodeUndetermined() {
			ws = append(ws, Warning{WarnNodeUndetermined, fmt.Sprintf(
				"%s: pitch per bounce %.3g +- %.2g rad/m is zero within %d sd; the node is undetermined",
				md.Label, md.PitchPerBounceRadPerM, md.SD.PitchPerBounceRadPerM, body.NodeDeterminedSDs)})
		}
	}
	return ws
}

// pairCandidates is how many leading pole groups choosePair tries in pairs.
const pairCandidates = 4

// pairChoice is the refined pair of modes chosen by choosePair.
type pairChoice struct {
	groups                   [2]poleGroup
	params                   []float64
	rss                      float64
	jac                      *mat.Dense
	iterations               int
	nGroups, nStable, nTried int
}

// choosePair starts the refinement from every pair of the pairCandidates
// leading pole groups (stable groups first, see groupPoles) and keeps the
// pair whose refined model has the least residual with both poles physical
// (damping ratio in (0, 1)), distinct and in the band. Trying pairs guards
// against a noise pole that happens to stabilise: the data, not the count
// of orders, decide between candidates.
func choosePair(m expModel, pts []StabilisationPoint, loHz, hiHz float64) (*pairChoice, error) {
	groups := groupPoles(pts)
	nStable := 0
	for _, g := range groups {
		if g.stableCount() > 0 {
			nStable++
		}
	}
	if len(groups) < bodyModes {
		return nil, &ModeCountError{Found: len(groups), BandLowHz: loHz, BandHighHz: hiHz, Stage: "stabilisation"}
	}
	nTry := min(len(groups), pairCandidates)
	var best *pairChoice
	for i := 0; i < nTry; i++ {
		for j := i + 1; j < nTry; j++ {
			p := make([]float64, m.params())
			for r, g := range []poleGroup{groups[i], groups[j]} {
				lam := g.representative().pole
				p[2*r], p[2*r+1] = -real(lam), imag(lam)
			}
			if m.linearStart(p) != nil {
				continue
			}
			// A start that runs out of iterations (lsq.ErrMaxIterations)
			// still competes with the fit it reached.
			lm, _ := lsq.Minimize(m.evaluate, m.rows(), p, lsq.Settings{})
			if !physicalPair(m, p, loHz, hiHz) {
				continue
			}
			if best == nil || lm.Cost < best.rss {
				best = &pairChoice{groups: [2]poleGroup{groups[i], groups[j]}, params: p, rss: lm.Cost, jac: lm.J,
					iterations: lm.Iterations}
			}
		}
	}
	if best == nil {
		return nil, &ModeCountError{Found: 1, BandLowHz: loHz, BandHighHz: hiHz, Stage: "refinement"}
	}
	best.nGroups, best.nStable, best.nTried = len(groups), nStable, nTry
	return best, nil
}

// reweighted refits the unweighted solution p with the channel weights of m
// set (feasible generalised least squares: each channel weighted by the
// inverse of its residual sd, so that a noisy sensor counts for less and
// the covariance holds for sensors of unequal noise). It returns the
// solution, its weighted cost and Jacobian and the iterations taken. A
// refit whose poles leave the band or stop being physical (physicalPair) is
// not taken: p is kept, with its weighted cost and Jacobian.
func reweighted(m expModel, p []float64, loHz, hiHz float64) ([]float64, float64, *mat.Dense, int) {
	q := slices.Clone(p)
	lm, _ := lsq.Minimize(m.evaluate, m.rows(), q, lsq.Settings{})
	if physicalPair(m, q, loHz, hiHz) {
		return q, lm.Cost, lm.J, lm.Iterations
	}
	res := make([]float64, m.rows())
	jac := mat.NewDense(m.rows(), m.params(), nil)
	m.evaluate(res, jac, p)
	return p, floats.Dot(res, res), jac, lm.Iterations
}

// samePoleTol: two refined poles closer than this fraction of their modulus
// are one mode fitted twice.
const samePoleTol = 0.01

// physicalPair reports whether both refined poles are oscillating, stable,
// in the band and distinct.
func physicalPair(m expModel, p []float64, loHz, hiHz float64) bool {
	for r := 0; r < bodyModes; r++ {
		lam := m.pole(p, r)
		w := cmplx.Abs(lam)
		fn, zeta := w/(2*math.Pi), -real(lam)/w
		if !(imag(lam) > 0 && zeta > 0 && zeta < 1) || fn < loHz || fn > hiHz {
			return false
		}
	}
	l0, l1 := m.pole(p, 0), m.pole(p, 1)
	return cmplx.Abs(l0-l1) > samePoleTol*cmplx.Abs(l0)
}
