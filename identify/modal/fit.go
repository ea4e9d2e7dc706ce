package modal

import (
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/lsq"
)

// Defaults and limits of Fit.
const (
	// DefaultMaxOrder is the highest LSCF denominator degree swept.
	DefaultMaxOrder = 16
	// minStableOrders is the number of orders at which a pole must be
	// stable to count as a mode.
	minStableOrders = 2
	// binsPerParameter is the least number of real data per fitted
	// parameter of one FRF.
	binsPerParameter = 2
	// poorResidual and poorChiSquare trigger WarnPoorFit (a chi-square over
	// maxChiSquare flags the modes instead).
	poorResidual  = 0.1
	poorChiSquare = 4.0
	// lowCoherence triggers WarnLowCoherence (mean multiple coherence in the band).
	lowCoherence = 0.8
	// notRankOne triggers WarnNotRankOne (second over first singular value
	// of a mode's residue matrix).
	notRankOne = 0.3
	// quickBandFactorLow and quickBandFactorHigh widen the quick estimate's
	// peak range into the default fit band.
	quickBandFactorLow  = 0.5
	quickBandFactorHigh = 2.0
)

// Options tune Fit. BandLowHz and BandHighHz are required unless both are
// zero, in which case the band is [0.5 f_lo, 2 f_hi] around the quick
// estimate's peaks found over all bins.
type Options struct {
	BandLowHz, BandHighHz float64
	MaxOrder              int // highest LSCF order swept; 0 means DefaultMaxOrder
	// OmitUpperResidual and OmitLowerResidual drop the residual terms for
	// modes above and below the band from the model.
	OmitUpperResidual, OmitLowerResidual bool
}

// Stabilisation is the stabilisation chart data of the LSCF order sweep.
type Stabilisation struct {
	MinOrder, MaxOrder int
	Points             []StabilisationPoint
}

// Result is the outcome of Fit.
type Result struct {
	// Modes are the two body modes, sorted by natural frequency and labelled
	// (body.SortAndLabel), with RankOneRatio filled.
	Modes []body.Mode
	// MAC is the modal assurance criterion of the two modes' sensor shapes.
	MAC float64
	// NormalisedResidual is sqrt(sum |H - H_model|^2 / sum |H|^2) over every
	// FRF in the band.
	NormalisedResidual float64
	// ChiSquarePerDOF is the whitened residual sum of squares per degree of
	// freedom; about 1 when the error bands are right and the model fits.
	ChiSquarePerDOF float64
	// CoherenceInBand is the mean multiple coherence of each output over the
	// band (NaN when the set carries no coherence).
	CoherenceInBand []float64
	BandLowHz       float64
	BandHighHz      float64
	BinsUsed        int
	Stabilisation   Stabilisation
	// Order is the LSCF order whose poles started the refinement; OrderReason
	// says why.
	Order       int
	OrderReason string
	// Iterations of the Levenberg-Marquardt refinement.
	Iterations int
	// UpperResidual and LowerResidual are the fitted residual terms per
	// FRF [output][input] (zero when omitted).
	UpperResidual, LowerResidual [][]float64
	Quick                        []QuickMode
	Warnings                     []Warning
	// ResolutionBias is, per mode (Modes order), the expected bias of the
	// estimate that the spectral window's smoothing of the FRFs causes
	// (resolutionBias); zero when the set carries no Kernel. Its size is in
	// each of the mode's standard deviations.
	ResolutionBias []ModeBias

	model  poleResidue // the refined model, for ModelFRF
	theta  []float64
	inputs int
}

// ModelFRF returns the fitted model's FRF from input in to output out (the
// FRFSet's order) at freqHz > 0: the two modes' pole-residue terms plus the
// residual terms, for setting the fit beside the measured FRF.
func (r *Result) ModelFRF(out, in int, freqHz float64) complex128 {
	bs := make([]complex128, r.model.perPair())
	r.model.basis(bs, r.model.poles(r.theta), 2*math.Pi*freqHz)
	var h complex128
	for k, c := range r.model.pairParams(r.theta, out*r.inputs+in) {
		h += complex(c, 0) * bs[k]
	}
	return h
}

