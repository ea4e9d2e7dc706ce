package identify

import (
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strings"
	"sync"
	"testing"

	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// The resolution sweep measures the rig route per segment length on seeded
// simulated logs (compare/simulate, exact; the cars of TestRigRouteAccuracy
// with damping ratios spread over 0.05-0.39): mean error, RMS error, mean
// stated sd, and z = error/sd (mean, RMS, share within 2 sd, largest) of the
// natural frequency and damping ratio, all cases and split at zeta 0.15.
// The "bias removed" line shows z had the stated resolution bias been
// subtracted instead of budgeted. The blocks go straight to the FRF stage
// (the rate is exact), so only the spectral and modal choices show. It is a
// measurement, not a check; the figures in identify/frfstage.go and
// spectral/resolution.go came from
//
//	go test ./identify -run ResolutionSweep -v -res.cases 40 -res.rate 100 -res.segs 0,256,512,1024,2048
//	go test ./identify -run ResolutionSweep -v -res.cases 24 -res.rate 100 -res.duration 3600 -res.segs 0,1024,2048,4096,8192
//
// (segment length 0: the automatic choice).
var (
	sweepN     = flag.Int("res.cases", 0, "cases of the resolution sweep (0: skip)")
	sweepDur   = flag.Float64("res.duration", 300, "log length of the resolution sweep [s]")
	sweepSeg   = flag.String("res.segs", "0,256,512,1024,2048,4096", "segment lengths (0: automatic)")
	sweepOut   = flag.String("res.out", "", "file for the raw rows (one per mode and segment length)")
	sweepFs    = flag.Float64("res.rate", 0, "sample rate (0: as TestRigRouteAccuracy draws)")
	sweepNoise = flag.Float64("res.noise", 0.05, "noise fraction")
)

type sweepRow struct {
	seg              int
	chosen           int
	label            string
	zeta, fn         float64
	ef, ez, sdf, sdz float64
	bf, bz           float64
	err              error
}

func TestResolutionSweep(t *testing.T) {
	if *sweepN == 0 {
		t.Skip("a measurement: run with -res.cases N")
	}
	var segs []int
	for _, s := range strings.Split(*sweepSeg, ",") {
		var n int
		fmt.Sscan(s, &n)
		segs = append(segs, n)
	}
	rng := rand.New(rand.NewPCG(2026, 77))
	type job struct {
		i int
		c rigCase
	}
	var cases []job
	for i := 0; i < *sweepN; i++ {
		zLo, zHi := 0.05+0.34*float64(i)/float64(*sweepN), 0.05+0.34*float64(i+1)/float64(*sweepN)
		c := drawRigCase(rng, zLo, zHi)
		c.opt.DurationS = *sweepDur
		c.opt.NoiseFraction = *sweepNoise
		if *sweepFs > 0 {
			c.opt.RateHz = *sweepFs
		}
		cases = append(cases, job{i, c})
	}
	rows := make([][]sweepRow, len(cases))
	var wg sync.WaitGroup
	sem := make(chan struct{}, 2)
	for _, j := range cases {
		wg.Go(func() {
			sem <- struct{}{}
			defer func() { <-sem }()
			rows[j.i] = sweepCase(t, j.c, segs)
		})
	}
	wg.Wait()
	var out strings.Builder
	for i, rs := range rows {
		for _, r := range rs {
			if r.err != nil {
				fmt.Fprintf(&out, "%d %d ERR %v\n", i, r.seg, r.err)
				continue
			}
			fmt.Fprintf(&out, "%d %d %d %s %.4f %.4f %.6e %.6e %.6e %.6e %.6e %.6e\n", i, r.seg, r.chosen, r.label, r.zeta, r.fn, r.ef, r.ez, r.sdf, r.sdz, r.bf, r.bz)
		}
	}
	if *sweepOut != "" {
		os.WriteFile(*sweepOut, []byte(out.String()), 0o644)
	}
	// Summary per segment length and damping class.
	for _, seg := range segs {
		for _, cls := range []struct {
			name   string
			lo, hi float64
		}{{"all", 0, 1}, {"z<0.15", 0, 0.15}, {"z>=0.15", 0.15, 1}} {
			var zf, zz, ef, ez, sdf, sdz, cf, cz, bz []float64
			fails := 0
			var chosen []int
			for _, rs := range rows {
				for _, r := range rs {
					if r.seg != seg {
						continue
					}
					if r.err != nil {
						fails++
						continue
					}
					if r.zeta < cls.lo || r.zeta >= cls.hi {
						continue
					}
					zf = append(zf, r.ef*r.fn/r.sdf)
					zz = append(zz, r.ez/r.sdz)
					ef = append(ef, r.ef)
					ez = append(ez, r.ez)
					sdf = append(sdf, r.sdf/r.fn)
					sdz = append(sdz, r.sdz)
					chosen = append(chosen, r.chosen)
					bz = append(bz, r.bz)
					cf = append(cf, (r.ef*r.fn-r.bf)/math.Sqrt(r.sdf*r.sdf-r.bf*r.bf))
					cz = append(cz, (r.ez-r.bz)/math.Sqrt(r.sdz*r.sdz-r.bz*r.bz))
				}
			}
			sort.Ints(chosen)
			med := 0
			if len(chosen) > 0 {
				med = chosen[len(chosen)/2]
			}
			t.Logf("N=%5d %-8s n=%3d fail=%d medN=%5d | fn: bias %+.4f%% rmsErr %.4f%% meanSD %.4f%% meanZ %+.2f rmsZ %.2f cov2 %.0f%% max|z| %.1f | zeta: bias %+.5f rmsErr %.5f meanSD %.5f meanZ %+.2f rmsZ %.2f cov2 %.0f%% max|z| %.1f",
				seg, cls.name, len(ef), fails, med, 100*mean(ef), 100*rmsOf(ef), 100*mean(sdf), mean(zf), rmsOf(zf), 100*cov2(zf), maxAbs(zf),
				mean(ez), rmsOf(ez), mean(sdz), mean(zz), rmsOf(zz), 100*cov2(zz), maxAbs(zz))
			t.Logf("        bias removed: zeta bias stated, mean %+.5f | fn meanZ %+.2f rmsZ %.2f cov2 %.0f%% max %.1f | zeta meanZ %+.2f rmsZ %.2f cov2 %.0f%% max %.1f",
				mean(bz), mean(cf), rmsOf(cf), 100*cov2(cf), maxAbs(cf), mean(cz), rmsOf(cz), 100*cov2(cz), maxAbs(cz))
		}
	}
}

func mean(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}

func rmsOf(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s / float64(len(x)))
}

