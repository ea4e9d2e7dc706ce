package ingest

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// logOf writes channel x sampled at fs as a log "time [s],x [m/s^2]" in the
// writer's format.
func logOf(x []float64, fs float64) string {
	var b strings.Builder
	b.WriteString("time [s],x [m/s^2]\n")
	buf := make([]byte, 0, 64)
	for i, v := range x {
		buf = strconv.AppendFloat(buf[:0], float64(i)/fs, 'g', 10, 64)
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, v, 'g', 10, 64)
		buf = append(buf, '\n')
		b.Write(buf)
	}
	return b.String()
}

func warningsOf(t *testing.T, x []float64, fs float64) map[WarningCode]Warning {
	t.Helper()
	l := mustRead(t, logOf(x, fs), Options{})
	m := map[WarningCode]Warning{}
	for _, w := range l.Summary.Warnings {
		m[w.Code] = w
	}
	return m
}

func noise(n int, seed uint64, sd float64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	x := make([]float64, n)
	for i := range x {
		x[i] = sd * rng.NormFloat64()
	}
	return x
}

func TestCleanSignalHasNoWarnings(t *testing.T) {
	for seed := range uint64(3) {
		if w := warningsOf(t, noise(20000, seed, 0.5), 200); len(w) != 0 {
			t.Errorf("seed %d: %v", seed, w)
		}
	}
}

func TestClipping(t *testing.T) {
	const fs = 200.0
	x := noise(4000, 1, 0.05)
	for i := range x {
		x[i] += 2 * math.Sin(2*math.Pi*1.3*float64(i)/fs)
		x[i] = math.Max(-1.5, math.Min(1.5, x[i])) // saturates at +-1.5
	}
	l := mustRead(t, logOf(x, fs), Options{})
	var clips []Warning
	for _, w := range l.Summary.Warnings {
		if w.Code == WarnClipping {
			clips = append(clips, w)
		}
		if w.Code == WarnDropout {
			t.Errorf("clipping also reported as a dropout: %v", w)
		}
	}
	if len(clips) != 2 || !strings.Contains(clips[1].Message, "minimum -1.5") {
		t.Fatalf("clipping warnings %v, want one at the maximum, one at the minimum", clips)
	}
	c := clips[0]
	// the first run of clipRunSamples or more at the maximum
	first := 0
	for !(x[first] == 1.5 && x[first+1] == 1.5 && x[first+2] == 1.5 && x[first+3] == 1.5) {
		first++
	}
	if c.Channel != "x" || c.Line != first+2 || c.TimeS == nil || math.Abs(*c.TimeS-float64(first)/fs) > 1e-9 {
		t.Errorf("clipping warning %v, first clipped sample %d", c, first)
	}
	if !strings.Contains(c.Message, "maximum 1.5") {
		t.Errorf("message %q", c.Message)
	}
}

func TestDropout(t *testing.T) {
	const fs = 500.0
	x := noise(5000, 2, 1)
	for i := 2000; i < 2100; i++ { // 0.2 s held
		x[i] = x[1999]
	}
	w := warningsOf(t, x, fs)
	d, ok := w[WarnDropout]
	if !ok {
		t.Fatalf("no dropout warning: %v", w)
	}
	if d.Line != 1999+2 || !strings.Contains(d.Message, "the longest 101 samples") {
		t.Errorf("dropout warning %v", d)
	}
	// 10 equal samples at 500 Hz (20 ms) are not a dropout
	x = noise(5000, 2, 1)
	for i := 2000; i < 2010; i++ {
		x[i] = x[1999]
	}
	if w := warningsOf(t, x, fs); len(w) != 0 {
		t.Errorf("short run: %v", w)
	}
}

func TestDCOffset(t *testing.T) {
	x := noise(4000, 3, 0.2)
	for i := range x {
		x[i] += 1.0
	}
	w := warningsOf(t, x, 200)
	if d, ok := w[WarnDCOffset]; !ok || strings.Contains(d.Message, "gravity") {
		t.Errorf("offset 1 m/s^2 on 0.2: %v", w)
	}
	for i := range x {
		x[i] += standardGravity - 1
	}
	w = warningsOf(t, x, 200)
	if d, ok := w[WarnDCOffset]; !ok || !strings.Contains(d.Message, "gravity") {
		t.Errorf("offset 1 g: %v", w)
	}
	x = noise(4000, 3, 0.2)
	for i := range x {
		x[i] += 0.3 // 1.5 sd: not flagged
	}
	if w := warningsOf(t, x, 200); len(w) != 0 {
		t.Errorf("small offset: %v", w)
	}
}

