package ingest

import (
	"fmt"
	"math"
)

// Data-quality checks, run on the delivered (windowed) samples of each
// channel as they stream by, in constant memory. They give warnings, never
// errors: each is a heuristic whose thresholds are the constants below.
//
//   - clipping: a run of at least clipRunSamples equal samples at the
//     channel's extreme (its final maximum or minimum): a saturated sensor or
//     DAQ input flattens the peaks at full scale.
//   - dropout: a run of identical values at least dropoutRunS long (and at
//     least dropoutRunSamples samples), not at an extreme: a frozen or held
//     channel, a lost packet written as the last value or as zero.
//   - DC offset: |mean| over dcOffsetRatio times the standard deviation.
//   - high-pass: see hpDetector.
const (
	clipRunSamples    = 4
	dropoutRunS       = 0.05
	dropoutRunSamples = 16
	dcOffsetRatio     = 3.0
	gravityBandFrac   = 0.1 // |mean| within 10 % of g reads as gravity
	maxRememberedRuns = 8
)

// run is a run of equal samples.
type run struct {
	val        float64
	start, len int // start: sample index in the window
	line       int
}

// extremeRuns counts the runs at the current extreme value.
type extremeRuns struct {
	val           float64
	runs, samples int
	longest       int
	first         run
	longRuns      int // runs also long enough to count as dropouts
}

func (e *extremeRuns) reset(v float64) { *e = extremeRuns{val: v} }

func (e *extremeRuns) add(r run, dropRun int) {
	if e.runs == 0 {
		e.first = r
	}
	e.runs++
	e.samples += r.len
	if r.len > e.longest {
		e.longest = r.len
	}
	if r.len >= dropRun {
		e.longRuns++
	}
}

type chanQuality struct {
	name    string
	fs      float64
	dropRun int
	offsetS float64 // time of the window's first sample from the log's first sample

	cur      run
	max, min extremeRuns
	nLong    int   // runs >= dropRun
	long     []run // the first maxRememberedRuns of them
	longest  run

	hp *hpDetector
}

func newChanQuality(name string, fs float64) *chanQuality {
	q := &chanQuality{name: name, fs: fs}
	q.dropRun = dropoutRunSamples
	if r := math.Ceil(dropoutRunS * fs); r > dropoutRunSamples {
		q.dropRun = int(min(r, 1<<30))
	}
	q.cur = run{val: math.NaN()}
	q.max.reset(math.Inf(-1))
	q.min.reset(math.Inf(1))
	q.hp = newHPDetector(fs)
	return q
}

// blockScan is what one pass over a block of a channel's samples finds,
// for runningStats and chanQuality.add.
type blockScan struct {
	sum      float64 // the samples added in order
	min, max float64 // +Inf and -Inf for an empty block
	// repeats: two neighbouring samples are equal, the first one and the
	// last of the previous block included
	repeats bool
}

