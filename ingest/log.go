package ingest

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// Options configure a log reader. The zero value reads every channel of a
// log that has a time column, with no window and no checks against the
// analysis band.
type Options struct {
	// Channels are the header names (without unit) of the channels to
	// convert, in the order the Block and Log data slices follow. Names match
	// exactly; empty means every column except the time column.
	Channels []string

	// SampleRateHz is the sample rate of a log without a time column (the
	// setup's [analysis] sample rate). With a time column it is only used as
	// the target grid when Resample is set; a log whose own rate differs from
	// it by more than 1 % gets a WarnRateMismatch warning.
	SampleRateHz float64

	// StartS and EndS select a window, in seconds relative to the first
	// sample's time: samples with StartS <= t-t0 <= EndS are kept. EndS == 0
	// means the end of the log. A window that is empty or starts after the
	// log's last sample is an error (ErrWindow); an end after the last sample
	// reads to the end of the log with a WarnEndClamped warning.
	StartS, EndS float64

	// Resample, an explicit opt-in, accepts a log whose time steps jitter by
	// more than 1 % and interpolates it linearly onto a uniform grid (step:
	// 1/SampleRateHz when given, else the median of the log's first 32 steps,
	// the rate of the interpolated samples exactly), with a WarnResampled
	// warning that states the log's own rate, fitted to all its stamps. Linear interpolation is a low-pass of its
	// own (sinc^2 in frequency): fine for body modes far below the sample
	// rate, not for content near Nyquist. Time going backwards or repeating is
	// an error even with Resample. A log without a time column is uniform by
	// definition: Resample does nothing to it.
	Resample bool

	// BlockSamples is the number of samples per Block handed to the consumer
	// (default 4096). The last block may be shorter.
	BlockSamples int

	// MinDurationS is the shortest record (after windowing) the analysis
	// can use; a shorter one is an error (ErrTooShort). 0 skips the check.
	MinDurationS float64

	// BandHighHz is the upper edge of the analysis band; a sample rate under
	// 2.56 times it gets a WarnRateLow warning. 0 skips the check.
	BandHighHz float64

	// Progress, when not nil, is called as the file is read (about every
	// MiB and once at the end) with the bytes read so far and the total size
	// (-1 when unknown). The package itself never writes to a terminal.
	Progress func(readBytes, totalBytes int64)
}

// Column is one column of the header.
type Column struct {
	Index int    `json:"index"` // 0-based position in the row
	Name  string `json:"name"`  // header name without unit, spaces and quotes trimmed
	Unit  string `json:"unit"`  // unit as written between the brackets ("" when none)
	// Scale converts a value in Unit to SI (m/s^2 for accelerations, s for
	// time); 0 when the unit is not one this package knows (only an error
	// for a column that is read).
	Scale     float64 `json:"scale_to_si"`
	Time      bool    `json:"time"`      // the time column
	Requested bool    `json:"requested"` // converted for the caller
}

// Info is what Open learns from the notes and the header.
type Info struct {
	Path  string   `json:"path"`  // file name used in messages
	Notes []string `json:"notes"` // note lines before the header, without the leading '#' and one space
	// HeaderLine is the 1-based line number of the header row.
	HeaderLine int `json:"header_line"`
	// Delimiter is ',', ';' or '\t'.
	Delimiter byte `json:"-"`
	// DecimalComma is true when the cells use ',' as the decimal separator
	// (only with ';' or tab delimiters), as seen in the first data rows.
	DecimalComma bool     `json:"decimal_comma"`
	Columns      []Column `json:"columns"`
	// HasTime is true when the first column is a time column.
	HasTime bool `json:"has_time"`
	// Channels are the requested channel names in data order, and
	// ChannelColumns their indices into Columns.
	Channels       []string `json:"channels"`
	ChannelColumns []int    `json:"-"`
	// SizeBytes is the file size, -1 when unknown.
	SizeBytes int64 `json:"size_bytes"`
}