// Fit identifies the two body modes from all FRFs of set with common poles:
//
//  1. the quick estimate (QuickEstimate) on the band, kept in the result;
//  2. the LSCF estimator (see lscfPoles) swept over orders 2..MaxOrder, with
//     each pole classified against the previous order (stabilisation);
//     physical poles (stable, damping ratio in (0, 1), inside the band) that
//     are stable in frequency, damping and shape (MAC of the LSCF shapes,
//     StabilityMAC) at two or more orders are grouped by frequency and the
//     two groups stable at the most orders are the body modes;
//  3. residues and residual terms by weighted linear least squares at those
//     poles, then a Levenberg-Marquardt refinement of poles, residues and
//     residual terms together, each bin weighted by 1/SigmaAbs: this removes
//     the damping bias of the linearised LSCF equation error (De Troyer et al.);
//  4. shapes from the dominant left singular vector of each mode's residue
//     matrix, heave and pitch by kinematics, labels, MAC, fit quality, and
//     standard deviations from the covariance (package documentation) by the
//     delta method with central differences (gonum's diff/fd), with the
//     resolution bias of the set's window (resolutionBias) in quadrature.
//
// Data problems return errors: *BinCountError (too few usable bins),
// *ModeCountError (fewer than two modes), and others with a hint. Sensor
// positions that do not span two distinct positions are a caller mistake
// and panic.
func Fit(set *FRFSet, opt Options) (*Result, error) {
	set.check()
	checkPositions(set.OutputPosM)
	if opt.MaxOrder == 0 {
		opt.MaxOrder = DefaultMaxOrder
	}
	if opt.MaxOrder < 4 {
		panic(fmt.Sprintf("modal: MaxOrder %d cannot hold two modes; use 4 or more", opt.MaxOrder))
	}
	res := &Result{}
	lo, hi := opt.BandLowHz, opt.BandHighHz
	if lo == 0 && hi == 0 {
		var err error
		if lo, hi, err = defaultBand(set); err != nil {
			return nil, err
		}
	}
	if !(hi > lo && lo > 0) {
		panic(fmt.Sprintf("modal: fit band %g-%g Hz must satisfy 0 < low < high", lo, hi))
	}
	res.BandLowHz, res.BandHighHz = lo, hi
	var qw []Warning
	res.Quick, qw = QuickEstimate(set, lo, hi)
	res.Warnings = append(res.Warnings, qw...)

	b, skipped := newBand(set, lo, hi)
	res.BinsUsed = len(b.bins)
	if skipped > 0 {
		res.Warnings = append(res.Warnings, Warning{WarnSkippedBins, fmt.Sprintf(
			"%d bins in %.3g-%.3g Hz have NaN or non-positive error bands and were left out", skipped, lo, hi)})
	}
	pr := poleResidue{b: b, modes: 2, upper: !opt.OmitUpperResidual, lower: !opt.OmitLowerResidual}
	need := max(pr.perPair()*binsPerParameter, opt.MaxOrder+2)
	if len(b.bins) < need {
		return nil, &BinCountError{Usable: len(b.bins), Need: need, BandLowHz: lo, BandHighHz: hi}
	}

	pts, reached, err := stabilise(b, opt.MaxOrder)
	if err != nil {
		return nil, err
	}
	res.Stabilisation = Stabilisation{MinOrder: 2, MaxOrder: reached, Points: pts}
	clusters := stableClusters(pts, PoleStable)
	if len(clusters) < 2 {
		// Heavily damped, close modes: the damping of one pole may wander by
		// more than StabilityDampingTol from order to order while its
		// frequency and shape hold. Its frequency-stable poles start the
		// refinement, which settles the damping.
		if fc := stableClusters(pts, PoleFrequencyStable); len(fc) >= 2 {
			clusters = fc
			res.Warnings = append(res.Warnings, Warning{WarnFrequencyStableOnly, fmt.Sprintf(
				"fewer than two poles in %.3g-%.3g Hz were stable in damping across model orders; the refinement "+
					"started from poles stable in frequency and shape only (%d and %d orders)", lo, hi,
				len(fc[0].members), len(fc[1].members))})
		}
	}
	if len(clusters) < 2 {
		return nil, &ModeCountError{Found: len(clusters), BandLowHz: lo, BandHighHz: hi, Stage: "stabilisation"}
	}
	if len(clusters) > 2 {
		res.Warnings = append(res.Warnings, Warning{WarnExtraModes, fmt.Sprintf(
			"%d stable physical poles in %.3g-%.3g Hz; kept the two stable at the most orders (%d and %d of %d)",
			len(clusters), lo, hi, len(clusters[0].members), len(clusters[1].members), reached-1)})
	}
	theta := make([]float64, pr.params())
	for r, c := range clusters[:2] {
		p := c.representative().Pole
		theta[2*r], theta[2*r+1] = real(p), imag(p)
	}
	res.Order = max(clusters[0].lowestOrder(), clusters[1].lowestOrder())
	res.OrderReason = fmt.Sprintf(
		"LSCF order %d is the lowest at which both body poles are stable; they are stable at %d and %d of orders 2-%d "+
			"(the starting poles are each group's median); the refined model has 2 modes and %s",
		res.Order, len(clusters[0].members), len(clusters[1].members), reached, residualText(pr))
	if reached < opt.MaxOrder {
		res.OrderReason += fmt.Sprintf("; the sweep ended at order %d of %d, where the equations became singular (the data hold no more poles)",
			reached, opt.MaxOrder)
	}

	if err := pr.linearResidues(theta); err != nil {
		return nil, err
	}
	// Running out of iterations (lsq.ErrMaxIterations) still leaves the best
	// fit found; the checks below and the quality warnings judge it.
	lm, _ := lsq.Minimize(pr.residualsAndJacobian, pr.rows(), theta, lsq.Settings{})
	res.Iterations = lm.Iterations
	res.model, res.theta, res.inputs = pr, theta, set.inputs()
	found := 0
	for _, l := range pr.poles(theta) {
		w := cmplx.Abs(l)
		if z := -real(l) / w; z > 0 && z < 1 && imag(l) > 0 && w/(2*math.Pi) >= lo && w/(2*math.Pi) <= hi {
			found++
		}
	}
	if found < 2 {
		return nil, &ModeCountError{Found: found, BandLowHz: lo, BandHighHz: hi, Stage: "refinement"}
	}
	// The resolution bias (a second fit, to smoothed FRFs) needs nothing of
	// the covariance: the two run side by side, each as it would alone.
	var bias [][]float64
	var wg sync.WaitGroup
	if set.Kernel != nil {
		wg.Go(func() { bias = pr.resolutionBias(theta, set.Kernel) })
	}
	cov, chi2, err := pr.covariance(lm.J, lm.Cost)
	wg.Wait()
	if err != nil {
		return nil, err
	}
	res.ChiSquarePerDOF = chi2
	res.Modes, res.ResolutionBias = pr.modesWithSD(theta, cov, bias)
	res.MAC = body.MAC(res.Modes[0].Shape, res.Modes[1].Shape)
	res.UpperResidual, res.LowerResidual = pr.residualTerms(theta)
	res.NormalisedResidual = pr.normalisedResidual(theta)
	res.CoherenceInBand = coherenceInBand(set, b.bins)
	res.Warnings = append(res.Warnings, qualityWarnings(res, set.OutputNames)...)
	flagModes(res, set.OutputPosM)
	return res, nil
}

