package ingest

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"
)

// MaxLineBytes is the longest line the reader accepts (1 MiB, line end not
// counted); a longer one is an ErrLineTooLong error. It bounds the reader's
// memory whatever the input.
const MaxLineBytes = 1 << 20

// DefaultBlockSamples is the Block length when Options.BlockSamples is 0.
const DefaultBlockSamples = 4096

// jitterTolerance is the largest accepted deviation of one time step from
// the log's step, as a fraction of the step (the contract's 1 %), before the
// allowance for the stamps' rounding (streamer.stampAllowance).
const jitterTolerance = 0.01

// refSteps is the number of first time steps whose median is the reference
// step for the jitter check (and the grid step when resampling). The sample
// rate is not taken from it but fitted to every stamp (stampFit).
const refSteps = 32

// Reader reads one log. Open (or NewReader) reads the notes and the header;
// Stream then reads the rows once. A Reader is not safe for concurrent use.
type Reader struct {
	info   Info
	opt    Options
	closer io.Closer
	src    *lineSource
	line   int // number of the last line read

	delim     byte
	sep       byte // decimal separator in use
	sepLocked bool // sep known (from the first data rows, or a ',' log)
	ncols     int
	trailing  bool    // rows may end with one extra, empty cell
	slot      []int32 // per column: slotSkip, slotTime, or the channel index
	timeScale float64
	scales    []float64 // per channel: to SI

	warnings []Warning
	streamed bool
	nread    int64    // bytes read, at the end
	cells    [][]byte // scratch for quoted rows
}

const (
	slotSkip = -1
	slotTime = -2
)

// Open opens a log file, reads its notes and header and checks the
// requested channels and their units. The caller must Close the Reader (Stream
// and ReadAll do not close it).
func Open(path string, opt Options) (*Reader, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read the log: %w", err)
	}
	size := int64(-1)
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
		size = st.Size()
	}
	r, err := newReader(f, path, size, opt)
	if err != nil {
		f.Close()
		return nil, err
	}
	r.closer = f
	return r, nil
}

// NewReader reads a log from rd, with name standing for the file in messages
// and size its length in bytes for the progress hook (-1 when unknown): the
// reader of a log held in memory, such as a simulated one.
func NewReader(rd io.Reader, name string, size int64, opt Options) (*Reader, error) {
	return newReader(rd, name, size, opt)
}

// Close closes the file opened by Open; it is a no-op for NewReader.
func (r *Reader) Close() error {
	if r.closer == nil {
		return nil
	}
	err := r.closer.Close()
	r.closer = nil
	return err
}

// Info describes the log's notes, dialect and columns.
func (r *Reader) Info() Info { return r.info }

func (r *Reader) errAt(line int, col int, kind error, format string, args ...any) *ParseError {
	e := &ParseError{Path: r.info.Path, Line: line, ColumnIndex: col, Kind: kind, Detail: fmt.Sprintf(format, args...)}
	if col >= 0 && col < len(r.info.Columns) {
		e.Column = r.info.Columns[col].Name
	} else {
		e.ColumnIndex = -1
	}
	return e
}

func (r *Reader) errLine(line int, kind error, format string, args ...any) *ParseError {
	return r.errAt(line, -1, kind, format, args...)
}

// readLine returns the next line without its line end ("\n" or "\r\n"),
// valid until the next call; io.EOF at the end.
func (r *Reader) readLine() ([]byte, error) {
	b, err := r.src.readLine()
	if err != nil {
		switch {
		case err == errLineTooLong:
			return nil, r.errLine(r.line+1, ErrLineTooLong,
				"longer than %d bytes; is this a CSV log with line ends?", MaxLineBytes)
		case err == io.EOF:
			return nil, io.EOF
		default:
			return nil, fmt.Errorf("%s: reading line %d: %w", r.info.Path, r.line+1, err)
		}
	}
	r.line++
	if n := len(b); n > 0 && b[n-1] == '\r' {
		b = b[:n-1]
	}
	if len(b) > MaxLineBytes {
		return nil, r.errLine(r.line, ErrLineTooLong, "longer than %d bytes", MaxLineBytes)
	}
	return b, nil
}

