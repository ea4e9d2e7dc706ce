package spectral

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
)

// Anti-alias filter design constants.
const (
	// PassbandFraction is the share of the output Nyquist frequency fs/(2q)
	// kept undistorted by the decimator: the analysis band must lie below
	// PassbandFraction*fs/(2q).
	PassbandFraction = 0.8
	// StopbandAttenuationDB is the Kaiser design attenuation: aliases reach
	// the passband at least this far down.
	StopbandAttenuationDB = 80
	// decimatorChunk bounds the samples buffered per channel per step, so
	// memory stays constant whatever the block length.
	decimatorChunk = 4096
	designMarginDB = 3
)

// BlockWriter takes blocks of samples, one slice per channel; Accumulator
// and Decimator are BlockWriters, and so is a spool (package identify/spool)
// that records a stream for a Bank.
type BlockWriter interface {
	Write(block [][]float64)
}

// Decimator low-passes and downsamples a stream by an integer factor q and
// passes the result on to the next BlockWriter (which must not keep the
// block: its slices are reused). It computes only the kept
// samples: each output is one dot product of the taps with the last L
// inputs. The first outputs wait until L inputs have arrived, so no start-up
// transient is passed on; all channels share the filter delay (L-1)/2 input
// samples, which leaves FRFs between channels unchanged.
//
// The filter is a windowed sinc with a Kaiser window, cut off at the output
// Nyquist frequency fs/(2q), passband edge PassbandFraction fs/(2q),
// stopband edge (2 - PassbandFraction) fs/(2q) (what folds into the passband
// lies beyond it), attenuation StopbandAttenuationDB, unit gain at DC.
//
// References:
//   - J. F. Kaiser, "Nonrecursive digital filter design using the I0-sinh
//     window function", Proc. IEEE Int. Symp. Circuits and Systems, 1974,
//     pp. 20-23.
//   - A. V. Oppenheim and R. W. Schafer, Discrete-Time Signal Processing,
//     3rd ed., Pearson, 2010, Sec. 7.6 (Kaiser window design formulas).
type Decimator struct {
	factor int
	taps   []float64
	next   BlockWriter
	work   [][]float64 // [channel]: input samples base..base+have-1
	have   int
	base   int // stream index of work[ch][0]
	tNext  int // stream index of the newest input of the next output
	out    [][]float64
}

// NewDecimator returns a Decimator by factor for nch channels sampled at
// fsHz, feeding next.
func NewDecimator(factor, nch int, fsHz float64, next BlockWriter) (*Decimator, error) {
	if factor < 1 {
		return nil, fmt.Errorf("decimation factor %d, need at least 1", factor)
	}
	if !(fsHz > 0) || math.IsInf(fsHz, 0) {
		return nil, fmt.Errorf("sample rate %g Hz, need a positive finite rate", fsHz)
	}
	if nch < 1 {
		return nil, fmt.Errorf("no channels")
	}
	taps := antiAliasTaps(factor)
	d := &Decimator{factor: factor, taps: taps, next: next, tNext: len(taps) - 1,
		work: newMatrix(nch, len(taps)-1+decimatorChunk), out: make([][]float64, nch)}
	for ch := range d.out {
		d.out[ch] = make([]float64, 0, decimatorChunk/factor+1)
	}
	return d, nil
}

// Taps returns the filter coefficients (symmetric, odd length).
func (d *Decimator) Taps() []float64 { return d.taps }

// DecimationFactor returns the largest factor q that keeps maxFreqHz inside
// the decimator's passband PassbandFraction fs/(2q), at least 1, allowing
// for a rate rounded low by up to RateSlack: 199.99999999999983 Hz (a rate
// from rounded time steps) and 199.99999 Hz pick the factor of 200 Hz. The
// q so granted puts maxFreqHz at most RateSlack (relative) past the passband
// edge, where the Kaiser filter still has its passband response (the
// transition band is 0.4 of the output Nyquist frequency wide).
func DecimationFactor(fsHz, maxFreqHz float64) int {
	q := int(math.Floor(PassbandFraction * fsHz / (2 * maxFreqHz) * (1 + RateSlack)))
	return max(q, 1)
}