func residualText(pr poleResidue) string {
	switch {
	case pr.upper && pr.lower:
		return "an upper and a lower residual term per FRF"
	case pr.upper:
		return "an upper residual term per FRF"
	case pr.lower:
		return "a lower residual term per FRF"
	}
	return "no residual terms"
}

// defaultBand returns the band around the quick estimate's peaks over all bins.
func defaultBand(set *FRFSet) (lo, hi float64, err error) {
	f := set.FreqHz
	var first float64
	for _, v := range f {
		if v > 0 {
			first = v
			break
		}
	}
	qm, _ := QuickEstimate(set, first, f[len(f)-1])
	if len(qm) == 0 {
		return 0, 0, fmt.Errorf("no CMIF peak in %.3g-%.3g Hz to centre a default band on; "+
			"give the band (BandLowHz, BandHighHz) and check the coherence of the FRFs", first, f[len(f)-1])
	}
	lo = math.Max(first, quickBandFactorLow*qm[0].PeakHz)
	hi = math.Min(f[len(f)-1], quickBandFactorHigh*qm[len(qm)-1].PeakHz)
	return lo, hi, nil
}

func checkPositions(s []float64) {
	for _, v := range s {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			panic(fmt.Sprintf("modal: sensor position %g m is not finite", v))
		}
		if v != s[0] {
			return
		}
	}
	panic("modal: the sensors must sit at two or more distinct positions to separate heave from pitch")
}