func (r *Reader) binaryErr(line int, b []byte, what string) *ParseError {
	if line == 1 && (bytes.HasPrefix(b, []byte{0xff, 0xfe}) || bytes.HasPrefix(b, []byte{0xfe, 0xff})) {
		return r.errLine(line, ErrBinary, "the file is UTF-16 (it starts with a UTF-16 byte order mark); save it as UTF-8")
	}
	if i := bytes.IndexByte(b, 0); i >= 0 {
		hint := "this looks like a binary file, not a CSV log"
		if nul := bytes.Count(b, []byte{0}); len(b) >= 4 && 2*nul >= len(b)-1 {
			hint = "every other byte is NUL: the file may be UTF-16; save it as UTF-8"
		}
		return r.errLine(line, ErrBinary, "NUL byte in the %s at byte %d; %s", what, i+1, hint)
	}
	for _, c := range b {
		if (c < 0x20 && c != '\t' && c != '\r') || c == 0x7f {
			return r.errLine(line, ErrBinary, "control characters and invalid UTF-8 in the %s: this looks like a binary file, not a CSV log", what)
		}
	}
	return r.errLine(line, ErrBinary, "invalid UTF-8 in the %s; save the file as UTF-8 (units like ² or µ in another encoding cause this)", what)
}

func newReader(rd io.Reader, name string, size int64, opt Options) (*Reader, error) {
	r := &Reader{opt: opt}
	r.info.Path = name
	r.info.SizeBytes = size
	if err := checkOptions(name, opt); err != nil {
		return nil, err
	}
	r.src = newLineSource(rd, sha256.New(), size, opt.Progress)

	// notes and the header
	var hline []byte
	for {
		b, err := r.readLine()
		if err == io.EOF {
			if len(r.info.Notes) > 0 {
				return nil, r.errLine(0, ErrEmpty, "only note lines, no header row")
			}
			return nil, r.errLine(0, ErrEmpty, "no header row (the file is empty or blank)")
		}
		if err != nil {
			return nil, err
		}
		if r.line == 1 {
			b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf")) // UTF-8 byte order mark
		}
		if bytes.IndexByte(b, 0) >= 0 {
			return nil, r.binaryErr(r.line, b, "header")
		}
		if !validUTF8(b) {
			// the bytes after the line tell a binary file from a text in
			// another encoding
			more := append(append([]byte{}, b...), r.src.peek(512)...)
			if bytes.IndexByte(more, 0) >= 0 {
				return nil, r.errLine(r.line, ErrBinary, "invalid UTF-8 and NUL bytes: this looks like a binary file, not a CSV log")
			}
			return nil, r.binaryErr(r.line, b, "header")
		}
		t := bytes.TrimSpace(b)
		if len(t) == 0 {
			continue
		}
		if t[0] == '#' {
			note := t[1:]
			if len(note) > 0 && note[0] == ' ' {
				note = note[1:]
			}
			r.info.Notes = append(r.info.Notes, string(note))
			continue
		}
		hline = b
		break
	}
	r.info.HeaderLine = r.line
	r.delim = detectDelimiter(hline)
	r.info.Delimiter = r.delim
	h, err := parseHeader(name, r.line, hline, r.delim)
	if err != nil {
		return nil, err
	}
	r.info.Columns = h.cols
	r.trailing = h.trailing
	r.ncols = len(h.cols)
	r.info.HasTime = h.cols[0].Time

	if err := r.selectChannels(h); err != nil {
		return nil, err
	}
	if !r.info.HasTime && !(opt.SampleRateHz > 0) {
		return nil, r.errLine(r.info.HeaderLine, ErrNoSampleRate,
			"the log has no time column (first column named time or t); give its sample rate with --rate or sample_rate_hz in the setup's [analysis], or add a time column")
	}
	r.detectDecimal()
	return r, nil
}

