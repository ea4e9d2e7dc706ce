package modal

import (
	"fmt"
	"math"
	"sort"

	"github.com/ridemodes/ridemodes/identify/spectral"
)

// MaxHalfPowerDamping is the damping ratio above which the half-power rule
// is flagged as unreliable (WarnHeavyDamping) [common practice].
const MaxHalfPowerDamping = 0.1

// QuickMode is one peak of the CMIF with its half-power estimate.
type QuickMode struct {
	Curve              int     // CMIF curve (0: largest singular value)
	PeakHz             float64 // frequency of the peak bin [Hz]
	PeakValue          float64 // singular value at the peak
	HalfPowerLowHz     float64 // lower half-power frequency [Hz]; NaN if missing
	HalfPowerHighHz    float64 // upper half-power frequency [Hz]; NaN if missing
	NaturalFrequencyHz float64 // from the half-power points; PeakHz when they are missing
	DampingRatio       float64 // from the half-power points; NaN when missing
}

// halfPower returns the damping ratio and natural frequency of one mode from
// its half-power frequencies f1 < f2 by the exact relations for a
// receptance-type FRF (displacement per force, or any ratio of like
// quantities near its peak) [derived, design notes domain.md]:
//
//	q = (f2^2 - f1^2)/(f2^2 + f1^2)
//	zeta^2 = (1 - 1/sqrt(1 + q^2))/2
//	fn^2 = (f1^2 + f2^2)/(2 (1 - 2 zeta^2))
//
// A transmissibility behaves near a body-mode peak like a receptance-type
// ratio: it is a modal sum of 1/(omega_n^2 - omega^2 + 2 i zeta omega_n omega)
// terms times a numerator (k + i omega c) that varies slowly across the peak.
func halfPower(f1, f2 float64) (zeta, fnHz float64) {
	a, b := f1*f1, f2*f2
	q := (b - a) / (b + a)
	z2 := (1 - 1/math.Sqrt(1+q*q)) / 2
	return math.Sqrt(z2), math.Sqrt((a + b) / (2 * (1 - 2*z2)))
}

