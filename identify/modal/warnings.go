package modal

import (
	"errors"
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/identify/body"
)

// WarningCode classifies a Warning.
type WarningCode string

// Warning codes.
const (
	// WarnOverlap: two peaks whose half-power bands overlap, or a single
	// merged hump that may hide a second mode; the half-power rule assumes
	// well-separated modes.
	WarnOverlap WarningCode = "overlap"
	// WarnHeavyDamping: a half-power damping ratio over MaxHalfPowerDamping;
	// the rule is only reliable for light damping.
	WarnHeavyDamping WarningCode = "heavy-damping"
	// WarnNoHalfPower: a peak without one of its half-power points (no
	// damping estimate); above a damping ratio of about 0.38 one point
	// does not exist.
	WarnNoHalfPower WarningCode = "no-half-power"
	// WarnNoPeak: no peak in the band.
	WarnNoPeak WarningCode = "no-peak"
	// WarnExtraModes: more than two stable physical poles in the band; the
	// two with the most stable orders were kept.
	WarnExtraModes WarningCode = "extra-modes"
	// WarnPoorFit: the normalised residual or the reduced chi-square of the
	// refined fit is large: the model or the error bands do not describe the
	// data. A reduced chi-square over maxChiSquare flags the modes instead
	// (body.Mode.Flagged).
	WarnPoorFit WarningCode = "poor-fit"
	// WarnLowCoherence: the mean multiple coherence of an output in the band
	// is low; its FRFs carry little information.
	WarnLowCoherence WarningCode = "low-coherence"
	// WarnNotRankOne: a mode's residue matrix is far from rank one, which
	// base excitation implies; the shape is uncertain.
	WarnNotRankOne WarningCode = "not-rank-one"
	// WarnSkippedBins: bins in the band with unusable data were left out.
	WarnSkippedBins WarningCode = "skipped-bins"
	// WarnFrequencyStableOnly: a body pole was stable across model orders in
	// frequency and shape but not in damping; the refinement started from it.
	WarnFrequencyStableOnly WarningCode = "frequency-stable-only"
)

// Warning is a condition the user should know about, returned as data.
type Warning struct {
	Code    WarningCode
	Message string
}

// ErrTooFewModes is matched (errors.Is) by a *ModeCountError.
var ErrTooFewModes = errors.New("fewer than two stable modes in the band")

// ModeCountError reports that the fit found fewer than the two body modes.
type ModeCountError struct {
	Found                 int     // stable physical modes found
	BandLowHz, BandHighHz float64 // the band searched
	Stage                 string  // "stabilisation" or "refinement"
}

func (e *ModeCountError) Error() string {
	return fmt.Sprintf("%s found %d stable physical mode(s) in %.3g-%.3g Hz, need the two body modes; "+
		"try a longer log (more averages), %s, a higher --max-model-order, "+
		"and check the coherence of the FRFs in the band", e.Stage, e.Found, e.BandLowHz, e.BandHighHz, body.BandAdvice(e.BandLowHz, e.BandHighHz))
}

// Is reports whether target is ErrTooFewModes.
func (e *ModeCountError) Is(target error) bool { return target == ErrTooFewModes }

// ErrTooFewBins is matched (errors.Is) by a *BinCountError.
var ErrTooFewBins = errors.New("too few usable frequency bins in the band")

// BinCountError reports a band with too few usable bins for the fit.
type BinCountError struct {
	Usable, Need          int
	BandLowHz, BandHighHz float64
}

func (e *BinCountError) Error() string {
	return fmt.Sprintf("%d usable bins in %.3g-%.3g Hz, need at least %d; "+
		"widen the band (--band-low, --band-high), use a finer resolution (a longer --segment-samples), or check that the front and rear drives differ (identical drives cannot be separated)",
		e.Usable, e.BandLowHz, e.BandHighHz, e.Need)
}

// Is reports whether target is ErrTooFewBins.
func (e *BinCountError) Is(target error) bool { return target == ErrTooFewBins }

func nan() float64 { return math.NaN() }