// scan makes the one pass over a block d of the channel that the running
// statistics and the run checks share, and feeds the high-pass detector its
// block averages on the way. Every sum keeps the order of a plain loop over
// the samples, and the extremes and repeats are what a plain loop finds
// (TestScanMatchesPlainLoop).
//
// Why one pass: the statistics' sum, the detector's sums and the run
// checks each walked the block on their own, each pass bound by the
// latency of its chain of additions. Why four samples at a time: most
// samples change neither extreme and repeat no neighbour, which one test
// of the four tells; only a group that fails it goes through the checks
// sample by sample (extremes). Measured on a 2-core AMD EPYC (Turin) VM
// shared with other work: BenchmarkBlockChecks (medians of 10, runs of the
// versions interleaved) 2.34 ns a sample against 3.68 with the one pass
// sample by sample; scan alone with the detector, in a benchmark not kept
// (512 Hz, 4096-sample blocks, medians of ten runs), 1.34 ns a sample
// against 1.92 sample by sample and 2.8 with a pass each, and 1.37, 1.95
// and 2.86 on a channel of the hour-long rig log.
func (q *chanQuality) scan(d []float64) blockScan {
	sum, mn, mx := 0.0, math.Inf(1), math.Inf(-1)
	prev := q.cur.val
	repeats := false
	hp := q.hp
	for i := 0; i < len(d); {
		end := len(d)
		var acc float64 // the detector's sum, unused without one
		if hp != nil {
			end = min(end, i+hp.m-hp.accN)
			acc = hp.acc
		}
		part := d[i:end]
		for ; len(part) >= 4; part = part[4:] {
			a, b, c, e := part[0], part[1], part[2], part[3]
			sum += a
			acc += a
			sum += b
			acc += b
			sum += c
			acc += c
			sum += e
			acc += e
			// false for a NaN, so a NaN too goes through extremes
			if !(a >= mn && a <= mx && b >= mn && b <= mx && c >= mn && c <= mx && e >= mn && e <= mx &&
				a != prev && b != a && c != b && e != c) {
				mn, mx, repeats = extremes(part[:4], prev, mn, mx, repeats)
			}
			prev = e
		}
		if len(part) > 0 {
			for _, v := range part {
				sum += v
				acc += v
			}
			mn, mx, repeats = extremes(part, prev, mn, mx, repeats)
			prev = part[len(part)-1]
		}
		if hp != nil {
			hp.add(end-i, acc)
		}
		i = end
	}
	return blockScan{sum: sum, min: mn, max: mx, repeats: repeats}
}

// extremes takes samples d, which follow prev, into the running minimum
// mn, maximum mx and repeats (two neighbouring samples equal) of scan.
func extremes(d []float64, prev, mn, mx float64, repeats bool) (float64, float64, bool) {
	for _, v := range d {
		if v < mn {
			mn = v
		}
		if v > mx {
			mx = v
		}
		if v == prev {
			repeats = true
		}
		prev = v
	}
	return mn, mx, repeats
}

// add takes a block after scan: its samples d, their file lines, the index
// of d[0] in the window, the window's offset from the log's first sample,
// and what scan found.
func (q *chanQuality) add(d []float64, lines []int, start int, firstT, outT0 float64, sc blockScan) {
	q.offsetS = outT0 - firstT
	if len(d) == 0 {
		return
	}
	if !sc.repeats {
		// every run that starts in d is one sample long: only the run
		// carried over ends (at d[0], before any new extreme), and the
		// extremes move to the block's own
		if q.cur.len >= clipRunSamples {
			q.endRun()
		}
		if sc.max > q.max.val {
			q.max.reset(sc.max)
		}
		if sc.min < q.min.val {
			q.min.reset(sc.min)
		}
		last := len(d) - 1
		q.cur = run{val: d[last], len: 1, start: start + last, line: lines[last]}
		return
	}
	cur, curLen, curStart := q.cur.val, q.cur.len, q.cur.start
	maxV, minV := q.max.val, q.min.val
	for j, x := range d {
		if x == cur {
			curLen++
			continue
		}
		if curLen >= clipRunSamples {
			q.cur = run{val: cur, len: curLen, start: curStart, line: q.cur.line}
			q.endRun()
		}
		cur, curLen, curStart = x, 1, start+j
		q.cur.line = lines[j]
		if x > maxV {
			q.max.reset(x)
			maxV = x
		}
		if x < minV {
			q.min.reset(x)
			minV = x
		}
	}
	q.cur.val, q.cur.len, q.cur.start = cur, curLen, curStart
}

func (q *chanQuality) endRun() {
	r := q.cur
	if r.len >= clipRunSamples {
		switch r.val {
		case q.max.val:
			q.max.add(r, q.dropRun)
		case q.min.val:
			q.min.add(r, q.dropRun)
		}
	}
	if r.len >= q.dropRun {
		q.nLong++
		if len(q.long) < maxRememberedRuns {
			q.long = append(q.long, r)
		}
		if r.len > q.longest.len && r.val != q.max.val && r.val != q.min.val {
			q.longest = r
		}
	}
}

