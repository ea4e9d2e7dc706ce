package ingest

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// uniform returns n rows "t,a,b" at 100 Hz from line 2 on (after the header
// "t [s],a [g],b [g]"), with a and b varying.
func uniform(n int) string {
	var b strings.Builder
	for i := range n {
		fmt.Fprintf(&b, "%g,%d,%d\n", float64(i)/100, i%5, i%3)
	}
	return b.String()
}

const hdr = "t [s],a [g],b [g]\n"

// Every bad input: the sentinel, the line (1-based, 0 for the whole log)
// and the column (header name, "" for none) that the error must name, and
// a piece of its message.
func TestBadInputs(t *testing.T) {
	longLine := "0.01," + strings.Repeat("1", MaxLineBytes) + ",1\n"
	cases := []struct {
		name   string
		in     string
		opt    Options
		kind   error
		line   int
		column string
		msg    string
	}{
		{"empty file", "", Options{}, ErrEmpty, 0, "", "empty"},
		{"blank lines only", "\n  \n\r\n", Options{}, ErrEmpty, 0, "", "no header"},
		{"notes only", "# a\n# b\n", Options{}, ErrEmpty, 0, "", "only note lines"},
		{"header only", hdr, Options{}, ErrHeaderOnly, 1, "", "no data rows"},
		{"header only after notes", "# n\n\n" + hdr + "\n\n", Options{}, ErrHeaderOnly, 3, "", "no data rows"},
		{"row too short", hdr + "0,1,2\n0.01,1\n", Options{}, ErrRagged, 3, "b", "2 cells where the header has 3"},
		{"row too long", hdr + "0,1,2\n0.01,1,2,3\n", Options{}, ErrRagged, 3, "", "4 cells where the header has 3"},
		{"row too short, quoted", hdr + "0,1,2\n\"0.01\",\"1\"\n", Options{}, ErrRagged, 3, "b", "2 cells"},
		{"unclosed quote", hdr + "0,1,2\n0.01,\"1,2\n", Options{}, ErrRagged, 3, "", "quote"},
		{"not a number", hdr + uniform(5) + "0.05,1x,2\n", Options{}, ErrNotNumber, 7, "a", `"1x"`},
		{"not a number, unread column", hdr + uniform(5) + "0.05,1,zz\n", Options{Channels: []string{"b"}}, ErrNotNumber, 7, "b", `"zz"`},
		{"not a number in time", hdr + "0,1,2\nabc,1,2\n", Options{}, ErrNotNumber, 3, "t", `"abc"`},
		{"empty cell", hdr + "0,1,2\n0.01,,2\n", Options{}, ErrNotNumber, 3, "a", "empty cell"},
		{"thousands separator", hdr + "0,1,2\n0.01,1.234.5,2\n", Options{}, ErrNotNumber, 3, "a", "thousands"},
		{"note after header", hdr + "0,1,2\n# late note\n", Options{}, ErrNotNumber, 3, "t", "before the header"},
		{"NaN", hdr + "0,1,2\n0.01,NaN,2\n", Options{}, ErrNotFinite, 3, "a", "NaN"},
		{"Inf", hdr + "0,1,2\n0.01,1,-inf\n", Options{}, ErrNotFinite, 3, "b", "inf"},
		{"overflow", hdr + "0,1,2\n0.01,1e400,2\n", Options{}, ErrNotFinite, 3, "a", "1e400"},
		{"NaN time", hdr + "0,1,2\nnan,1,2\n", Options{}, ErrNotFinite, 3, "t", "nan"},
		{"duplicate name", "t [s],a [g],a [g]\n0,1,2\n", Options{Channels: []string{"a"}}, ErrDuplicateName, 1, "a", "columns 2 and 3"},
		{"duplicate time", "t [s],a [g],t [s]\n0,1,2\n", Options{}, ErrHeader, 1, "t", "first column"},
		{"requested twice", hdr + "0,1,2\n", Options{Channels: []string{"a", "a"}}, ErrDuplicateName, 0, "a", "requested twice"},
		{"missing channel", hdr + "0,1,2\n", Options{Channels: []string{"body_rear"}}, ErrMissingChannel, 1, "body_rear", `it has "a", "b"`},
		{"missing channel, case", hdr + "0,1,2\n", Options{Channels: []string{"A"}}, ErrMissingChannel, 1, "A", `did you mean "a"`},
		{"no channels", "t [s]\n0\n0.01\n", Options{}, ErrMissingChannel, 1, "", "no channel"},
		{"unknown unit", "t [s],a [furlong/s^2],b [g]\n0,1,2\n", Options{}, ErrUnknownUnit, 1, "a", "furlong"},
		{"unknown time unit", "t [min],a [g],b [g]\n0,1,2\n", Options{}, ErrUnknownUnit, 1, "t", "[min]"},
		{"unclosed unit", "t [s],a [g,b [g]\n0,1,2\n", Options{}, ErrHeader, 1, "a [g", "not closed"},
		{"empty name", "t [s],,b [g]\n0,1,2\n", Options{}, ErrHeader, 1, "#2", "no name"},
		{"time not first", "a [g],time [s]\n1,0\n", Options{}, ErrHeader, 1, "time", "first column"},
		{"time backwards", hdr + "0,1,2\n0.01,1,2\n0.005,1,2\n", Options{}, ErrTimeOrder, 4, "t", "backwards"},
		{"time backwards late", hdr + uniform(100) + "0.5,1,2\n", Options{}, ErrTimeOrder, 102, "t", "backwards"},
		{"time repeats", hdr + "0,1,2\n0.01,1,2\n0.01,1,2\n", Options{}, ErrTimeOrder, 4, "t", "repeats the time on line 3"},
		{"time repeats late", hdr + uniform(100) + "0.99,1,2\n", Options{}, ErrTimeOrder, 102, "t", "repeats"},
		{"gap", hdr + uniform(100) + "1.5,1,2\n", Options{}, ErrNonUniform, 102, "t", "a gap of about 51 steps"},
		{"jitter 2 %", hdr + uniform(50) + "0.5002,1,2\n0.51,1,2\n", Options{}, ErrNonUniform, 52, "t", "2.0 % off"},
		{"jitter in the first rows", hdr + "0,1,2\n0.01,1,2\n0.0205,1,2\n" + strings.SplitN(uniform(60), "\n", 4)[3], Options{}, ErrNonUniform, 4, "t", "5.0 % off"},
		{"gap too long to resample", hdr + uniform(100) + "1.6,1,2\n", Options{Resample: true}, ErrNonUniform, 102, "t", "too long to bridge"},
		{"resampling up too far", hdr + uniform(100), Options{Resample: true, SampleRateHz: 5000}, ErrNonUniform, 0, "", "more than 16 times"},
		{"one row", hdr + "0,1,2\n", Options{}, ErrTooShort, 2, "", "one data row"},
		{"too short", hdr + uniform(100), Options{MinDurationS: 10}, ErrTooShort, 0, "", "needs at least 10 s"},
		{"window too short", hdr + uniform(1000), Options{StartS: 1, EndS: 2, MinDurationS: 5}, ErrTooShort, 0, "", "lines 102 to 202"},
		{"constant channel", hdr + "0,1,3\n0.01,2,3\n0.02,1,3\n", Options{}, ErrConstant, 0, "b", "all 3 samples"},
		{"all-zero channel", hdr + "0,0,3\n0.01,0,2\n0.02,0,3\n", Options{}, ErrConstant, 0, "a", "zero"},
		{"line too long", hdr + "0,1,2\n" + longLine + "0.02,1,2\n", Options{}, ErrLineTooLong, 3, "", "longer than"},
		{"last line too long", hdr + "0,1,2\n" + strings.TrimSuffix(longLine, "\n"), Options{}, ErrLineTooLong, 3, "", "longer than"},
		{"header too long", strings.Repeat("x", MaxLineBytes+10) + "\n0\n", Options{}, ErrLineTooLong, 1, "", "longer than"},
		{"no line ends", strings.Repeat("1,", 3*MaxLineBytes), Options{}, ErrLineTooLong, 1, "", "longer than"},
		{"NUL in header", "t [s],a\x00 [g]\n0,1\n", Options{}, ErrBinary, 1, "", "NUL"},
		{"NUL in data", hdr + "0,1,2\n0.01,1,\x00\n", Options{Channels: []string{"a"}}, ErrBinary, 3, "", "NUL byte in the data row at byte 8; this looks like a binary file"},
		{"UTF-16", "t\x00,\x00a\x00\n\x000\x00,\x001\x00\n", Options{}, ErrBinary, 1, "", "UTF-16"},
		{"UTF-16 with BOM", "\xff\xfet\x00\n\x00", Options{}, ErrBinary, 1, "", "byte order mark"},
		{"binary", "\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", Options{}, ErrBinary, 1, "", "binary file"},
		{"invalid UTF-8 in header", "t [s],a [m/s\xb2]\n0,1\n", Options{}, ErrBinary, 1, "", "UTF-8"},
		{"invalid UTF-8 in note", "# caf\xe9\n" + hdr, Options{}, ErrBinary, 1, "", "UTF-8"},
		{"no sample rate", "a [g],b [g]\n1,2\n", Options{}, ErrNoSampleRate, 1, "", "no time column"},
		{"bad sample rate", "a [g]\n1\n", Options{SampleRateHz: -5}, ErrNoSampleRate, 0, "", "-5"},
		{"window before the log", hdr + uniform(10), Options{StartS: -1}, ErrWindow, 0, "", "before the log"},
		{"window reversed", hdr + uniform(10), Options{StartS: 2, EndS: 1}, ErrWindow, 0, "", "not after its start"},
		{"window after the log", hdr + uniform(100), Options{StartS: 5}, ErrWindow, 0, "", "after the log's last sample"},
		{"window between samples", hdr + uniform(100), Options{StartS: 0.501, EndS: 0.509}, ErrWindow, 0, "", "holds no sample"},
		{"blank line inside", hdr + "0,1,2\n0.01,1,2\n\n  \n0.02,1,2\n", Options{}, ErrBlankLine, 4, "", "line 6"},
		{"decimal point in a comma log", "t [s];a [g]\n0;1,5\n0,01;2.5\n", Options{}, ErrDecimal, 3, "a", "decimal point"},
		{"decimal comma in a point log", "t [s];a [g]\n0;1.5\n0.01;2,5\n", Options{}, ErrDecimal, 3, "a", "decimal comma"},
		{"decimal comma in a comma log", hdr + "0,1,2\n0.01,\"1,5\",2\n", Options{}, ErrDecimal, 3, "a", "decimal comma"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := readAllFrom(strings.NewReader(c.in), "bad.csv", c.opt)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, c.kind) {
				t.Fatalf("error %q is not %v", err, c.kind)
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %q is not a *ParseError", err)
			}
			if pe.Path != "bad.csv" || pe.Line != c.line || pe.Column != c.column {
				t.Errorf("error %q: path %q line %d column %q, want line %d column %q",
					err, pe.Path, pe.Line, pe.Column, c.line, c.column)
			}
			prefix := "bad.csv"
			if c.line > 0 {
				prefix += fmt.Sprintf(":%d", c.line)
			}
			prefix += ": "
			if c.column != "" {
				prefix += fmt.Sprintf("column %q: ", c.column)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, prefix) || !strings.Contains(msg, c.msg) {
				t.Errorf("message %q: want prefix %q and %q", msg, prefix, c.msg)
			}
		})
	}
}

