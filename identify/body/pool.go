package body

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// PoolSignificance is the chi-square test's level below which repeated runs
// count as inconsistent: 1 %, so that about one consistent set of runs in a
// hundred is wrongly called inconsistent (a common choice; the 5 % level
// would call one in twenty).
const PoolSignificance = 0.01

// PoolCheck is the consistency test of one value of one mode over repeated
// runs: the chi-square of the runs about their weighted mean.
type PoolCheck struct {
	Label string // "bounce" or "pitch"
	Value string // "natural frequency", "damping ratio" or "pitch per bounce"
	// ChiSquare = sum_i (x_i - mean)^2 / sd_i^2 over DOF = runs - 1 degrees
	// of freedom; PValue is its chi-square survival probability.
	ChiSquare float64
	DOF       int
	PValue    float64
	// Consistent is PValue >= PoolSignificance.
	Consistent bool
	// Scale is the factor applied to the pooled standard deviation:
	// sqrt(ChiSquare/DOF) when the runs are inconsistent (the Birge ratio),
	// else 1.
	Scale float64
	// Outlier is the run that disagrees most with the others (largest
	// |OutlierZ|), -1 when the runs are consistent; OutlierZ is its value's
	// difference from the mean of the other runs, in standard deviations of
	// that difference.
	Outlier  int
	OutlierZ float64
	// Disagreement says in a sentence which run disagrees (empty when the
	// runs are consistent).
	Disagreement string
}

// Pooled is the outcome of Pool.
type Pooled struct {
	Modes  []Mode // bounce and pitch, sorted and labelled as SortAndLabel does
	Checks []PoolCheck
	// Disagreements say, one sentence each, which run disagrees with the
	// others on which value, and which run's own labels differ from the
	// pooled ones (empty when every check is consistent).
	Disagreements []string
}

// Pool combines the bounce and pitch modes of repeated runs of one car in
// one state (repeated drops, repeated rig runs) into one estimate per mode.
// The natural frequency, the damping ratio and the pitch per bounce are each
// the inverse-variance weighted mean of the runs, with the standard
// deviation 1/sqrt(sum 1/sd_i^2) (Bevington & Robinson, Data Reduction and
// Error Analysis for the Physical Sciences, 3rd ed., 2003, sec. 4.1); the
// node is 1/(pooled pitch per bounce) with its sd by the delta method. The
// runs' consistency is tested by the chi-square of each value about its
// mean (PoolCheck); where they disagree (PValue < PoolSignificance) the
// pooled sd is scaled by the Birge ratio sqrt(chi^2/dof) (Birge, Phys. Rev.
// 40, 1932; the scale factor of the Particle Data Group's averages
// [memory]), and the run that disagrees most is named in a sentence that
// uses names[i] for run i. The shapes at the sensors are averaged with the
// natural frequency's weights. The runs' modes are paired by frequency
// (lower with lower), not by their labels: a run's labels come from its
// own shapes, which a weakly excited mode may leave poorly determined; the
// pooled modes are labelled from the pooled shapes (SortAndLabel), and a
// run whose own labels differ is named. Runs must each hold two modes with
// positive, finite standard deviations and the same sensors, or Pool
// returns an error; fewer than two runs are a caller mistake and panic.
func Pool(runs [][]Mode, names []string) (*Pooled, error) {
	if len(runs) < 2 || len(names) != len(runs) {
		panic(fmt.Sprintf("body: pooling %d runs with %d names; pooling needs two or more", len(runs), len(names)))
	}
	p := &Pooled{}
	for k := range 2 {
		ms := make([]Mode, len(runs))
		for i, run := range runs {
			if len(run) != 2 {
				return nil, fmt.Errorf("%s: %d modes; each run must hold the two body modes", names[i], len(run))
			}
			if len(run[k].Shape) != len(runs[0][0].Shape) {
				return nil, fmt.Errorf("%s: %d sensors, the first run has %d: pool runs of one setup", names[i], len(run[k].Shape), len(runs[0][0].Shape))
			}
			ms[i] = lowerFirst(run)[k]
		}
		pm, checks, err := poolMode(ms, names)
		if err != nil {
			return nil, err
		}
		p.Modes = append(p.Modes, pm)
		p.Checks = append(p.Checks, checks...)
	}
	SortAndLabel(p.Modes)
	for i := range p.Checks {
		p.Checks[i].Label = p.Modes[i/3].Label
	}
	for i, run := range runs {
		if lowerFirst(run)[0].Label != p.Modes[0].Label {
			p.Disagreements = append(p.Disagreements, fmt.Sprintf(
				"%s: its own mode shapes label the lower mode %s, the pooled ones %s: that run's shapes are poorly determined (its nodes %s)",
				names[i], lowerFirst(run)[0].Label, p.Modes[0].Label, nodeList(run)))
		}
	}
	for i, c := range p.Checks {
		if !c.Consistent {
			p.Checks[i].Disagreement = fmt.Sprintf(
				"%s %s: the runs disagree beyond their uncertainty (chi-square %.1f on %d degrees of freedom, p = %.2g); %s differs from the others by %.1f sd, so the pooled sd is widened %.1f times: check that run (another car, state or setup?)",
				c.Label, c.Value, c.ChiSquare, c.DOF, c.PValue, names[c.Outlier], c.OutlierZ, c.Scale)
			p.Disagreements = append(p.Disagreements, p.Checks[i].Disagreement)
		}
	}
	return p, nil
}