func checkOptions(name string, opt Options) error {
	bad := func(format string, args ...any) error {
		return &ParseError{Path: name, ColumnIndex: -1, Kind: ErrWindow, Detail: fmt.Sprintf(format, args...)}
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if !finite(opt.StartS) || !finite(opt.EndS) {
		return bad("the window's start and end must be finite numbers")
	}
	if opt.StartS < 0 {
		return bad("the window starts at %g s, before the log's first sample (0 s)", opt.StartS)
	}
	if opt.EndS < 0 || (opt.EndS != 0 && opt.EndS <= opt.StartS) {
		return bad("the window ends at %g s, not after its start at %g s", opt.EndS, opt.StartS)
	}
	if math.IsNaN(opt.SampleRateHz) || math.IsInf(opt.SampleRateHz, 0) || opt.SampleRateHz < 0 {
		return &ParseError{Path: name, ColumnIndex: -1, Kind: ErrNoSampleRate,
			Detail: fmt.Sprintf("the sample rate %g Hz is not a positive number", opt.SampleRateHz)}
	}
	return nil
}

// selectChannels maps the requested channels to columns and checks names
// and units.
func (r *Reader) selectChannels(h *header) error {
	cols := r.info.Columns
	byName := make(map[string][]int, len(cols))
	for i, c := range cols {
		byName[c.Name] = append(byName[c.Name], i)
	}
	want := r.opt.Channels
	if len(want) == 0 {
		for _, c := range cols {
			if !c.Time {
				want = append(want, c.Name)
			}
		}
		if len(want) == 0 {
			return r.errLine(r.info.HeaderLine, ErrMissingChannel, "the log has a time column but no channel columns")
		}
	}
	r.slot = make([]int32, len(cols))
	for i := range r.slot {
		r.slot[i] = slotSkip
	}
	if r.info.HasTime {
		if idx := byName[cols[0].Name]; len(idx) > 1 {
			return r.errAt(r.info.HeaderLine, idx[1], ErrDuplicateName,
				"the time column's name appears again in column %d", idx[1]+1)
		}
		r.slot[0] = slotTime
		c := cols[0]
		if c.Scale == 0 {
			return r.errAt(r.info.HeaderLine, 0, ErrUnknownUnit, "time unit [%s]; use one of %s", c.Unit, knownUnitsList(true))
		}
		if !h.hasUnit[0] {
			r.warnings = append(r.warnings, Warning{Code: WarnUnitMissing, Channel: c.Name, Line: r.info.HeaderLine,
				Message: "the time column has no [unit]: seconds assumed"})
		}
		r.timeScale = c.Scale
	}
	seen := map[string]bool{}
	for k, name := range want {
		if seen[name] {
			return &ParseError{Path: r.info.Path, ColumnIndex: -1, Column: name, Kind: ErrDuplicateName,
				Detail: "the channel is requested twice"}
		}
		seen[name] = true
		idx := byName[name]
		if len(idx) == 0 {
			return r.missingChannel(name)
		}
		if len(idx) > 1 {
			return r.errAt(r.info.HeaderLine, idx[1], ErrDuplicateName,
				"the name is in columns %d and %d; rename one so the channel is not ambiguous", idx[0]+1, idx[1]+1)
		}
		i := idx[0]
		c := &cols[i]
		if c.Time {
			return r.errAt(r.info.HeaderLine, i, ErrHeader, "the time column cannot be read as a channel")
		}
		if c.Scale == 0 {
			return r.errAt(r.info.HeaderLine, i, ErrUnknownUnit, "[%s]; use one of %s", c.Unit, knownUnitsList(false))
		}
		if !h.hasUnit[i] {
			r.warnings = append(r.warnings, Warning{Code: WarnUnitMissing, Channel: name, Line: r.info.HeaderLine,
				Message: "no [unit] in the header: m/s^2 assumed"})
		}
		c.Requested = true
		r.slot[i] = int32(k)
		r.scales = append(r.scales, c.Scale)
		r.info.Channels = append(r.info.Channels, name)
		r.info.ChannelColumns = append(r.info.ChannelColumns, i)
	}
	// duplicates among columns nobody reads do no harm, but say so
	names := make([]string, 0, len(byName))
	for n, idx := range byName {
		if len(idx) > 1 && !seen[n] {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	for _, n := range names {
		r.warnings = append(r.warnings, Warning{Code: WarnDuplicateName, Channel: n, Line: r.info.HeaderLine,
			Message: fmt.Sprintf("the name is in columns %v (not read)", plus1(byName[n]))})
	}
	return nil
}

func plus1(idx []int) []int {
	out := make([]int, len(idx))
	for i, v := range idx {
		out[i] = v + 1
	}
	return out
}

func (r *Reader) missingChannel(name string) error {
	var have []string
	hint := ""
	for _, c := range r.info.Columns {
		if !c.Time {
			have = append(have, c.Name)
		}
		switch {
		case strings.EqualFold(c.Name, name) || strings.EqualFold(strings.ReplaceAll(c.Name, " ", "_"), name):
			hint = fmt.Sprintf("; did you mean %q? (names match exactly)", c.Name)
		case strings.HasPrefix(c.Name, name+" (") || strings.HasPrefix(c.Name, name+"("):
			hint = fmt.Sprintf("; if %q is this channel with its unit, write the unit in brackets after the name, "+
				"e.g. \"%s [m/s^2]\" (units: %s)", c.Name, name, knownUnitsList(false))
		}
	}
	return &ParseError{Path: r.info.Path, Line: r.info.HeaderLine, ColumnIndex: -1, Column: name, Kind: ErrMissingChannel,
		Detail: fmt.Sprintf("no such column in the header (it has %s)%s", quoteList(have), hint)}
}

func quoteList(s []string) string {
	q := make([]string, len(s))
	for i, v := range s {
		q[i] = fmt.Sprintf("%q", v)
	}
	if len(q) > 12 {
		q = append(q[:12], fmt.Sprintf("and %d more", len(s)-12))
	}
	return strings.Join(q, ", ")
}

// detectDecimal fixes the decimal separator: '.' for a ',' log; for ';' and
// tab logs the first '.' or ',' in the first 16 KiB of data rows decides, and
// when they hold neither the first cell that has one decides later.
func (r *Reader) detectDecimal() {
	r.sep = '.'
	if r.delim == ',' {
		r.sepLocked = true
		return
	}
	peek := r.src.peek(16 << 10)
	for _, c := range peek {
		if c == '.' || c == ',' {
			r.sep = c
			r.sepLocked = true
			break
		}
	}
	r.info.DecimalComma = r.sep == ','
}

// Stream reads the rows and hands the samples to consume in blocks of
// Options.BlockSamples (see Block: its slices are reused). It checks every
// row of the whole log (also outside the window) and returns the Summary
// with the data-quality warnings, or the first error. An error returned by
// consume stops the stream and is returned as is. Stream can be called once.
func (r *Reader) Stream(consume func(b Block) error) (Summary, error) {
	if r.streamed {
		return Summary{}, errors.New("Stream called twice on one Reader")
	}
	r.streamed = true
	st := newStreamer(r, consume)
	p := newPipeline(r)
	defer p.stop()
	pendingBlank := 0
	for {
		c := p.next()
		if c == nil {
			break
		}
		if pendingBlank != 0 && c.firstNonBlank != 0 {
			return Summary{}, blankLineErr(r, pendingBlank, c.firstNonBlank)
		}
		if err := st.chunk(c); err != nil {
			return Summary{}, err
		}
		if c.err != nil {
			return Summary{}, c.err
		}
		if c.firstNonBlank != 0 || pendingBlank == 0 {
			pendingBlank = c.blank
		}
		if r.opt.Progress != nil {
			r.opt.Progress(c.job.endOffset, r.info.SizeBytes)
		}
		p.release(c)
	}
	r.nread = p.ch.nread
	if r.opt.Progress != nil {
		r.opt.Progress(r.nread, r.info.SizeBytes)
	}
	return st.finish()
}

// ReadAll reads the rest of the (windowed) log into memory: for short logs;
// long logs are better streamed (Stream).
func (r *Reader) ReadAll() (*Log, error) {
	data := make([][]float64, len(r.info.Channels))
	if r.info.SizeBytes > 0 && r.opt.StartS == 0 && r.opt.EndS == 0 {
		// a first guess at the length: ~12 bytes per cell
		guess := int(r.info.SizeBytes / int64(12*len(r.info.Columns)+1))
		if guess > 1<<26 {
			guess = 1 << 26
		}
		for i := range data {
			data[i] = make([]float64, 0, guess)
		}
	}
	sum, err := r.Stream(func(b Block) error {
		for i, d := range b.Data {
			data[i] = append(data[i], d...)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	return &Log{Info: r.Info(), Summary: sum, Data: data}, nil
}

func (r *Reader) sha() string { return hex.EncodeToString(r.src.h.Sum(nil)) }