// Within 1 % a step is accepted: 0.5 % jitter reads, with no warning.
func TestJitterWithinTolerance(t *testing.T) {
	var b strings.Builder
	b.WriteString(hdr)
	for i := range 500 {
		tm := float64(i) / 100
		if i%2 == 1 {
			tm += 0.00005 // half a percent of the step
		}
		fmt.Fprintf(&b, "%.6f,%d,%d\n", tm, i%5, i%3)
	}
	l, err := readString(b.String(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(l.Summary.Warnings) != 0 || l.Summary.Samples != 500 {
		t.Errorf("%+v", l.Summary)
	}
}

// Trailing blank lines end the log without an error.
func TestTrailingBlankLines(t *testing.T) {
	l := mustRead(t, hdr+uniform(10)+"\n\n \r\n", Options{})
	if l.Summary.Samples != 10 {
		t.Errorf("%d samples", l.Summary.Samples)
	}
}

// TestEndPastTheLogClamps: a window whose end lies after the log's last
// sample reads to the end of the log, with a warning that names --end.
func TestEndPastTheLogClamps(t *testing.T) {
	l := mustRead(t, hdr+uniform(100), Options{StartS: 0.5, EndS: 3})
	if l.Summary.Samples != 50 {
		t.Errorf("%d samples, want the 50 from 0.5 s to the end", l.Summary.Samples)
	}
	var found bool
	for _, w := range l.Summary.Warnings {
		found = found || (w.Code == WarnEndClamped && strings.Contains(w.Message, "3 s (--end)"))
	}
	if !found {
		t.Errorf("no end_clamped warning: %v", l.Summary.Warnings)
	}
}
