package spectral

import (
	"errors"
	"fmt"
)

// ErrTooShort is matched (errors.Is) by a ShortRecordError.
var ErrTooShort = errors.New("record too short")

// ErrNonFinite is matched (errors.Is) by a NonFiniteError.
var ErrNonFinite = errors.New("non-finite sample")

// ShortRecordError reports a record that holds fewer whole segments than an
// estimate needs.
type ShortRecordError struct {
	Samples    int // samples per channel seen
	SegmentLen int // samples per segment
	Segments   int // whole segments available
	Need       int // whole segments needed
}

func (e *ShortRecordError) Error() string {
	return fmt.Sprintf("record too short: %d samples give %d whole segments of %d, need %d; record longer or use shorter segments",
		e.Samples, e.Segments, e.SegmentLen, e.Need)
}

// Is reports whether target is ErrTooShort.
func (e *ShortRecordError) Is(target error) bool { return target == ErrTooShort }

// NonFiniteError reports the first NaN or infinite sample written.
type NonFiniteError struct {
	Channel int // channel index
	Sample  int // 0-based sample index in the stream of that channel
	Value   float64
}

func (e *NonFiniteError) Error() string {
	return fmt.Sprintf("channel %d, sample %d is %g: remove or repair the bad samples before estimating spectra",
		e.Channel, e.Sample, e.Value)
}

// Is reports whether target is ErrNonFinite.
func (e *NonFiniteError) Is(target error) bool { return target == ErrNonFinite }