// residueMatrix returns mode r's residues as an outputs x inputs matrix.
func (pr poleResidue) residueMatrix(theta []float64, r int) [][]complex128 {
	no, ni := pr.b.set.outputs(), pr.b.set.inputs()
	m := make([][]complex128, no)
	for o := range no {
		m[o] = make([]complex128, ni)
		for i := range ni {
			c := pr.pairParams(theta, o*ni+i)
			m[o][i] = complex(c[2*r], c[2*r+1])
		}
	}
	return m
}

// modeQuantities returns, per mode r, the vector (fn, fd, zeta, pitch per
// bounce, node, Re shape_k..., Im shape_k...) of the parameters theta, with
// the shape scaled to z = 1 and heave and pitch by kin (the sensors'
// kinematics). It is the function the delta method differentiates.
func (pr poleResidue) modeQuantities(theta []float64, r int, kin body.Kinematics) []float64 {
	l := pr.pole(theta, r)
	w := cmplx.Abs(l)
	psi, _ := pr.shape(theta, r)
	z, th := kin.HeavePitch(psi)
	ratio := th / z
	q := []float64{w / (2 * math.Pi), imag(l) / (2 * math.Pi), -real(l) / w, real(ratio), kin.NodeM(real(ratio))}
	for _, v := range psi {
		q = append(q, real(v/z))
	}
	for _, v := range psi {
		q = append(q, imag(v/z))
	}
	return q
}

// shape returns the dominant left singular vector of mode r's residue
// matrix and the ratio of its second to first singular value.
func (pr poleResidue) shape(theta []float64, r int) ([]complex128, float64) {
	sv, u := complexSVD(pr.residueMatrix(theta, r), nil, true)
	ratio := 0.0
	if len(sv) > 1 && sv[0] > 0 {
		ratio = sv[1] / sv[0]
	}
	return u, ratio
}

// ModeBias is the expected resolution bias of a mode's natural frequency
// [Hz] and damping ratio, signed (estimate minus truth).
type ModeBias struct {
	NaturalFrequencyHz, DampingRatio float64
}