// QuickEstimate picks the peaks of the CMIF curves in [bandLoHz, bandHiHz]
// and estimates each peak's natural frequency and damping ratio by the
// half-power rule (see halfPower). It is the quick, naive estimate: it
// assumes light damping and well-separated modes, and its warnings say when
// those assumptions fail. A peak must be the largest value within
// +-peakSpanFraction of its frequency and reach peakFloor of its curve's
// largest value in the band.
func QuickEstimate(set *FRFSet, bandLoHz, bandHiHz float64) ([]QuickMode, []Warning) {
	if !(bandHiHz > bandLoHz) {
		panic(fmt.Sprintf("modal: QuickEstimate band %g-%g Hz is empty", bandLoHz, bandHiHz))
	}
	const (
		peakSpanFraction = 0.05 // a peak dominates +-5 % of its frequency
		peakFloor        = 0.25 // and reaches a quarter of its curve's maximum
		minProminence    = 0.1  // and stands 10 % above the dip to each side
	)
	c := Indicator(set)
	var ks []int
	for k, f := range c.FreqHz {
		if spectral.InBand([2]float64{bandLoHz, bandHiHz}, f) && !math.IsNaN(c.Singular[0][k]) {
			ks = append(ks, k)
		}
	}
	var modes []QuickMode
	var warns []Warning
	if len(ks) < 3 {
		return nil, []Warning{{WarnNoPeak, fmt.Sprintf("fewer than 3 usable bins in %.3g-%.3g Hz: no peak to pick", bandLoHz, bandHiHz)}}
	}
	for j, curve := range c.Singular {
		top := 0.0
		for _, k := range ks {
			top = math.Max(top, curve[k])
		}
		for n := 1; n < len(ks)-1; n++ {
			k := ks[n]
			v := curve[k]
			if v < peakFloor*top || !dominates(c.FreqHz, curve, ks, n, peakSpanFraction) ||
				prominence(curve, ks, n) < minProminence*v {
				continue
			}
			if near(modes, c.FreqHz[k], peakSpanFraction) {
				continue
			}
			m := QuickMode{Curve: j, PeakHz: c.FreqHz[k], PeakValue: v}
			m.HalfPowerLowHz = crossing(c.FreqHz, curve, ks, n, -1, v/math.Sqrt2)
			m.HalfPowerHighHz = crossing(c.FreqHz, curve, ks, n, +1, v/math.Sqrt2)
			if math.IsNaN(m.HalfPowerLowHz) || math.IsNaN(m.HalfPowerHighHz) {
				m.NaturalFrequencyHz, m.DampingRatio = m.PeakHz, nan()
				warns = append(warns, Warning{WarnNoHalfPower, fmt.Sprintf(
					"peak at %.3f Hz (CMIF curve %d) lacks a half-power point in the band: no damping estimate; "+
						"the damping may be over 0.38, or the band too narrow", m.PeakHz, j+1)})
			} else {
				m.DampingRatio, m.NaturalFrequencyHz = halfPower(m.HalfPowerLowHz, m.HalfPowerHighHz)
				if m.DampingRatio > MaxHalfPowerDamping {
					warns = append(warns, Warning{WarnHeavyDamping, fmt.Sprintf(
						"peak at %.3f Hz: half-power damping ratio %.3f is over %.2g, where the half-power rule "+
							"(one light, isolated mode) is unreliable; use the fit", m.PeakHz, m.DampingRatio, MaxHalfPowerDamping)})
				}
			}
			modes = append(modes, m)
		}
	}
	sort.Slice(modes, func(a, b int) bool { return modes[a].PeakHz < modes[b].PeakHz })
	switch {
	case len(modes) == 0:
		warns = append(warns, Warning{WarnNoPeak, fmt.Sprintf("no CMIF peak in %.3g-%.3g Hz", bandLoHz, bandHiHz)})
	case len(modes) == 1:
		warns = append(warns, Warning{WarnOverlap, fmt.Sprintf(
			"one peak only (%.3f Hz): the two body modes may be merged into one hump, so the half-power band "+
				"spans both and overstates the damping; use the fit", modes[0].PeakHz)})
	}
	for n := 1; n < len(modes); n++ {
		lo, hi := modes[n-1], modes[n]
		if !(lo.HalfPowerHighHz < hi.HalfPowerLowHz) { // NaN counts as overlapping
			warns = append(warns, Warning{WarnOverlap, fmt.Sprintf(
				"peaks at %.3f and %.3f Hz overlap (their half-power bands meet): each half-power estimate "+
					"is biased by the other mode; use the fit", lo.PeakHz, hi.PeakHz)})
		}
	}
	return modes, warns
}

// dominates reports whether curve at ks[n] is the largest value among the
// bins within +-span*f of its frequency, and larger than both neighbours.
func dominates(freqHz, curve []float64, ks []int, n int, span float64) bool {
	k := ks[n]
	v := curve[k]
	if !(v > curve[ks[n-1]] && v >= curve[ks[n+1]]) {
		return false
	}
	for _, kk := range ks {
		if math.Abs(freqHz[kk]-freqHz[k]) <= span*freqHz[k] && curve[kk] > v {
			return false
		}
	}
	return true
}

// prominence is how far the peak at ks[n] stands above the higher of the
// two dips that separate it from a higher value (or the band's end) on
// each side; noise ripples on a broad hump have little of it.
func prominence(curve []float64, ks []int, n int) float64 {
	peak := curve[ks[n]]
	dip := func(dir int) float64 {
		low := peak
		for m := n + dir; m >= 0 && m < len(ks); m += dir {
			v := curve[ks[m]]
			if v > peak {
				break
			}
			low = math.Min(low, v)
		}
		return low
	}
	return peak - math.Max(dip(-1), dip(+1))
}

func near(modes []QuickMode, fHz, span float64) bool {
	for _, m := range modes {
		if math.Abs(m.PeakHz-fHz) <= span*fHz {
			return true
		}
	}
	return false
}

// crossing walks from ks[n] in direction dir until the curve falls below
// level and returns the linearly interpolated frequency of the crossing; NaN
// when the band ends or the curve rises above the peak first.
func crossing(freqHz, curve []float64, ks []int, n, dir int, level float64) float64 {
	peak := curve[ks[n]]
	for m := n + dir; m >= 0 && m < len(ks); m += dir {
		v := curve[ks[m]]
		if v > peak {
			return nan()
		}
		if v < level {
			prev := curve[ks[m-dir]]
			f0, f1 := freqHz[ks[m-dir]], freqHz[ks[m]]
			return f0 + (f1-f0)*(prev-level)/(prev-v)
		}
	}
	return nan()
}