// Block is a run of consecutive samples handed to a Stream consumer.
//
// Data has one slice per requested channel (Info.Channels order), in SI
// units (m/s^2), all of the same length. The slices are reused for the next
// block once the consumer returns: copy what must outlive the call.
type Block struct {
	// Start is the index of the block's first sample within the window.
	Start int
	// TimeS is the time of the block's first sample as the log counts it
	// (s); sample j of the block is at about TimeS + j/SampleRateHz.
	TimeS float64
	// SampleRateHz is the stream's rate as far as the first rows tell it:
	// with a time column 1/(median of the first 32 steps), which can be a
	// unit of the stamps' last decimal off per step (255.754 Hz for a 256 Hz
	// log written to 4 decimals); else the grid's or the given rate, which
	// are exact. It is for what must be fixed before the end of the log and
	// is set in fractions of the rate (a decimation factor, a filter's
	// taps). Frequencies must come from Summary.SampleRateHz, fitted to the
	// whole log. The two differ by at most the jitter check's tolerance.
	SampleRateHz float64
	Data         [][]float64
}

// Len is the number of samples in the block.
func (b Block) Len() int {
	if len(b.Data) == 0 {
		return 0
	}
	return len(b.Data[0])
}

// ChannelStats summarise one channel over the window, in SI units.
type ChannelStats struct {
	Name  string  `json:"name"`
	Unit  string  `json:"unit"` // SI unit of the values ("m/s^2")
	Min   float64 `json:"min"`
	Max   float64 `json:"max"`
	Mean  float64 `json:"mean"`
	RMS   float64 `json:"rms"`
	Std   float64 `json:"std"` // population standard deviation (mean removed)
	Count int     `json:"count"`
}

// Summary is what Stream reports once the whole log has been read.
type Summary struct {
	// Samples is the number of samples delivered (inside the window, after
	// resampling when Resample is set).
	Samples int `json:"samples"`
	// Rows is the number of data rows in the whole file.
	Rows int `json:"rows"`
	// SampleRateHz is the uniform rate of the delivered samples, the one
	// every frequency is computed with: from the time column, 1/dt of the
	// least-squares line t_i = a + i dt through every stamp of the log (see
	// the package documentation); the grid's rate when resampled;
	// Options.SampleRateHz without a time column.
	SampleRateHz float64 `json:"sample_rate_hz"`
	// T0S is the time of the first delivered sample as the log counts it
	// (s): its own stamp, not the fitted line's value there.
	T0S float64 `json:"t0_s"`
	// DurationS is the record length Samples/SampleRateHz (s).
	DurationS float64 `json:"duration_s"`
	// LogSpanS is the span of the whole log, last minus first sample time (s).
	LogSpanS float64 `json:"log_span_s"`
	// SHA256 is the hex digest of the whole file's bytes.
	SHA256   string         `json:"sha256"`
	Bytes    int64          `json:"bytes"`
	Resample bool           `json:"resampled"`
	Channels []ChannelStats `json:"channels"`
	Warnings []Warning      `json:"warnings"`
}

// Log is a whole (windowed) log in memory, as ReadAll returns it.
type Log struct {
	Info    Info
	Summary Summary
	// Data has one slice per requested channel, SI units.
	Data [][]float64
}

// Channel returns the data of the named channel, or nil.
func (l *Log) Channel(name string) []float64 {
	for i, n := range l.Info.Channels {
		if n == name {
			return l.Data[i]
		}
	}
	return nil
}

// WarningCode names a kind of data-quality warning; the codes are stable
// (they go into the result JSON).
type WarningCode string

// The warning codes.
const (
	WarnUnitMissing   WarningCode = "unit_missing"   // no [unit] in the header: m/s^2 (or s) assumed
	WarnClipping      WarningCode = "clipping"       // runs of samples at the channel's extreme value
	WarnDropout       WarningCode = "dropout"        // runs of identical values
	WarnDCOffset      WarningCode = "dc_offset"      // mean large against the signal
	WarnHighPass      WarningCode = "high_pass"      // spectrum falls away below 1 Hz like an IEPE sensor's
	WarnRateLow       WarningCode = "rate_low"       // sample rate too low for the band
	WarnRateMismatch  WarningCode = "rate_mismatch"  // time column and given sample rate disagree
	WarnResampled     WarningCode = "resampled"      // non-uniform sampling interpolated onto a grid
	WarnDuplicateName WarningCode = "duplicate_name" // an unread column's name appears twice
	WarnEndClamped    WarningCode = "end_clamped"    // the window's end lies after the log's: read to the end
)