// lowerFirst returns the two modes of a run in the order of their natural
// frequencies.
func lowerFirst(run []Mode) [2]Mode {
	if run[1].NaturalFrequencyHz < run[0].NaturalFrequencyHz {
		return [2]Mode{run[1], run[0]}
	}
	return [2]Mode{run[0], run[1]}
}

// nodeList describes a run's nodes for a message.
func nodeList(run []Mode) string {
	var s []string
	for _, m := range lowerFirst(run) {
		s = append(s, fmt.Sprintf("%.3g Hz: %+.2f m", m.NaturalFrequencyHz, m.NodeM))
	}
	return strings.Join(s, ", ")
}

// weighted is the inverse-variance weighted mean of xs with sds, its sd,
// and the consistency check of the values about it.
func weighted(xs, sds []float64) (mean, sd float64, c PoolCheck) {
	var sw, swx float64
	for i, x := range xs {
		w := 1 / (sds[i] * sds[i])
		sw += w
		swx += w * x
	}
	mean, sd = swx/sw, 1/math.Sqrt(sw)
	for i, x := range xs {
		c.ChiSquare += (x - mean) * (x - mean) / (sds[i] * sds[i])
	}
	c.DOF = len(xs) - 1
	c.PValue = distuv.ChiSquared{K: float64(c.DOF)}.Survival(c.ChiSquare)
	c.Consistent = c.PValue >= PoolSignificance
	c.Scale, c.Outlier = 1, -1
	if c.Consistent {
		return mean, sd, c
	}
	c.Scale = math.Sqrt(c.ChiSquare / float64(c.DOF))
	for i, x := range xs {
		// The mean of the other runs and its sd: the leave-one-out test.
		wi := 1 / (sds[i] * sds[i])
		others := (swx - wi*x) / (sw - wi)
		z := (x - others) / math.Sqrt(sds[i]*sds[i]+1/(sw-wi))
		if c.Outlier < 0 || math.Abs(z) > math.Abs(c.OutlierZ) {
			c.Outlier, c.OutlierZ = i, z
		}
	}
	return mean, sd * c.Scale, c
}