// antiAliasTaps designs the Kaiser windowed-sinc low-pass for factor q
// (frequencies as fractions of the input rate).
func antiAliasTaps(q int) []float64 {
	if q == 1 {
		return []float64{1}
	}
	// Kaiser's formulas miss the target by up to about 1.5 dB (measured in
	// TestAntiAliasFilterMeetsSpec): design with a margin.
	a := float64(StopbandAttenuationDB) + designMarginDB
	nyqOut := 0.5 / float64(q)
	transition := 2 * math.Pi * (2 - 2*PassbandFraction) * nyqOut // rad/sample
	beta := 0.1102 * (a - 8.7)                                    // A > 50 dB
	order := int(math.Ceil((a - 8) / (2.285 * transition)))
	if order%2 == 1 {
		order++ // odd length, integer delay
	}
	taps := make([]float64, order+1)
	fc := 2 * nyqOut // cutoff as a fraction of the input Nyquist
	i0b := besselI0(beta)
	for n := range taps {
		m := float64(n) - float64(order)/2
		r := 2*float64(n)/float64(order) - 1
		w := besselI0(beta*math.Sqrt(1-r*r)) / i0b
		sinc := 1.0
		if m != 0 {
			sinc = math.Sin(math.Pi*fc*m) / (math.Pi * fc * m)
		}
		taps[n] = fc * sinc * w
	}
	floats.Scale(1/floats.Sum(taps), taps)
	return taps
}

// besselI0 is the modified Bessel function of the first kind, order 0, by
// its power series sum ((x/2)^k/k!)^2 (Abramowitz & Stegun 9.6.12), which
// converges quickly for the Kaiser arguments (x < 12). Written by hand:
// neither the standard library nor gonum's mathext has I0.
func besselI0(x float64) float64 {
	sum, term := 1.0, 1.0
	for k := 1; term > 1e-17*sum; k++ {
		h := x / (2 * float64(k))
		term *= h * h
		sum += term
	}
	return sum
}

// Write filters a block (one slice per channel, equal lengths) and passes
// the kept samples on. It panics if the block does not match the channels.
func (d *Decimator) Write(block [][]float64) {
	if len(block) != len(d.work) {
		panic(fmt.Sprintf("spectral: block has %d channels, decimator has %d", len(block), len(d.work)))
	}
	m := len(block[0])
	for ch, x := range block {
		if len(x) != m {
			panic(fmt.Sprintf("spectral: channel %d of the block has %d samples, channel 0 has %d", ch, len(x), m))
		}
	}
	l := len(d.taps)
	for off := 0; off < m; {
		k := min(len(d.work[0])-d.have, m-off)
		for ch, x := range block {
			copy(d.work[ch][d.have:], x[off:off+k])
		}
		d.have += k
		off += k
		for ch := range d.out {
			d.out[ch] = d.out[ch][:0]
		}
		for ; d.tNext < d.base+d.have; d.tNext += d.factor {
			start := d.tNext - d.base - (l - 1)
			// four channels a call (dot4), the rest one by one
			ch := 0
			for ; ch+4 <= len(d.work); ch += 4 {
				w := d.work[ch : ch+4]
				a, b, c, e := dot4(d.taps, w[0][start:start+l], w[1][start:start+l], w[2][start:start+l], w[3][start:start+l])
				d.out[ch] = append(d.out[ch], a)
				d.out[ch+1] = append(d.out[ch+1], b)
				d.out[ch+2] = append(d.out[ch+2], c)
				d.out[ch+3] = append(d.out[ch+3], e)
			}
			for ; ch < len(d.work); ch++ {
				d.out[ch] = append(d.out[ch], floats.Dot(d.taps, d.work[ch][start:start+l]))
			}
		}
		if len(d.out[0]) > 0 {
			d.next.Write(d.out)
		}
		// Keep the inputs the next output still needs.
		keep := max(d.base+d.have-(d.tNext-(l-1)), 0)
		keep = min(keep, d.have)
		for _, w := range d.work {
			copy(w, w[d.have-keep:d.have])
		}
		d.base += d.have - keep
		d.have = keep
	}
}