// Warning is a data-quality finding, returned as a value for the result
// JSON and the summary; the package never prints.
type Warning struct {
	Code    WarningCode `json:"code"`
	Channel string      `json:"channel,omitempty"` // empty for the whole log
	// Line is the 1-based file line where the finding starts, 0 when it
	// concerns the whole log or has no single line.
	Line int `json:"line,omitempty"`
	// TimeS is the time of the finding relative to the first sample (s),
	// nil when it concerns the whole log.
	TimeS   *float64 `json:"time_s,omitempty"`
	Message string   `json:"message"`
}

func (w Warning) String() string {
	var b strings.Builder
	b.WriteString(string(w.Code))
	if w.Channel != "" {
		b.WriteString(" [")
		b.WriteString(w.Channel)
		b.WriteString("]")
	}
	b.WriteString(": ")
	b.WriteString(w.Message)
	if w.Line > 0 || w.TimeS != nil {
		b.WriteString(" (")
		if w.Line > 0 {
			b.WriteString("line ")
			b.WriteString(strconv.Itoa(w.Line))
		}
		if w.TimeS != nil {
			if w.Line > 0 {
				b.WriteString(", ")
			}
			b.WriteString("t = ")
			b.WriteString(strconv.FormatFloat(*w.TimeS, 'f', 3, 64))
			b.WriteString(" s")
		}
		b.WriteString(")")
	}
	return b.String()
}

// The kinds of bad input; every error from this package wraps one of them,
// so errors.Is(err, ingest.ErrRagged) and the like work. errors.As with a
// *ParseError gives the file, line and column.
var (
	ErrEmpty          = errors.New("empty log")                        // no bytes, or no header (blank or note lines only)
	ErrHeaderOnly     = errors.New("header but no data rows")          // nothing after the header
	ErrHeader         = errors.New("bad header")                       // an empty name, a time column not first, a malformed unit
	ErrRagged         = errors.New("wrong number of cells")            // a row with more or fewer cells than the header
	ErrNotNumber      = errors.New("not a number")                     // a cell that does not parse, an empty cell
	ErrNotFinite      = errors.New("not finite")                       // NaN, Inf, or a number out of float64 range
	ErrDuplicateName  = errors.New("duplicate column name")            // a read channel (or time) named twice
	ErrMissingChannel = errors.New("channel not in the log")           // a requested channel not in the header
	ErrUnknownUnit    = errors.New("unknown unit")                     // a read column's unit not known
	ErrTimeOrder      = errors.New("time not increasing")              // time going backwards or repeating
	ErrNonUniform     = errors.New("non-uniform sampling")             // a step off by more than 1 %
	ErrNoSampleRate   = errors.New("no sample rate")                   // no time column and no Options.SampleRateHz
	ErrTooShort       = errors.New("record too short")                 // shorter than Options.MinDurationS, or under 2 samples
	ErrConstant       = errors.New("constant channel")                 // all zero or all the same value
	ErrLineTooLong    = errors.New("line too long")                    // over MaxLineBytes
	ErrBinary         = errors.New("binary data")                      // NUL bytes, invalid UTF-8 in notes or header
	ErrWindow         = errors.New("time window empty or outside log") // StartS/EndS
	ErrDecimal        = errors.New("mixed decimal separators")         // '.' in a decimal-comma log or the reverse
	ErrBlankLine      = errors.New("blank line inside the data")       // an empty line followed by more rows
)

// ParseError locates a problem in a log. Line is 1-based as an editor
// counts (0 when the problem is the whole log); Column is the header name
// of the cell's column ("" when the problem is not one cell's).
type ParseError struct {
	Path        string
	Line        int
	Column      string
	ColumnIndex int   // 0-based, -1 when Column is ""
	Kind        error // one of the Err* sentinels
	Detail      string
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.Path)
	if e.Line > 0 {
		b.WriteString(":")
		b.WriteString(strconv.Itoa(e.Line))
	}
	b.WriteString(": ")
	if e.Column != "" {
		fmt.Fprintf(&b, "column %q: ", e.Column)
	}
	b.WriteString(e.Kind.Error())
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	return b.String()
}

// Unwrap returns the sentinel, for errors.Is.
func (e *ParseError) Unwrap() error { return e.Kind }
