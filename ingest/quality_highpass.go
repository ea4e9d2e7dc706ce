package ingest

import "math"

// hpDetector is the streaming test for a high-pass (AC-coupled, IEPE-type)
// accelerometer.
//
// The idea: below its corner fc a first-order high-pass multiplies the power
// spectrum by |H|^2 = f^2/(f^2+fc^2), so what it measures rises toward its
// corner: for fc = 0.5 Hz the mean power in 0.1-0.2 Hz is about 0.3 of that
// in 0.25-0.45 Hz on a signal that was flat there (0.4 for fc = 0.3 Hz). A
// DC-response sensor on a car body sees the pans' motion below the body
// modes (transmissibility near 1, rising a little toward the mode) plus drift
// and 1/f noise: the ratio is about 1 or more.
//
// The test, per channel, in constant memory and a few operations a sample:
//  1. Decimate by block averaging to about 8 Hz (m = round(fs/8) samples a
//     point). The boxcar's nulls sit at multiples of the new rate, so what
//     folds into 0-2 Hz is attenuated (content at 8.2 Hz by 32 dB).
//  2. Welch-average the decimated series: 256-point segments (32 s at 8 Hz,
//     0.031 Hz resolution), 50 % overlap, mean removed, periodic Hann window,
//     a direct DFT of the bins up to 2 Hz only (65 bins every 16 s of log).
//  3. Flag a high-pass when the mean power in 0.1-0.2 Hz is at most
//     hpLowMidMax of that in 0.25-0.45 Hz (the shape of a high-pass), and the
//     mean power in 0.1-0.25 Hz at most hpDropMax of that in 0.8-2 Hz (the
//     spectrum "falls away below 1 Hz").
//
// Tuned on seeded synthetic records (white noise, and a 1.2 Hz, zeta 0.3 body
// response to it, with and without random-walk drift; 40 seeds each; 90 s,
// 150 s and 300 s at 100 Hz): no channel without a high-pass was flagged;
// with a first-order 0.5 Hz or 1 Hz high-pass 39 or 40 of 40 were at 90 s and
// all at 150 s and more; a 0.3 Hz corner is caught in 31/40 at 90 s, 39/40
// from 150 s. TestHighPassDetector keeps the 0.5 Hz case.
//
// It needs hpMinSegments segments (80 s of log); a shorter record, such as a
// drop test's, is not tested. It cannot tell a sensor's high-pass from a
// drive with no content below 0.5 Hz (the warning says so), and a channel
// whose mean is about 1 g (a DC sensor reading gravity) is not flagged.
type hpDetector struct {
	m       int // samples averaged per decimated point
	acc     float64
	accN    int
	ring    [hpSegment]float64
	pos     int
	filled  int
	psd     []float64 // bins 0..kMax, summed over segments
	segs    int
	kMax    int
	scratch [hpSegment]float64
}

const (
	hpDecimatedHz = 8.0
	hpSegment     = 256
	hpMinSegments = 4
	hpLowMidMax   = 0.55
	hpDropMax     = 0.3
	hpLowLoHz     = 0.1
	hpLowHiHz     = 0.2
	hpMidLoHz     = 0.25
	hpMidHiHz     = 0.45
	hpDropHiHz    = 0.25
	hpRefLoHz     = 0.8
	hpRefHiHz     = 2.0
)

var hpHann, hpCos, hpSin [hpSegment]float64

func init() {
	for j := range hpSegment {
		a := 2 * math.Pi * float64(j) / hpSegment
		hpHann[j] = 0.5 - 0.5*math.Cos(a) // periodic Hann
		hpCos[j] = math.Cos(a)
		hpSin[j] = math.Sin(a)
	}
}

func newHPDetector(fs float64) *hpDetector {
	if !(fs < 1e9) {
		return nil // no accelerometer log; and the decimation factor must fit an int
	}
	m := int(math.Round(fs / hpDecimatedHz))
	if m < 1 {
		m = 1
	}
	fd := fs / float64(m)
	if fd < 2.2*hpRefHiHz {
		return nil // too slow a log to see 2 Hz
	}
	d := &hpDetector{m: m}
	d.kMax = int(math.Ceil(hpRefHiHz*hpSegment/fd)) + 1
	if d.kMax > hpSegment/2 {
		d.kMax = hpSegment / 2
	}
	d.psd = make([]float64, d.kMax+1)
	return d
}

// add takes the next n samples as their sum acc, counted from the running
// sum of the current point (chanQuality.scan adds them in order, n reaching
// at most to the end of the point).
func (d *hpDetector) add(n int, acc float64) {
	d.acc = acc
	d.accN += n
	if d.accN == d.m {
		d.push(d.acc / float64(d.m))
		d.acc, d.accN = 0, 0
	}
}