// highPass1 filters x through a first-order high-pass with corner fc (Hz),
// the bilinear transform of s/(s + 2 pi fc).
func highPass1(x []float64, fs, fc float64) []float64 {
	k := 2 * fs
	wc := 2 * math.Pi * fc
	b := k / (k + wc)
	a := (k - wc) / (k + wc)
	y := make([]float64, len(x))
	for i := 1; i < len(x); i++ {
		y[i] = b*(x[i]-x[i-1]) + a*y[i-1]
	}
	return y
}

// bodyResponse filters x through a second-order resonance wn^2/(s^2 + 2 zeta
// wn s + wn^2) (a body on its suspension: transmissibility 1 below the mode),
// bilinear transform without prewarping.
func bodyResponse(x []float64, fs, fn, zeta float64) []float64 {
	wn := 2 * math.Pi * fn
	k := 2 * fs
	a0 := k*k + 2*zeta*wn*k + wn*wn
	b0 := wn * wn / a0
	a1 := (2*wn*wn - 2*k*k) / a0
	a2 := (k*k - 2*zeta*wn*k + wn*wn) / a0
	y := make([]float64, len(x))
	var x1, x2, y1, y2 float64
	for i, v := range x {
		o := b0*(v+2*x1+x2) - a1*y1 - a2*y2
		x2, x1 = x1, v
		y2, y1 = y1, o
		y[i] = o
	}
	return y
}

// The high-pass test on synthetic signals, each with five seeds: white
// noise and a body's response to it (1.2 Hz, zeta 0.3), with and without a
// first-order 0.5 Hz high-pass, 300 s at 100 Hz.
func TestHighPassDetector(t *testing.T) {
	const fs, n = 100.0, 30000
	for seed := range uint64(5) {
		white := noise(n, 10+seed, 1)
		body := bodyResponse(white, fs, 1.2, 0.3)
		for _, c := range []struct {
			name string
			x    []float64
			want bool
		}{
			{"white", white, false},
			{"white, 0.5 Hz high-pass", highPass1(white, fs, 0.5), true},
			{"body", body, false},
			{"body, 0.5 Hz high-pass", highPass1(body, fs, 0.5), true},
			{"body, 1 Hz high-pass", highPass1(body, fs, 1), true},
		} {
			q := newChanQuality("x", fs)
			q.scan(c.x)
			res, ok := q.hp.result(fs)
			if !ok || res.highPass != c.want {
				t.Errorf("seed %d, %s: high-pass %v (low/mid %.2f, low/ref %.3f), want %v", seed, c.name, res.highPass, res.lowMid, res.dropRatio, c.want)
			}
			if seed == 0 {
				t.Logf("%-26s low/mid %.2f  low/ref %.3f", c.name, res.lowMid, res.dropRatio)
			}
		}
	}
	// through the reader, with the warning; and not for a DC sensor's gravity
	x := highPass1(bodyResponse(noise(n, 3, 1), fs, 1.2, 0.3), fs, 0.5)
	w := warningsOf(t, x, fs)
	if hp, ok := w[WarnHighPass]; !ok || hp.Channel != "x" || !strings.Contains(hp.Message, "IEPE") {
		t.Errorf("no high-pass warning: %v", w)
	}
	for i := range x {
		x[i] += standardGravity
	}
	if _, ok := warningsOf(t, x, fs)[WarnHighPass]; ok {
		t.Error("high-pass warning on a channel reading gravity")
	}
	// too short a record is not tested
	q := newChanQuality("x", fs)
	q.scan(highPass1(noise(6000, 1, 1), fs, 0.5))
	if _, ok := q.hp.result(fs); ok {
		t.Error("60 s record tested")
	}
	// at 1 kHz the decimation keeps it working
	const fs2 = 1000.0
	q = newChanQuality("x", fs2)
	q.scan(highPass1(noise(200000, 4, 1), fs2, 0.5))
	if res, ok := q.hp.result(fs2); !ok || !res.highPass {
		t.Errorf("1 kHz: %+v %v", res, ok)
	}
	if newHPDetector(4) != nil {
		t.Error("a 4 Hz log cannot show 2 Hz")
	}
}

