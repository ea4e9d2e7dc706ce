package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/decay"
	"github.com/ridemodes/ridemodes/ingest"
)

// DropTest is the conditions of a drop series: what the plan recommends
// and what its prediction and simulation use.
type DropTest struct {
	// RateHz is the logger's sample rate and DurationS the length of one
	// drop's log; PreTriggerS the rest logged before the release.
	RateHz, DurationS, PreTriggerS float64
	// HeightM is the drop height (the blocks), RearDelayS how long after
	// the front axle the rear one drops (0: both at once; rolled off the
	// blocks: wheelbase / rolling speed).
	HeightM, RearDelayS float64
	// NoiseMPerS2 is the standard deviation of each channel's noise at
	// RateHz (white).
	NoiseMPerS2 float64
	// Drops is how many drops are logged and pooled.
	Drops int
}

// quietSDs is the decay amplitude, in noise standard deviations, at which
// the drop route's window ends (package decay: the body counts as at rest
// again when its decay has sunk to about 1.6 noise sd).
const quietSDs = 1.6

// freeDecay is the body's free decay after the last step of a drop: the
// acceleration at sensor k, sum_r 2 Re(amp[r][k] exp(pole[r] t)), t from
// the last step.
type freeDecay struct {
	poles [2]complex128
	amp   [2][]complex128
}

// decayOf returns the free decay of car v after the last step of drop d at
// the sensors at posM, and the state's transitions exactly as
// compare/simulate propagates them: the front step, then RearDelayS later
// the rear step.
func decayOf(v compare.Vehicle, posM []float64, d DropTest) (*freeDecay, error) {
	modes, err := v.DampedModes()
	if err != nil {
		return nil, err
	}
	h := d.HeightM
	x0 := v.StepState(-h, -h)
	if d.RearDelayS > 0 {
		fr, err := v.NewFreeResponse(v.StepState(-h, 0))
		if err != nil {
			return nil, err
		}
		x, _ := fr.At(d.RearDelayS)
		jump := v.StepState(0, -h)
		for i := range x {
			x[i] += jump[i]
		}
		x0 = x
	}
	fr, err := v.NewFreeResponse(x0)
	if err != nil {
		return nil, err
	}
	fd := &freeDecay{poles: [2]complex128{modes[0].Pole, modes[1].Pole}}
	// The amplitudes by least squares on the exact response at the known
	// poles: four real unknowns per sensor, over two periods of the
	// slower mode.
	n := 64
	span := 2 * 2 * math.Pi / imag(fd.poles[0])
	A := mat.NewDense(n, 4, nil)
	y := make([][]float64, len(posM))
	for k := range y {
		y[k] = make([]float64, n)
	}
	for i := range n {
		t := span * float64(i) / float64(n-1)
		for r, lam := range fd.poles {
			e := cmplx.Exp(lam * complex(t, 0))
			A.Set(i, 2*r, 2*real(e))
			A.Set(i, 2*r+1, -2*imag(e))
		}
		_, acc := fr.At(t)
		for k, s := range posM {
			y[k][i] = acc[0] - s*acc[1]
		}
	}
	var qr mat.QR
	qr.Factorize(A)
	for r := range fd.amp {
		fd.amp[r] = make([]complex128, len(posM))
	}
	for k := range posM {
		var c mat.VecDense
		if err := qr.SolveVecTo(&c, false, mat.NewVecDense(n, y[k])); err != nil {
			return nil, err
		}
		for r := range fd.amp {
			fd.amp[r][k] = complex(c.AtVec(2*r), c.AtVec(2*r+1))
		}
	}
	return fd, nil
}

// envelope returns the largest decay amplitude over the sensors at t.
func (f *freeDecay) envelope(t float64) float64 {
	var m float64
	for k := range f.amp[0] {
		var a float64
		for r, lam := range f.poles {
			a += 2 * cmplx.Abs(f.amp[r][k]) * math.Exp(real(lam)*t)
		}
		m = math.Max(m, a)
	}
	return m
}

// quietAfter returns the time after the last step at which the decay's
// envelope has sunk to quietSDs noise standard deviations.
func (f *freeDecay) quietAfter(noise float64) float64 {
	slow := math.Min(-real(f.poles[0]), -real(f.poles[1]))
	t := 0.0
	for f.envelope(t) > quietSDs*noise && t < 1e4 {
		t += 0.05 / slow
	}
	return t
}

// parameters of the decay model, in the drop route's form: for each mode
// the pole (Re, Im), then for each sensor the two modes' complex amplitudes
// and the sensor's offset.
func (f *freeDecay) parameters() []float64 {
	p := []float64{real(f.poles[0]), imag(f.poles[0]), real(f.poles[1]), imag(f.poles[1])}
	for k := range f.amp[0] {
		p = append(p, real(f.amp[0][k]), imag(f.amp[0][k]), real(f.amp[1][k]), imag(f.amp[1][k]), 0)
	}
	return p
}