func (d *hpDetector) push(v float64) {
	d.ring[d.pos] = v
	d.pos = (d.pos + 1) % hpSegment
	d.filled++
	if d.filled >= hpSegment && (d.filled-hpSegment)%(hpSegment/2) == 0 {
		d.segment()
	}
}

func (d *hpDetector) segment() {
	x := &d.scratch
	const n = hpSegment
	// oldest first, mean removed (a linear detrend would take power out of
	// the lowest bins and fake a rise there)
	var sx float64
	for j := range n {
		v := d.ring[(d.pos+j)%n]
		x[j] = v
		sx += v
	}
	mean := sx / n
	for j := range n {
		x[j] = (x[j] - mean) * hpHann[j]
	}
	var re, im [hpSegment / 2]float64
	hpBins(x, d.kMax, &re, &im)
	for k := 1; k <= d.kMax; k++ {
		d.psd[k] += re[k-1]*re[k-1] + im[k-1]*im[k-1]
	}
	d.segs++
}

// hpBinsGo sets re[k-1] and im[k-1] to the real and imaginary parts of bin
// k of the DFT of x (sum_j x[j] e^(-2 pi i jk/hpSegment), j in order), for
// k = 1..kMax. It is hpBins where there is no assembly for it.
//
// Four bins a pass: each bin's sums are added in the same order as alone
// (TestHighPassBinsExact), but the four bins' chains of additions overlap.
// Measured on a 2-core AMD EPYC (Turin) VM shared with other work
// (BenchmarkBlockChecks, the whole per-block work of the checks, with the
// AVX2 path off; medians of 10, runs of the versions interleaved): 3.40 ns
// a sample against 3.76 with one bin a pass.
func hpBinsGo(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64) {
	const n = hpSegment
	k := 1
	for ; k+3 <= kMax; k += 4 {
		var re0, im0, re1, im1, re2, im2, re3, im3 float64
		i0, i1, i2, i3 := 0, 0, 0, 0
		for j := range n {
			v := x[j]
			re0 += v * hpCos[i0]
			im0 -= v * hpSin[i0]
			re1 += v * hpCos[i1]
			im1 -= v * hpSin[i1]
			re2 += v * hpCos[i2]
			im2 -= v * hpSin[i2]
			re3 += v * hpCos[i3]
			im3 -= v * hpSin[i3]
			i0 = (i0 + k) & (n - 1)
			i1 = (i1 + k + 1) & (n - 1)
			i2 = (i2 + k + 2) & (n - 1)
			i3 = (i3 + k + 3) & (n - 1)
		}
		re[k-1], im[k-1] = re0, im0
		re[k], im[k] = re1, im1
		re[k+1], im[k+1] = re2, im2
		re[k+2], im[k+2] = re3, im3
	}
	for ; k <= kMax; k++ {
		var r, i float64
		idx := 0
		for j := range n {
			r += x[j] * hpCos[idx]
			i -= x[j] * hpSin[idx]
			idx = (idx + k) & (n - 1)
		}
		re[k-1], im[k-1] = r, i
	}
}

type hpResult struct {
	lowMid    float64 // mean power 0.1-0.2 Hz over 0.25-0.45 Hz
	dropRatio float64 // mean power 0.1-0.25 Hz over 0.8-2 Hz
	slope     float64 // the power-law exponent lowMid implies
	highPass  bool
}

// result applies the test to a log sampled at fs (the whole log's rate,
// which may differ a little from the early one the detector was set up
// with); ok is false when the record is too short.
func (d *hpDetector) result(fs float64) (hpResult, bool) {
	if d.segs < hpMinSegments {
		return hpResult{}, false
	}
	df := fs / float64(d.m) / hpSegment
	band := func(lo, hi float64) (float64, bool) {
		var p float64
		n := 0
		for k := 1; k <= d.kMax; k++ {
			if f := float64(k) * df; f >= lo && f <= hi {
				p += d.psd[k]
				n++
			}
		}
		return p / float64(max(n, 1)), n > 0
	}
	low, ok1 := band(hpLowLoHz, hpLowHiHz)
	mid, ok2 := band(hpMidLoHz, hpMidHiHz)
	drop, ok3 := band(hpLowLoHz, hpDropHiHz)
	ref, ok4 := band(hpRefLoHz, hpRefHiHz)
	if !ok1 || !ok2 || !ok3 || !ok4 || mid <= 0 || ref <= 0 {
		return hpResult{}, false
	}
	res := hpResult{lowMid: low / mid, dropRatio: drop / ref}
	res.slope = math.Log10(mid/low) / math.Log10((hpMidLoHz+hpMidHiHz)/(hpLowLoHz+hpLowHiHz))
	res.highPass = res.lowMid <= hpLowMidMax && res.dropRatio <= hpDropMax
	return res, true
}
