package decay

import (
	"errors"
	"fmt"

	"github.com/ridemodes/ridemodes/identify/body"
)

// ErrTooFewModes is matched (errors.Is) by a *ModeCountError.
var ErrTooFewModes = errors.New("fewer than two body modes in the decay")

// ModeCountError reports that the fit did not find both body modes.
type ModeCountError struct {
	Found                 int     // physical modes found
	BandLowHz, BandHighHz float64 // the band searched
	Stage                 string  // "stabilisation" or "refinement"
}

func (e *ModeCountError) Error() string {
	return fmt.Sprintf("%s found %d body mode(s) in %.3g-%.3g Hz, need bounce and pitch; check that the "+
		"sensors are far enough apart to see pitch, %s, or drop from higher blocks for a decay "+
		"that stands further above the noise", e.Stage, e.Found, e.BandLowHz, e.BandHighHz, body.BandAdvice(e.BandLowHz, e.BandHighHz))
}

// Is lets errors.Is match ErrTooFewModes.
func (e *ModeCountError) Is(target error) bool { return target == ErrTooFewModes }

// ErrShortDecay is matched (errors.Is) by a *ShortDecayError.
var ErrShortDecay = errors.New("the decay is too short to fit")

// ShortDecayError reports a fit window with too few samples above the noise.
type ShortDecayError struct {
	WindowS     float64 // usable window after settling and filtering
	NeedS       float64
	Samples     int // samples in the window (after decimation)
	NeedSamples int
	EventIndex  int
}

func (e *ShortDecayError) Error() string {
	return fmt.Sprintf("event %d leaves %.3g s (%d samples) of free decay above the noise after settling, "+
		"need %.3g s and %d samples; drop from higher blocks, lower the sensor noise, shorten the settling time, "+
		"or log at a higher rate", e.EventIndex, e.WindowS, e.Samples, e.NeedS, e.NeedSamples)
}

// Is lets errors.Is match ErrShortDecay.
func (e *ShortDecayError) Is(target error) bool { return target == ErrShortDecay }

// ErrNonFinite is matched (errors.Is) by a *NonFiniteError.
var ErrNonFinite = errors.New("a sample is not finite")

// NonFiniteError reports a NaN or infinite sample.
type NonFiniteError struct{ Channel, Index int }

func (e *NonFiniteError) Error() string {
	return fmt.Sprintf("channel %d, sample %d is not finite; repair or trim the log", e.Channel, e.Index)
}

// Is lets errors.Is match ErrNonFinite.
func (e *NonFiniteError) Is(target error) bool { return target == ErrNonFinite }

// errNumerical wraps a numerical failure of the fit.
func errNumerical(what string) error {
	return fmt.Errorf("%s; the decay may hold less than two modes' worth of information: check the "+
		"window and the band, or try a lower --max-model-order", what)
}

// EventRangeError reports a request for an event the log does not have.
type EventRangeError struct{ Asked, Found int }

func (e *EventRangeError) Error() string {
	return fmt.Sprintf("--event %d asks for a release the log does not have: it holds %d, numbered from 0 to %d",
		e.Asked, e.Found, e.Found-1)
}