// predictDrop returns the modes of one drop d of car v with the sensors
// given, with standard deviations from the Cramer-Rao bound of the drop
// route's model (two damped exponentials with common poles, a complex
// amplitude per mode and an offset per sensor, white noise of d's
// standard deviation) over its fit window: from decay.DefaultSettleS after
// the last step to where the decay sinks to quietSDs noise sd or the log
// ends. Their sd is that of one drop.
func predictDrop(v compare.Vehicle, sensors []ingest.Sensor, d DropTest) ([]body.Mode, error) {
	posM := ingest.SensorPositionsM(sensors)
	f, err := decayOf(v, posM, d)
	if err != nil {
		return nil, err
	}
	start := decay.DefaultSettleS
	end := math.Min(f.quietAfter(d.NoiseMPerS2), d.DurationS-d.PreTriggerS-d.RearDelayS)
	if !(end > start) {
		return nil, errors.New("plan: the drop's log ends before its decay can be fitted")
	}
	theta := f.parameters()
	np := len(theta)
	fisher := mat.NewSymDense(np, nil)
	g := make([]float64, np)
	dt := 1 / d.RateHz
	w := 1 / (d.NoiseMPerS2 * d.NoiseMPerS2)
	for t := start; t <= end; t += dt {
		for k := range posM {
			for i := range g {
				g[i] = 0
			}
			base := 4 + 5*k
			for r, lam := range f.poles {
				e := cmplx.Exp(lam * complex(t, 0))
				c := f.amp[r][k] * e
				g[2*r] = 2 * real(c) * t    // d/d Re(lambda)
				g[2*r+1] = -2 * imag(c) * t // d/d Im(lambda)
				g[base+2*r] = 2 * real(e)
				g[base+2*r+1] = -2 * imag(e)
			}
			g[base+4] = 1
			fisher.SymRankOne(fisher, w, mat.NewVecDense(np, g))
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(fisher) {
		return nil, fmt.Errorf("plan: the drop's information matrix is singular: the decay does not determine both modes")
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return nil, err
	}
	kin := body.NewKinematics(posM)
	ms := make([]body.Mode, 2)
	for r := range ms {
		quantities := func(q, x []float64) {
			lam := complex(x[2*r], x[2*r+1])
			psi := make([]complex128, len(posM))
			for k := range psi {
				psi[k] = complex(x[4+5*k+2*r], x[4+5*k+2*r+1])
			}
			z, th := kin.HeavePitch(psi)
			ppb := real(th / z)
			q[0] = cmplx.Abs(lam) / (2 * math.Pi)
			q[1] = imag(lam) / (2 * math.Pi)
			q[2] = -real(lam) / cmplx.Abs(lam)
			q[3] = ppb
			q[4] = kin.NodeM(ppb)
		}
		q := make([]float64, 5)
		quantities(q, theta)
		J := mat.NewDense(5, np, nil)
		fd.Jacobian(J, quantities, theta, &fd.JacobianSettings{Formula: fd.Central})
		var jc, vq mat.Dense
		jc.Mul(J, &cov)
		vq.Mul(&jc, J.T())
		sd := func(i int) float64 { return math.Sqrt(math.Max(vq.At(i, i), 0)) }
		psi := make([]complex128, len(posM))
		for k := range psi {
			psi[k] = f.amp[r][k]
		}
		z, th := kin.HeavePitch(psi)
		shape := make([]complex128, len(psi))
		for k := range psi {
			shape[k] = psi[k] / z
		}
		ms[r] = body.Mode{Pole: f.poles[r], NaturalFrequencyHz: q[0], DampedFrequencyHz: q[1], DampingRatio: q[2],
			PitchPerBounceRadPerM: q[3], NodeM: q[4], HeaveAndPitch: [2]complex128{1, th / z}, Shape: shape,
			SD: body.SD{NaturalFrequencyHz: sd(0), DampedFrequencyHz: sd(1), DampingRatio: sd(2),
				PitchPerBounceRadPerM: sd(3), NodeM: sd(4)}}
	}
	body.SortAndLabel(ms)
	return ms, nil
}

// The drop heights and roll-off delays a drop plan chooses from: heights
// in whole centimetres (blocks), delays over the 0.2-0.8 s that the drop
// route was measured on (package decay), 0 dropping both axles at once.
var (
	dropHeightsM = []float64{0.02, 0.03, 0.04, 0.05, 0.06, 0.08, 0.10}
	rearDelaysS  = []float64{0, 0.2, 0.3, 0.4, 0.5, 0.6, 0.8}
)

// restAfterS is how long the body must lie still after a decay for the
// drop route to see the event end (decay.DefaultRestS).
const restAfterS = decay.DefaultRestS

// dropAt returns one drop of height h and rear delay d with the sensors
// given, its log length (the pre-trigger rest, then the event, and as
// much rest again, since the drop route measures the noise where the log
// rests, which must be over half of it), its asymptotic modes and worst
// ratio predicted/wanted for one drop (with the realism factors found so far).
func (p *planner) dropAt(sensors []ingest.Sensor, h, d float64) (DropTest, []body.Mode, float64, error) {
	t := DropTest{RateHz: p.rateHz, PreTriggerS: preTriggerS, HeightM: h, RearDelayS: d, NoiseMPerS2: p.noise, Drops: 1}
	f, err := decayOf(p.car, ingest.SensorPositionsM(sensors), t)
	if err != nil {
		return t, nil, math.NaN(), err
	}
	event := d + f.quietAfter(p.noise) + restAfterS
	t.DurationS = math.Ceil(preTriggerS + 2*event)
	ms, err := predictDrop(p.car, sensors, t)
	if err != nil {
		return t, nil, math.NaN(), err
	}
	_, w := p.checks(p.predicted(sensors, ms, 1))
	return t, ms, w, nil
}

// dropsFor returns how many equal drops bring a worst ratio w of one drop
// within the margin: the sd of n pooled drops is that of one over sqrt(n).
func dropsFor(w float64) int {
	n := math.Ceil(w*Margin*w*Margin - 1e-9)
	if !(n < 1e6) {
		return math.MaxInt32
	}
	return max(1, int(n))
}

// dropConditions returns the drop of the candidate heights (up to the
// request's highest) and delays that needs the fewest drops with the
// prediction as it stands, then the lowest, then of least worst ratio;
// its Drops is that number, at most the request's most.
func (p *planner) dropConditions(sensors []ingest.Sensor) (DropTest, []body.Mode, error) {
	heights := []float64{}
	for _, h := range dropHeightsM {
		if h < p.req.MaxDropHeightM {
			heights = append(heights, h)
		}
	}
	heights = append(heights, p.req.MaxDropHeightM)
	var (
		best  DropTest
		bestM []body.Mode
		bestW = math.Inf(1)
		bestN = math.MaxInt
		err   error
	)
	for _, h := range heights {
		for _, d := range rearDelaysS {
			t, ms, w, e := p.dropAt(sensors, h, d)
			if e != nil {
				err = e
				continue
			}
			if n := dropsFor(w); n < bestN || (n == bestN && h == best.HeightM && w < bestW) {
				best, bestM, bestW, bestN = t, ms, w, n
			}
		}
	}
	if bestM == nil {
		return best, nil, err
	}
	best.Drops = min(bestN, p.req.MaxDrops)
	return best, bestM, nil
}

// planDrop plans a drop series: the drop for the given sensors, the
// sensor layout for that drop, the drop again for the new layout, then the
// refinement (settle; k from single drops), which also sets the number of
// drops.
func (p *planner) planDrop(ctx context.Context) (*Plan, error) {
	t, ms, err := p.dropConditions(p.sensors)
	if err != nil {
		return nil, err
	}
	given := p.sensors
	p.sensors = p.searchLayout(p.sensors, func(s []ingest.Sensor) float64 {
		m, err := predictDrop(p.car, s, t)
		if err != nil {
			return math.Inf(1)
		}
		_, w := p.checks(p.predicted(s, m, 1))
		return w
	})
	if !sameLayout(given, p.sensors) {
		if t, ms, err = p.dropConditions(p.sensors); err != nil {
			return nil, err
		}
	}
	p.drop = t
	ref, ms, err := p.settle(ctx, ms, func() ([]body.Mode, bool, error) {
		t, ms, err := p.dropConditions(p.sensors)
		changed := t.HeightM != p.drop.HeightM || t.RearDelayS != p.drop.RearDelayS
		p.drop = t
		return ms, changed, err
	})
	if err != nil {
		return nil, err
	}
	t = p.drop
	n := p.drop.Drops
	out := &Plan{DurationS: t.DurationS, Drops: &n,
		Drop: &DropJSON{HeightM: t.HeightM, RearDelayS: t.RearDelayS, PreTriggerS: t.PreTriggerS}}
	out.Prediction = p.predictionJSON(ref, fmt.Sprintf("drop: the Cramer-Rao bound (Kay 1993) of the drop route's decay model "+
		"over its fit window; %d pooled drops divide it by sqrt(%d)", n, n))
	p.finish(out, ms, 1/math.Sqrt(float64(n)))
	one, _ := p.checks(p.predicted(p.sensors, ms, 1))
	out.Curve = Curve{XLabel: "drops pooled", Chosen: float64(n)}
	for k := 1; k <= max(2*n, DefaultMaxDrops); k++ {
		cs := make([]Check, len(one))
		for i, c := range one {
			cs[i] = c
			if c.Ratio != nil {
				cs[i].Ratio = compare.Finite(*c.Ratio / math.Sqrt(float64(k)))
			}
		}
		out.Curve.add(float64(k), cs)
	}
	if !out.Meets {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%d drops of %g m do not meet every wanted sd: a higher drop (within "+
			"the car's travel, short of the bump stops), quieter sensors or the rig will", n, t.HeightM))
	}
	return out, nil
}
