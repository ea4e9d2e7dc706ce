package decay

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// releaseTolSamples: the release found must be the sample at which
// simulate.Drop steps the pans, round(PreTriggerS*rate) (the step gives the
// body an acceleration of tens of noise sd at once).
const releaseTolSamples = 1

func TestDetectFindsTheRelease(t *testing.T) {
	for _, rate := range []float64{100, 1000} {
		s := randomScenario(7, rate)
		ch, _ := s.log(t)
		// A slow drift (0.05 m/s^2 per 10 s) on top of the DC offsets.
		for c := range ch {
			for i := range ch[c] {
				ch[c][i] += 0.005 * float64(i) / rate
			}
		}
		evs, err := Detect(rate, ch, DetectOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if len(evs) != 1 {
			t.Fatalf("%g Hz: %d events, want 1", rate, len(evs))
		}
		want := int(math.Round(s.opt.PreTriggerS * rate))
		if d := evs[0].ReleaseIndex - want; d < -releaseTolSamples || d > releaseTolSamples {
			t.Errorf("%g Hz: release at sample %d, simulate stepped at %d", rate, evs[0].ReleaseIndex, want)
		}
		if !evs[0].Settled || evs[0].RestS < evs[0].ReleaseS+0.5 {
			t.Errorf("%g Hz: decay ends at %.3f s (settled %v), after a release at %.3f s", rate, evs[0].RestS,
				evs[0].Settled, evs[0].ReleaseS)
		}
		for c, lvl := range evs[0].RestLevel {
			if wantLvl := s.opt.OffsetMPerS2 + s.extra[c]; math.Abs(lvl-wantLvl) > 0.1 {
				t.Errorf("%g Hz channel %d: rest level %.3f, offsets add to %.3f", rate, c, lvl, wantLvl)
			}
		}
	}
}

// TestDetectSeveralDrops joins two simulated drops into one log: two events,
// and Fit analyses the one asked for.
func TestDetectSeveralDrops(t *testing.T) {
	a, b := randomScenario(11, 200), randomScenario(11, 200)
	b.opt.Seed = 99
	ca, pos := a.log(t)
	cb, _ := b.log(t)
	ch := make([][]float64, len(ca))
	for c := range ch {
		ch[c] = append(append([]float64(nil), ca[c]...), cb[c]...)
	}
	evs, err := Detect(200, ch, DetectOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(evs) != 2 {
		t.Fatalf("%d events, want 2", len(evs))
	}
	second := len(ca[0]) + int(math.Round(b.opt.PreTriggerS*200))
	if d := evs[1].ReleaseIndex - second; d < -releaseTolSamples || d > releaseTolSamples {
		t.Errorf("second release at %d, want %d", evs[1].ReleaseIndex, second)
	}
	res, err := Fit(200, ch, pos, Options{Event: 1})
	if err != nil {
		t.Fatal(err)
	}
	if res.WindowStartS < evs[1].ReleaseS {
		t.Errorf("event 1 fitted from %.3f s, before its release at %.3f s", res.WindowStartS, evs[1].ReleaseS)
	}
	found := false
	for _, w := range res.Warnings {
		found = found || w.Code == WarnSeveralEvents
	}
	if !found {
		t.Error("no warning that the log holds several events")
	}
}

func TestDetectNoEvent(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 0))
	const n, rate = 2000, 200.0
	quiet := [][]float64{make([]float64, n), make([]float64, n)}
	moving := [][]float64{make([]float64, n), make([]float64, n)}
	for c := range quiet {
		for i := range quiet[c] {
			quiet[c][i] = 9.81 + 0.01*rng.NormFloat64()
			// A steady 1.5 Hz oscillation from start to end never rests.
			moving[c][i] = math.Sin(2*math.Pi*1.5*float64(i)/rate) + 0.01*rng.NormFloat64()
		}
	}
	var ne *NoEventError
	if _, err := Detect(rate, quiet, DetectOptions{}); !errors.As(err, &ne) || ne.NeverAtRest || !errors.Is(err, ErrNoEvent) {
		t.Errorf("noise only: got %v", err)
	}
	if _, err := Detect(rate, moving, DetectOptions{}); !errors.As(err, &ne) || !ne.NeverAtRest {
		t.Errorf("never at rest: got %v", err)
	}
	flat := [][]float64{make([]float64, n), quiet[1]}
	if _, err := Detect(rate, flat, DetectOptions{}); !errors.As(err, new(*ConstantChannelError)) {
		t.Errorf("flat channel: got %v", err)
	}
}

// TestNoiseSDIsRobust: the median-difference estimate of white noise of
// known sd (1) under a DC offset, a drift and a burst of motion over 20 % of
// the record, within robustNoiseTol.
func TestNoiseSDIsRobust(t *testing.T) {
	const robustNoiseTol = 0.05 // relative; the median of 156 blocks of 64 scatters by about 1 %
	rng := rand.New(rand.NewPCG(5, 0))
	x := make([]float64, 10000)
	for i := range x {
		x[i] = 3 + 1e-4*float64(i) + rng.NormFloat64()
		if i > 4000 && i < 6000 {
			x[i] += 50 * math.Sin(float64(i)/5)
		}
	}
	if sd := noiseSD(x); math.Abs(sd-1) > robustNoiseTol {
		t.Errorf("noise sd %.3f, want 1", sd)
	}
}