// resolutionBias returns, per mode r, the change of every modeQuantities
// value when the fit is repeated on the fitted model seen through the
// spectral window (kernel): the expected bias of a Welch estimate's
// smoothing, evaluated at theta. A Welch H1 is, in expectation, the true FRF
// smoothed by the window's kernel (WindowKernel); fitting the smoothed
// model with the same weights shows how far that smoothing moves the poles
// and shapes. It grows with the ratio of the window's bandwidth to the
// modes' half-power bandwidth, about as its square.
func (pr poleResidue) resolutionBias(theta []float64, kernel []KernelTap) [][]float64 {
	f := pr.b.set.FreqHz
	stepRad := 2 * math.Pi * (f[len(f)-1] - f[0]) / float64(len(f)-1)
	smooth := *pr.b
	smooth.h = make([][]complex128, smooth.pairs)
	for p := range smooth.h {
		smooth.h[p] = make([]complex128, len(smooth.omega))
	}
	poles := pr.poles(theta)
	bs := make([]complex128, pr.perPair())
	for n, om := range smooth.omega {
		wsum := 0.0
		for _, t := range kernel {
			o := om + t.OffsetBins*stepRad
			if o <= 0 {
				continue
			}
			wsum += t.Weight
			pr.basis(bs, poles, o)
			for p := range smooth.pairs {
				var v complex128
				for j, c := range pr.pairParams(theta, p) {
					v += complex(c, 0) * bs[j]
				}
				smooth.h[p][n] += complex(t.Weight, 0) * v
			}
		}
		for p := range smooth.pairs {
			smooth.h[p][n] /= complex(wsum, 0)
		}
	}
	spr := pr
	spr.b = &smooth
	ts := append([]float64(nil), theta...)
	// Running out of iterations leaves the best point found, near enough
	// for an error budget.
	lsq.Minimize(spr.residualsAndJacobian, spr.rows(), ts, lsq.Settings{})
	kin := body.NewKinematics(pr.b.set.OutputPosM)
	out := make([][]float64, pr.modes)
	for r := range out {
		q0, q1 := pr.modeQuantities(theta, r, kin), pr.modeQuantities(ts, r, kin)
		for i := range q1 {
			q1[i] -= q0[i]
		}
		out[r] = q1
	}
	return out
}

// modesWithSD builds both modes with standard deviations by the delta
// method, sorted by natural frequency and labelled (body.SortAndLabel).
// When bias is not nil (resolutionBias), each standard deviation also holds
// the mode's resolution bias in quadrature, sqrt(sd^2 + bias^2), and the
// biases are returned in the modes' order.
func (pr poleResidue) modesWithSD(theta []float64, cov *mat.SymDense, bias [][]float64) ([]body.Mode, []ModeBias) {
	ms := make([]body.Mode, pr.modes)
	mb := make([]ModeBias, pr.modes)
	nsens := len(pr.b.set.OutputPosM)
	kin := body.NewKinematics(pr.b.set.OutputPosM)
	for r := range ms {
		q := pr.modeQuantities(theta, r, kin)
		nq := len(q)
		G := mat.NewDense(nq, len(theta), nil)
		fd.Jacobian(G, func(dst, x []float64) { copy(dst, pr.modeQuantities(x, r, kin)) }, theta,
			&fd.JacobianSettings{Formula: fd.Central})
		var gc, v mat.Dense
		gc.Mul(G, cov)
		v.Mul(&gc, G.T())
		sd := func(i int) float64 {
			b := 0.0
			if bias != nil {
				b = bias[r][i]
			}
			return math.Sqrt(math.Max(v.At(i, i), 0) + b*b)
		}
		if bias != nil {
			mb[r] = ModeBias{NaturalFrequencyHz: bias[r][0], DampingRatio: bias[r][2]}
		}
		psi, rank := pr.shape(theta, r)
		z, th := kin.HeavePitch(psi)
		m := body.Mode{
			Pole: pr.pole(theta, r), NaturalFrequencyHz: q[0], DampedFrequencyHz: q[1], DampingRatio: q[2],
			PitchPerBounceRadPerM: q[3], NodeM: q[4], HeaveAndPitch: [2]complex128{1, th / z},
			RankOneRatio: rank,
			SD:           body.SD{NaturalFrequencyHz: sd(0), DampedFrequencyHz: sd(1), DampingRatio: sd(2), PitchPerBounceRadPerM: sd(3), NodeM: sd(4)},
		}
		for k := range nsens {
			m.Shape = append(m.Shape, complex(q[5+k], q[5+nsens+k]))
			m.SD.ShapeRe = append(m.SD.ShapeRe, sd(5+k))
			m.SD.ShapeIm = append(m.SD.ShapeIm, sd(5+nsens+k))
		}
		ms[r] = m
	}
	first := ms[0].Pole
	body.SortAndLabel(ms)
	if ms[0].Pole != first {
		mb[0], mb[1] = mb[1], mb[0]
	}
	return ms, mb
}

