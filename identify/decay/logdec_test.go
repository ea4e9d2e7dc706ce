package decay

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/identify/body"
)

// TestLogDecrementOneMode: on a single damped cosine, exp(-zeta w t) cos(wd t),
// the decrement of successive extrema is exactly zeta w Td per cycle (the
// extrema of a damped cosine are Td/2 apart), so the estimate must return the
// damping ratio and damped frequency to the sampling resolution.
func TestLogDecrementOneMode(t *testing.T) {
	const (
		rateHz     = 1000.0
		fnHz       = 1.4
		oneModeTol = 0.002 // damping ratio, absolute: peak times are quantised to 1 ms
	)
	for _, zeta := range []float64{0.05, 0.2, 0.35} {
		w := 2 * math.Pi * fnHz
		wd := w * math.Sqrt(1-zeta*zeta)
		y := make([]float64, 4000)
		for k := range y {
			tS := float64(k) / rateHz
			y[k] = math.Exp(-zeta*w*tS) * math.Cos(wd*tS)
		}
		// Two far-apart modes stand in for a fit that found no overlap.
		apart := []body.Mode{{NaturalFrequencyHz: 1, DampingRatio: 0.01}, {NaturalFrequencyHz: 3, DampingRatio: 0.01}}
		ld := logDecrement(0, y, 1/rateHz, 1e-4, apart)
		if !ld.Valid || math.Abs(ld.DampingRatio-zeta) > oneModeTol {
			t.Errorf("zeta %.2f: log decrement %.4f (valid %v, %s)", zeta, ld.DampingRatio, ld.Valid, ld.Reason)
		}
		if d := math.Abs(ld.DampedFrequencyHz/(wd/(2*math.Pi)) - 1); d > oneModeTol {
			t.Errorf("zeta %.2f: damped frequency off by %.4f", zeta, d)
		}
	}
}

// logDecTableCases are the scenarios of the docs table (doc.go): the first
// eight of the accuracy scenarios.
const logDecTableCases = 8

// TestLogDecrementTable prints the docs table, log decrement against the fit
// on the same simulated logs (rerun with go test -run TestLogDecrementTable
// -v ./identify/decay), and checks that the decrement is flagged invalid on
// every log whose modes overlap and that it errs more than the fit.
func TestLogDecrementTable(t *testing.T) {
	var b strings.Builder
	b.WriteString("| case | rate Hz | true zeta (f Hz) | fit zeta | log decrement zeta per channel | valid |\n")
	b.WriteString("| --- | --- | --- | --- | --- | --- |\n")
	var fitErr, ldErr []float64
	for seed := uint64(1); seed <= logDecTableCases; seed++ {
		s := randomScenario(seed, accuracyRatesHz[seed%uint64(len(accuracyRatesHz))])
		_, res := runCase(t, s)
		truth := s.truth(t)
		var ld []string
		valid := true
		for _, l := range res.LogDecrement {
			ld = append(ld, fmt.Sprintf("%.3f", l.DampingRatio))
			valid = valid && l.Valid
			// The decrement is one number for two modes: its error is to the nearer true damping ratio.
			if !math.IsNaN(l.DampingRatio) {
				ldErr = append(ldErr, math.Min(math.Abs(l.DampingRatio-truth[0].DampingRatio),
					math.Abs(l.DampingRatio-truth[1].DampingRatio)))
			}
		}
		for i, md := range res.Modes {
			fitErr = append(fitErr, math.Abs(md.DampingRatio-truth[i].DampingRatio))
		}
		if overlapping(res.Modes) && valid {
			t.Errorf("case %d: modes overlap but the log decrement is not flagged", seed)
		}
		fmt.Fprintf(&b, "| %d | %g | %.3f (%.2f), %.3f (%.2f) | %.3f, %.3f | %s | %v |\n", seed, s.opt.RateHz,
			truth[0].DampingRatio, truth[0].NaturalFrequencyHz, truth[1].DampingRatio, truth[1].NaturalFrequencyHz,
			res.Modes[0].DampingRatio, res.Modes[1].DampingRatio, strings.Join(ld, ", "), valid)
	}
	mf, ml := medianOf(fitErr), medianOf(ldErr)
	fmt.Fprintf(&b, "\nmedian |error| of the damping ratio: fit %.3f, log decrement %.3f (to the nearer mode)\n", mf, ml)
	t.Log("\n" + b.String())
	if ml <= mf {
		t.Errorf("the log decrement (median error %.3f) should err more than the fit (%.3f) on close modes", ml, mf)
	}
}

func medianOf(x []float64) float64 {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	return s[len(s)/2]
}
