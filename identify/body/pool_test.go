package body

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// run returns a bounce and a pitch mode with the given values and sds.
func run(fnB, fnP, sdF, zeta, sdZ, ppbB, ppbP, sdP float64) []Mode {
	mk := func(label string, fn, ppb float64) Mode {
		return Mode{Label: label, NaturalFrequencyHz: fn, DampingRatio: zeta, PitchPerBounceRadPerM: ppb, NodeM: 1 / ppb,
			Shape: []complex128{complex(1-0.9*ppb, 0), complex(1+1.3*ppb, 0)},
			SD:    SD{NaturalFrequencyHz: sdF, DampingRatio: sdZ, PitchPerBounceRadPerM: sdP, NodeM: sdP / (ppb * ppb)}}
	}
	return []Mode{mk("bounce", fnB, ppbB), mk("pitch", fnP, ppbP)}
}

// TestPoolThreeEqualRuns: three runs of equal sd pool to their mean with
// sd/sqrt(3) (the inverse-variance formula, exact), and the node's sd
// shrinks by the same factor.
func TestPoolThreeEqualRuns(t *testing.T) {
	runs := [][]Mode{
		run(1.20, 1.50, 0.01, 0.30, 0.01, -0.45, 1.6, 0.05),
		run(1.21, 1.51, 0.01, 0.31, 0.01, -0.46, 1.7, 0.05),
		run(1.22, 1.49, 0.01, 0.29, 0.01, -0.44, 1.5, 0.05),
	}
	p, err := Pool(runs, []string{"a", "b", "c"})
	if err != nil {
		t.Fatal(err)
	}
	b, pi := p.Modes[0], p.Modes[1]
	const tol = 1e-12
	if b.Label != "bounce" || math.Abs(b.NaturalFrequencyHz-1.21) > tol || math.Abs(b.SD.NaturalFrequencyHz-0.01/math.Sqrt(3)) > tol {
		t.Errorf("bounce %s %.6f ± %.6f", b.Label, b.NaturalFrequencyHz, b.SD.NaturalFrequencyHz)
	}
	if math.Abs(pi.PitchPerBounceRadPerM-1.6) > tol || math.Abs(pi.NodeM-1/1.6) > tol {
		t.Errorf("pitch ppb %.6f node %.6f", pi.PitchPerBounceRadPerM, pi.NodeM)
	}
	one := runs[0][1].SD.NodeM
	if r := pi.SD.NodeM / one; math.Abs(r-1/math.Sqrt(3)) > 0.01 {
		t.Errorf("pooled node sd %.4g is %.3f of one run's, want 1/sqrt(3) = 0.577", pi.SD.NodeM, r)
	}
	if len(p.Disagreements) != 0 {
		t.Errorf("consistent runs called inconsistent: %v", p.Disagreements)
	}
}

// TestPoolCalibration: runs drawn from normal distributions about the truth
// with their stated sds (unequal) are called inconsistent in about
// PoolSignificance of the trials, per check, and the pooled value lies
// within two pooled sds of the truth in about 95 % of the trials (the
// normal distribution's 95.45 %). 4000 seeded trials; the binomial sd of a
// 1 % rate is 0.16 %, of a 95 % rate 0.34 %.
func TestPoolCalibration(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	const trials = 4000
	var rejected, covered, checks int
	for range trials {
		var runs [][]Mode
		var names []string
		for i := range 4 {
			s := 0.005 * float64(i+1)
			runs = append(runs, run(1.2+s*rng.NormFloat64(), 1.5+s*rng.NormFloat64(), s, 0.3+s*rng.NormFloat64(), s,
				-0.45+s*rng.NormFloat64(), 1.6+s*rng.NormFloat64(), s))
			names = append(names, "r")
		}
		p, err := Pool(runs, names)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range p.Checks {
			checks++
			if !c.Consistent {
				rejected++
			}
		}
		if math.Abs(p.Modes[0].NaturalFrequencyHz-1.2) <= 2*p.Modes[0].SD.NaturalFrequencyHz {
			covered++
		}
	}
	t.Logf("rejected %d of %d checks, pooled bounce frequency within 2 sd in %d of %d trials", rejected, checks, covered, trials)
	if r := float64(rejected) / float64(checks); math.Abs(r-PoolSignificance) > 0.004 {
		t.Errorf("consistent runs rejected in %.2f %% of checks, want about %.0f %%", 100*r, 100*PoolSignificance)
	}
	if c := float64(covered) / trials; math.Abs(c-0.9545) > 0.012 {
		t.Errorf("pooled frequency within 2 sd in %.1f %% of trials, want about 95.4 %%", 100*c)
	}
}

// TestPoolNamesTheOddRun: a run 10 sd away from the others is named, and
// the pooled sd is widened by the Birge ratio.
func TestPoolNamesTheOddRun(t *testing.T) {
	runs := [][]Mode{
		run(1.20, 1.50, 0.01, 0.30, 0.01, -0.45, 1.6, 0.05),
		run(1.20, 1.50, 0.01, 0.30, 0.01, -0.45, 1.6, 0.05),
		run(1.30, 1.50, 0.01, 0.30, 0.01, -0.45, 1.6, 0.05),
		run(1.21, 1.51, 0.01, 0.30, 0.01, -0.45, 1.6, 0.05),
	}
	p, err := Pool(runs, []string{"d1.csv", "d2.csv", "other-car.csv", "d3.csv"})
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Disagreements) != 1 || !strings.Contains(p.Disagreements[0], "other-car.csv") ||
		!strings.Contains(p.Disagreements[0], "bounce natural frequency") {
		t.Fatalf("disagreements %q", p.Disagreements)
	}
	c := p.Checks[0]
	if c.Outlier != 2 || !(c.Scale > 1) || math.Abs(p.Modes[0].SD.NaturalFrequencyHz-c.Scale*0.005) > 1e-12 {
		t.Errorf("check %+v, pooled sd %.4g", c, p.Modes[0].SD.NaturalFrequencyHz)
	}
}

// TestPoolRefusesRunsWithoutUncertainty: a run with a zero sd cannot be
// weighted and is named.
func TestPoolRefusesRunsWithoutUncertainty(t *testing.T) {
	runs := [][]Mode{run(1.2, 1.5, 0.01, 0.3, 0.01, -0.45, 1.6, 0.05), run(1.2, 1.5, 0, 0.3, 0.01, -0.45, 1.6, 0.05)}
	if _, err := Pool(runs, []string{"a.csv", "b.csv"}); err == nil || !strings.Contains(err.Error(), "b.csv") {
		t.Errorf("err %v", err)
	}
}