func (pr poleResidue) residualTerms(theta []float64) (upper, lower [][]float64) {
	no, ni := pr.b.set.outputs(), pr.b.set.inputs()
	upper, lower = make([][]float64, no), make([][]float64, no)
	for o := range no {
		upper[o], lower[o] = make([]float64, ni), make([]float64, ni)
		for i := range ni {
			c := pr.pairParams(theta, o*ni+i)[2*pr.modes:]
			if pr.upper {
				upper[o][i], c = c[0], c[1:]
			}
			if pr.lower {
				lower[o][i] = c[0]
			}
		}
	}
	return upper, lower
}

func (pr poleResidue) normalisedResidual(theta []float64) float64 {
	e := make([]float64, pr.rows())
	pr.residualsAndJacobian(e, nil, theta)
	var num, den float64
	row := 0
	for p := range pr.b.pairs {
		for n := range pr.b.omega {
			sd := pr.b.sigma[p][n]
			num += sd * sd * (e[row]*e[row] + e[row+1]*e[row+1])
			h := pr.b.h[p][n]
			den += real(h)*real(h) + imag(h)*imag(h)
			row += 2
		}
	}
	return math.Sqrt(num / den)
}

func coherenceInBand(set *FRFSet, bins []int) []float64 {
	out := make([]float64, set.outputs())
	for o := range out {
		if set.Coherence == nil {
			out[o] = nan()
			continue
		}
		s := 0.0
		for _, k := range bins {
			s += set.Coherence[o][k]
		}
		out[o] = s / float64(len(bins))
	}
	return out
}

// qualityWarnings names each sensor by its channel in names (set order),
// or by its number when the set has no names.
func qualityWarnings(res *Result, names []string) []Warning {
	var w []Warning
	if (res.NormalisedResidual > poorResidual || res.ChiSquarePerDOF > poorChiSquare) && res.ChiSquarePerDOF <= maxChiSquare {
		w = append(w, Warning{WarnPoorFit, fmt.Sprintf(
			"normalised residual %.3g and reduced chi-square %.3g: the two-mode model or the error bands do not "+
				"describe the FRFs well; check for other modes in the band, nonlinearity, or a narrower band", res.NormalisedResidual, res.ChiSquarePerDOF)})
	}
	for o, c := range res.CoherenceInBand {
		if c < lowCoherence {
			w = append(w, Warning{WarnLowCoherence, fmt.Sprintf(
				"%s: mean multiple coherence %.2f in the band; check the sensor, its mounting and the drive level", sensorName(names, o), c)})
		}
	}
	for _, m := range res.Modes {
		if m.RankOneRatio > notRankOne {
			w = append(w, Warning{WarnNotRankOne, fmt.Sprintf(
				"%s mode: its residue matrix is not rank one (singular value ratio %.2f): the shape is uncertain", m.Label, m.RankOneRatio)})
		}
	}
	return w
}

// stableClusters returns the pole clusters of status least or better that
// persist over at least minStableOrders orders.
func stableClusters(pts []StabilisationPoint, least PoleStatus) []poleCluster {
	var out []poleCluster
	for _, c := range clusterPoles(pts, least) {
		if len(c.members) >= minStableOrders {
			out = append(out, c)
		}
	}
	return out
}

// sensorName returns the channel of sensor o, or "sensor o+1" without names.
func sensorName(names []string, o int) string {
	if o < len(names) && names[o] != "" {
		return names[o]
	}
	return fmt.Sprintf("sensor %d", o+1)
}