func (q *chanQuality) timeOf(sample int) *float64 {
	t := q.offsetS + float64(sample)/q.fs
	return &t
}

// finish returns the channel's warnings; fs is the whole log's sample rate,
// which sets the times and durations they state.
func (q *chanQuality) finish(st runningStats, fs float64) []Warning {
	q.fs = fs
	q.endRun()
	q.cur = run{val: math.NaN()}
	var w []Warning
	if st.min == st.max {
		return nil // an error elsewhere
	}
	for _, e := range []*extremeRuns{&q.max, &q.min} {
		if e.runs == 0 {
			continue
		}
		which := "maximum"
		if e == &q.min {
			which = "minimum"
		}
		w = append(w, Warning{Code: WarnClipping, Channel: q.name, Line: e.first.line, TimeS: q.timeOf(e.first.start),
			Message: fmt.Sprintf("%d run(s) of %d or more equal samples (%d in all, the longest %d) at the channel's %s %.6g m/s^2: the sensor or the DAQ input may be saturated; check its range",
				e.runs, clipRunSamples, e.samples, e.longest, which, e.val)})
	}
	drop := q.nLong - q.max.longRuns - q.min.longRuns
	if drop > 0 {
		var first *run
		for i := range q.long {
			r := &q.long[i]
			if r.val != q.max.val && r.val != q.min.val {
				first = r
				break
			}
		}
		msg := fmt.Sprintf("%d run(s) of %d or more identical values (%s or more)", drop, q.dropRun, fmtS(float64(q.dropRun)/q.fs))
		if q.longest.len > 0 {
			msg += fmt.Sprintf(", the longest %d samples (%s) at %.6g m/s^2", q.longest.len, fmtS(float64(q.longest.len)/q.fs), q.longest.val)
		}
		msg += ": a dropout, a frozen channel or a held value? Cut the window around it"
		wr := Warning{Code: WarnDropout, Channel: q.name, Message: msg}
		if first != nil {
			wr.Line = first.line
			wr.TimeS = q.timeOf(first.start)
		}
		w = append(w, wr)
	}
	sd := st.std()
	if math.Abs(st.mean) > dcOffsetRatio*sd {
		msg := fmt.Sprintf("the mean %.4g m/s^2 is %.1f times the signal's standard deviation %.4g m/s^2", st.mean, math.Abs(st.mean)/sd, sd)
		if math.Abs(math.Abs(st.mean)-standardGravity) < gravityBandFrac*standardGravity {
			msg += " (about 1 g: a DC-coupled sensor reading gravity?); the spectral stage removes the mean, but check the channel's sign and unit"
		} else {
			msg += " (a sensor offset, or a zero not set?); the mean is removed before the spectra, but a drifting offset leaks into the lowest frequencies"
		}
		w = append(w, Warning{Code: WarnDCOffset, Channel: q.name, Message: msg})
	}
	if q.hp != nil {
		gravity := math.Abs(math.Abs(st.mean)-standardGravity) < gravityBandFrac*standardGravity && sd < standardGravity
		if res, ok := q.hp.result(fs); ok && res.highPass && !gravity {
			w = append(w, Warning{Code: WarnHighPass, Channel: q.name, Message: fmt.Sprintf(
				"the spectrum falls away below 1 Hz as a high-pass (AC-coupled, IEPE-type) accelerometer's does: the 0.1-0.2 Hz level is %.0f dB under the 0.25-0.45 Hz level (power rising as about f^%.1f) and the 0.1-0.25 Hz level %.0f dB under the 0.8-2 Hz level. Such a sensor shifts the phase at the body modes and biases damping and mode shapes: use DC-response accelerometers, or ignore this if the drive had no content below 0.5 Hz",
				-10*math.Log10(res.lowMid), res.slope, -10*math.Log10(res.dropRatio))})
		}
	}
	return w
}