// poolMode pools one mode over the runs.
func poolMode(ms []Mode, names []string) (Mode, []PoolCheck, error) {
	n := len(ms)
	get := func(f func(Mode) (float64, float64)) (xs, sds []float64) {
		xs, sds = make([]float64, n), make([]float64, n)
		for i, m := range ms {
			xs[i], sds[i] = f(m)
		}
		return xs, sds
	}
	values := []struct {
		name string
		f    func(Mode) (float64, float64)
	}{
		{"natural frequency", func(m Mode) (float64, float64) { return m.NaturalFrequencyHz, m.SD.NaturalFrequencyHz }},
		{"damping ratio", func(m Mode) (float64, float64) { return m.DampingRatio, m.SD.DampingRatio }},
		{"pitch per bounce", func(m Mode) (float64, float64) { return m.PitchPerBounceRadPerM, m.SD.PitchPerBounceRadPerM }},
	}
	out := make([]float64, len(values))
	sd := make([]float64, len(values))
	var checks []PoolCheck
	var bad []string
	for k, v := range values {
		xs, sds := get(v.f)
		for i := range xs {
			if !(sds[i] > 0) || math.IsInf(sds[i], 0) || math.IsNaN(xs[i]) || math.IsInf(xs[i], 0) {
				bad = append(bad, fmt.Sprintf("%s of %s", v.name, names[i]))
			}
		}
		if len(bad) > 0 {
			continue
		}
		var c PoolCheck
		out[k], sd[k], c = weighted(xs, sds)
		c.Label, c.Value = ms[0].Label, v.name
		checks = append(checks, c)
	}
	if len(bad) > 0 {
		return Mode{}, nil, fmt.Errorf("%s mode: no finite value with a positive standard deviation for the %s: runs without uncertainties cannot be weighted",
			ms[0].Label, strings.Join(bad, ", "))
	}
	fn, zeta, ppb := out[0], out[1], out[2]
	w := 2 * math.Pi * fn
	m := Mode{
		Label: ms[0].Label, NaturalFrequencyHz: fn, DampingRatio: zeta,
		DampedFrequencyHz:     fn * math.Sqrt(math.Max(1-zeta*zeta, 0)),
		Pole:                  complex(-zeta*w, w*math.Sqrt(math.Max(1-zeta*zeta, 0))),
		PitchPerBounceRadPerM: ppb, NodeM: 1 / ppb,
		HeaveAndPitch: [2]complex128{1, complex(ppb, 0)},
		SD: SD{NaturalFrequencyHz: sd[0], DampingRatio: sd[1], PitchPerBounceRadPerM: sd[2],
			NodeM: sd[2] / (ppb * ppb)},
	}
	m.SD.DampedFrequencyHz = m.DampedFrequencyHz / fn * sd[0]
	// The shapes, weighted like the natural frequency (their sds are
	// combined the same way).
	var sw float64
	nsens := len(ms[0].Shape)
	m.Shape = make([]complex128, nsens)
	vr, vi := make([]float64, nsens), make([]float64, nsens)
	for _, r := range ms {
		wt := 1 / (r.SD.NaturalFrequencyHz * r.SD.NaturalFrequencyHz)
		sw += wt
		for k, s := range r.Shape {
			m.Shape[k] += complex(wt, 0) * s
			if k < len(r.SD.ShapeRe) && k < len(r.SD.ShapeIm) {
				vr[k] += wt * wt * r.SD.ShapeRe[k] * r.SD.ShapeRe[k]
				vi[k] += wt * wt * r.SD.ShapeIm[k] * r.SD.ShapeIm[k]
			}
		}
	}
	for k := range m.Shape {
		m.Shape[k] /= complex(sw, 0)
		if cmplx.IsNaN(m.Shape[k]) {
			return Mode{}, nil, fmt.Errorf("%s mode: the shapes cannot be averaged", m.Label)
		}
	}
	if len(ms[0].SD.ShapeRe) == nsens {
		m.SD.ShapeRe, m.SD.ShapeIm = make([]float64, nsens), make([]float64, nsens)
		for k := range nsens {
			m.SD.ShapeRe[k], m.SD.ShapeIm[k] = math.Sqrt(vr[k])/sw, math.Sqrt(vi[k])/sw
		}
	}
	allNoNode := true
	for _, r := range ms {
		allNoNode = allNoNode && math.IsNaN(r.NodeM)
	}
	if allNoNode {
		m.NodeM = math.NaN()
	}
	return m, checks, nil
}