func TestWarningsJSONShape(t *testing.T) {
	ts := 0.0
	w := Warning{Code: WarnDropout, Channel: "a", Line: 3, TimeS: &ts, Message: "m"}
	if got := fmt.Sprint(w); !strings.Contains(got, "t = 0.000 s") {
		t.Errorf("%q", got)
	}
}

// plainScan is chanQuality.scan as a plain loop, sample by sample: the
// definition TestScanMatchesPlainLoop holds scan to.
func plainScan(q *chanQuality, d []float64) blockScan {
	sum, mn, mx := 0.0, math.Inf(1), math.Inf(-1)
	prev := q.cur.val
	repeats := false
	hp := q.hp
	for i := 0; i < len(d); {
		end := len(d)
		var acc float64
		if hp != nil {
			end = min(end, i+hp.m-hp.accN)
			acc = hp.acc
		}
		for _, v := range d[i:end] {
			sum += v
			acc += v
			if v < mn {
				mn = v
			}
			if v > mx {
				mx = v
			}
			repeats = repeats || v == prev
			prev = v
		}
		if hp != nil {
			hp.add(end-i, acc)
		}
		i = end
	}
	return blockScan{sum: sum, min: mn, max: mx, repeats: repeats}
}

// TestScanMatchesPlainLoop: scan's groups of four give what a plain loop
// gives, bit for bit (sums, extremes with the sign of a zero, repeats, the
// high-pass detector's state), on seeded noise held to a few levels (many
// repeats, within and across blocks and groups), with signed zeros, a slow
// rise (new extremes throughout) and a few NaNs, in blocks of lengths that
// leave every remainder by four, with and without the detector.
func TestScanMatchesPlainLoop(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	x := noise(40000, 6, 1)
	for i := range x {
		switch r := rng.IntN(100); {
		case r < 30:
			x[i] = math.Round(x[i]*4) / 4 // a few levels, -0 among them
		case r < 35:
			x[i] = math.Copysign(0, x[i])
		case r < 36 && i >= 30000:
			x[i] = math.NaN()
		default:
			x[i] += float64(i) / 8000
		}
	}
	same := func(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) || (a != a && b != b) }
	for _, hp := range []bool{true, false} {
		for _, blockLen := range []int{1, 2, 3, 4, 5, 7, 64, 1001, 4096} {
			fast, slow := newChanQuality("x", 512), newChanQuality("x", 512)
			if !hp {
				fast.hp, slow.hp = nil, nil
			}
			lines := make([]int, blockLen)
			var psdFast, psdSlow string // before the NaNs
			for off := 0; off < len(x); off += blockLen {
				d := x[off:min(off+blockLen, len(x))]
				if hp && off+len(d) <= 30000 && off+len(d)+blockLen > 30000 {
					psdFast, psdSlow = fmt.Sprint(fast.hp.psd), fmt.Sprint(slow.hp.psd)
				}
				got, want := fast.scan(d), plainScan(slow, d)
				if !same(got.sum, want.sum) || !same(got.min, want.min) || !same(got.max, want.max) || got.repeats != want.repeats {
					t.Fatalf("detector %v, blocks of %d, at %d: %+v, want %+v", hp, blockLen, off, got, want)
				}
				fast.add(d, lines[:len(d)], off, 0, 0, got)
				slow.add(d, lines[:len(d)], off, 0, 0, want)
			}
			if hp {
				f, s := fast.hp, slow.hp
				if f.segs < 2 || f.segs != s.segs || f.accN != s.accN || !same(f.acc, s.acc) || psdFast != psdSlow || fmt.Sprint(f.ring) != fmt.Sprint(s.ring) {
					t.Fatalf("blocks of %d: detector state differs (%d segments, want %d)", blockLen, f.segs, s.segs)
				}
			}
		}
	}
}

