package body

import "fmt"

// Where the body modes of road vehicles lie: about 0.8-2.5 Hz (common
// practice; Gillespie, Fundamentals of Vehicle Dynamics, 1992, chapter 5,
// gives 1-1.5 Hz for passenger cars and up to 2.5 Hz for sports cars
// [memory]).
const (
	TypicalLowHz  = 0.8
	TypicalHighHz = 2.5
)

// wideBandFactor: a band whose upper edge lies more than this times above
// TypicalHighHz spends the fit's model order on dynamics other than the
// body's (our own rule of thumb; the default band ends at 4 Hz).
const wideBandFactor = 2

// BandAdvice says what to change in an analysis band loHz-hiHz (Hz) in which
// a fit did not find both body modes: widen a band that leaves out part of
// TypicalLowHz-TypicalHighHz, narrow one that reaches far above it, and name
// the flags and setup keys that set it.
func BandAdvice(loHz, hiHz float64) string {
	const where = "(--band-low, --band-high, or band_low_hz, band_high_hz in [analysis])"
	switch {
	case loHz > TypicalLowHz || hiHz < TypicalHighHz:
		return fmt.Sprintf("a band that covers %g-%g Hz, where car body modes lie %s", TypicalLowHz, TypicalHighHz, where)
	case hiHz > wideBandFactor*TypicalHighHz:
		return fmt.Sprintf("a narrower band around the body modes, about %g-%g Hz: a wide band spends the fit on other dynamics %s",
			TypicalLowHz, TypicalHighHz, where)
	}
	return "another band " + where
}