func cov2(x []float64) float64 {
	n := 0
	for _, v := range x {
		if math.Abs(v) <= 2 {
			n++
		}
	}
	return float64(n) / float64(len(x))
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

func sweepCase(t *testing.T, c rigCase, segs []int) []sweepRow {
	log, err := simulate.Rig(c.v, c.sensors, c.inputs, c.opt)
	if err != nil {
		t.Error(err)
		return nil
	}
	var names []string
	for _, col := range log.Columns {
		names = append(names, col.Name)
	}
	stages := make([]*FRFStage, len(segs))
	for k, n := range segs {
		stages[k], err = NewFRFStage(names, c.sensors, c.inputs, FRFOptions{SegmentLen: n})
		if err != nil {
			t.Error(err)
			return nil
		}
	}
	const block = 8192
	n := len(log.Columns[0].Data)
	for start := 0; start < n; start += block {
		end := min(start+block, n)
		b := ingest.Block{Start: start, TimeS: float64(start) / log.RateHz, SampleRateHz: log.RateHz}
		for _, col := range log.Columns {
			b.Data = append(b.Data, col.Data[start:end])
		}
		for _, s := range stages {
			if err := s.Consume(b); err != nil {
				t.Error(err)
				return nil
			}
		}
	}
	var rows []sweepRow
	for k, s := range stages {
		frf, err := s.Result(log.RateHz)
		if err != nil {
			rows = append(rows, sweepRow{seg: segs[k], err: err})
			continue
		}
		_, fit, err := FitRig(frf, c.sensors, modal.Options{})
		if err != nil {
			rows = append(rows, sweepRow{seg: segs[k], err: err})
			continue
		}
		for i, m := range fit.Modes {
			tr := c.truth[i]
			rows = append(rows, sweepRow{seg: segs[k], chosen: frf.Spectra.SegmentLen, label: m.Label, zeta: tr.DampingRatio, fn: tr.NaturalFrequencyHz,
				ef: m.NaturalFrequencyHz/tr.NaturalFrequencyHz - 1, ez: m.DampingRatio - tr.DampingRatio,
				sdf: m.SD.NaturalFrequencyHz, sdz: m.SD.DampingRatio, bf: fit.ResolutionBias[i].NaturalFrequencyHz, bz: fit.ResolutionBias[i].DampingRatio})
		}
	}
	return rows
}