// TestRunChecksFastPath checks the run checks' shortcut for a block without
// equal neighbours (chanQuality.add) against the sample-by-sample loop it
// skips, which runs when scan is told the block has repeats: the same state
// and the same warnings, on seeded noise with a slow rise (new extremes
// throughout), clipped stretches at both ends, held values and runs that
// cross block boundaries, in blocks of several lengths.
func TestRunChecksFastPath(t *testing.T) {
	const fs = 200.0
	rng := rand.New(rand.NewPCG(21, 22))
	x := noise(30000, 5, 1)
	for i := range x {
		x[i] += float64(i) / 5000
	}
	for range 40 {
		at, n := rng.IntN(len(x)-40), 1+rng.IntN(30)
		v := x[at]
		switch rng.IntN(3) {
		case 0:
			v = 9 // clipped high
		case 1:
			v = -9 // clipped low
		}
		for j := at; j < at+n; j++ {
			x[j] = v
		}
	}
	lines := make([]int, len(x))
	for i := range lines {
		lines[i] = 10 + i
	}
	for _, blockLen := range []int{1, 3, 64, 1000, 4096} {
		fast, slow := newChanQuality("x", fs), newChanQuality("x", fs)
		stFast, stSlow := newRunningStats(), newRunningStats()
		shortcuts := 0
		for off := 0; off < len(x); off += blockLen {
			end := min(off+blockLen, len(x))
			d, l := x[off:end], lines[off:end]
			sc := fast.scan(d)
			if !sc.repeats {
				shortcuts++
			}
			stFast.add(d, sc)
			fast.add(d, l, off, 0, 0, sc)
			sc = slow.scan(d)
			sc.repeats = true
			stSlow.add(d, sc)
			slow.add(d, l, off, 0, 0, sc)
		}
		if shortcuts == 0 {
			t.Fatalf("blocks of %d: no block took the shortcut", blockLen)
		}
		if fast.cur != slow.cur || fast.max != slow.max || fast.min != slow.min || fast.nLong != slow.nLong ||
			fmt.Sprint(fast.long) != fmt.Sprint(slow.long) || fast.longest != slow.longest || stFast != stSlow {
			t.Fatalf("blocks of %d: state %+v, want %+v", blockLen, *fast, *slow)
		}
		wf, ws := fast.finish(stFast, fs), slow.finish(stSlow, fs)
		if fmt.Sprint(wf) != fmt.Sprint(ws) || len(ws) == 0 {
			t.Errorf("blocks of %d: warnings %v, want %v", blockLen, wf, ws)
		}
	}
}

// BenchmarkBlockChecks runs the per-block work of the data-quality checks
// and the running statistics (what streamer.flush does for each channel)
// on a 512 Hz channel of noise in 4096-sample blocks.
func BenchmarkBlockChecks(b *testing.B) {
	const n = DefaultBlockSamples
	x := noise(64*n, 3, 1)
	lines := make([]int, n)
	st := newRunningStats()
	q := newChanQuality("x", 512)
	b.ReportAllocs()
	off := 0
	for b.Loop() {
		d := x[off : off+n]
		sc := q.scan(d)
		st.add(d, sc)
		q.add(d, lines, off, 0, 0, sc)
		off = (off + n) % len(x)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/n, "ns/sample")
}

// TestHighPassBinsExact checks the detector's DFT bins, as segment adds
// them up and as each path this machine can run gives them (hpBinsPaths:
// the Go loop of four bins a pass, the AVX2 groups of eight), against the
// direct sum for one bin at a time (the definition), bit for bit, at rates
// whose bin counts leave every remainder by four and by eight, in odd and
// even numbers of groups of eight.
func TestHighPassBinsExact(t *testing.T) {
	byEight, groups := map[int]bool{}, map[int]bool{}
	// 78, 75, 73, 71, 68, 64, 61, 66 and 65 bins
	for _, fs := range []float64{20, 21, 21.5, 22, 23, 24.5, 26, 39.5, 512} {
		d := newHPDetector(fs)
		byEight[d.kMax%8] = true
		groups[(d.kMax+7)/8%2] = true
		copy(d.ring[:], noise(hpSegment, uint64(10*fs), 1))
		d.segment()
		var x [hpSegment]float64
		var sx float64
		for j, v := range d.ring {
			x[j] = v
			sx += v
		}
		for j := range x {
			x[j] = (x[j] - sx/hpSegment) * hpHann[j]
		}
		var wantRe, wantIm [hpSegment / 2]float64
		for k := 1; k <= d.kMax; k++ {
			var re, im float64
			for j, v := range x {
				re += v * math.Cos(2*math.Pi*float64(j*k%hpSegment)/hpSegment)
				im -= v * math.Sin(2*math.Pi*float64(j*k%hpSegment)/hpSegment)
			}
			wantRe[k-1], wantIm[k-1] = re, im
			if want := re*re + im*im; d.psd[k] != want {
				t.Errorf("%g Hz, bin %d of %d: %v, want %v", fs, k, d.kMax, d.psd[k], want)
			}
		}
		for name, bins := range hpBinsPaths() {
			var re, im [hpSegment / 2]float64
			xs := x
			bins(&xs, d.kMax, &re, &im)
			for k := 1; k <= d.kMax; k++ {
				if math.Float64bits(re[k-1]) != math.Float64bits(wantRe[k-1]) || math.Float64bits(im[k-1]) != math.Float64bits(wantIm[k-1]) {
					t.Errorf("%s, %g Hz, bin %d of %d: %v%+vi, want %v%+vi", name, fs, k, d.kMax, re[k-1], im[k-1], wantRe[k-1], wantIm[k-1])
				}
			}
		}
	}
	if len(byEight) != 8 || len(groups) != 2 {
		t.Errorf("bin counts cover remainders %v by eight and %v of their groups by two, want all", byEight, groups)
	}
}

// TestAddPairMatchesAdd: the statistics of two channels taken together
// (addPair) are bit for bit those taken one by one (runningStats.add), on
// seeded noise in blocks of several lengths, an empty one among them.
func TestAddPairMatchesAdd(t *testing.T) {
	x, y := noise(20000, 7, 2), noise(20000, 8, 0.5)
	for i := range y {
		y[i] += 9.81
	}
	for _, blockLen := range []int{1, 7, 1000, 4096} {
		s1, t1, s2, t2 := newRunningStats(), newRunningStats(), newRunningStats(), newRunningStats()
		q, r := newChanQuality("x", 512), newChanQuality("y", 512)
		for off := 0; off <= len(x); off += blockLen {
			d, e := x[off:min(off+blockLen, len(x))], y[off:min(off+blockLen, len(y))]
			sd, se := q.scan(d), r.scan(e)
			s1.add(d, sd)
			t1.add(e, se)
			addPair(&s2, &t2, d, e, sd, se)
		}
		if s1 != s2 || t1 != t2 {
			t.Errorf("blocks of %d: %+v %+v, want %+v %+v", blockLen, s2, t2, s1, t1)
		}
	}
}

// BenchmarkRunningStats takes four channels of a 4096-sample block into
// their running statistics one by one (runningStats.add) and two at a time
// (addPair, what streamer.flush does).
func BenchmarkRunningStats(b *testing.B) {
	const n = DefaultBlockSamples
	var d [4][]float64
	var sc [4]blockScan
	for k := range d {
		d[k] = noise(n, uint64(k), 1)
		sc[k] = newChanQuality("x", 512).scan(d[k])
	}
	b.Run("single", func(b *testing.B) {
		st := [4]runningStats{newRunningStats(), newRunningStats(), newRunningStats(), newRunningStats()}
		for b.Loop() {
			for k := range st {
				st[k].add(d[k], sc[k])
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(4*n), "ns/sample")
	})
	b.Run("pairs", func(b *testing.B) {
		st := [4]runningStats{newRunningStats(), newRunningStats(), newRunningStats(), newRunningStats()}
		for b.Loop() {
			addPair(&st[0], &st[1], d[0], d[1], sc[0], sc[1])
			addPair(&st[2], &st[3], d[2], d[3], sc[2], sc[3])
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(4*n), "ns/sample")
	})
}
