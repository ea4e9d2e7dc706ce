package ingest

import (
	"bytes"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
)

// FuzzRead feeds arbitrary bytes to the reader under a few option sets. It
// must never panic, every error must be a *ParseError wrapping a sentinel,
// and every success must hold finite samples, as many as the summary says.
func FuzzRead(f *testing.F) {
	seeds := []string{
		"time [s],a [g],b [m/s^2]\n0,1,2\n0.01,2,3\n0.02,1,2\n",
		"t;a [g]\n0;1,5\n0,5;2,5\n1;3\n",
		"a\tb\n1\t2\n3\t4\n5\t6\n",
		"# n\n\"time [s]\",\"x [mm/s^2]\"\n0,\"1\"\n1,\"2\"\n2,3\n",
		"t [ms],a\n0,1\n1,2\n2,3\n\n",
		"t,a\n0,1\n0.001,1e400\n",
		"t,a,\n0,1,\n1,2,\n2,1,\n",
		"\xef\xbb\xbft,a\r\n0,1\r\n1,2\r\n",
		"",
	}
	for _, s := range seeds {
		f.Add([]byte(s))
	}
	opts := []Options{
		{},
		{SampleRateHz: 100, BlockSamples: 3},
		{Channels: []string{"a"}, Resample: true, StartS: 0.005, EndS: 1},
		{SampleRateHz: 10, MinDurationS: 0.1, BandHighHz: 4},
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, opt := range opts {
			l, err := readAllFrom(bytes.NewReader(data), "fuzz.csv", opt)
			if err != nil {
				var pe *ParseError
				if !errors.As(err, &pe) || pe.Kind == nil || !errors.Is(err, pe.Kind) || pe.Path != "fuzz.csv" || pe.Line < 0 {
					t.Fatalf("error %q (%T) is not a located ParseError", err, err)
				}
				continue
			}
			s := l.Summary
			if s.Samples < 2 || !(s.SampleRateHz > 0) || math.IsInf(s.SampleRateHz, 0) || len(l.Data) != len(l.Info.Channels) {
				t.Fatalf("summary %+v for %d channels", s, len(l.Data))
			}
			for k, d := range l.Data {
				if len(d) != s.Samples {
					t.Fatalf("channel %d: %d samples, summary %d", k, len(d), s.Samples)
				}
				for _, v := range d {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("channel %d: sample %v", k, v)
					}
				}
			}
		}
	})
}

// FuzzParseJob checks the fast path for plain rows (fastRow) against the
// general path (parseJob's checks and parseRow) on arbitrary data rows under
// a few headers: the same rows, values (bits), time decimal places, first
// non-blank and blank lines, error and decimal separator. The reference is
// the general path as it was before the fast path existed.
func FuzzParseJob(f *testing.F) {
	for _, s := range []string{
		"0,1.5,-2\n0.01,2e-3,3\n0.02,+1,.5\n",
		"0,1,2\r\n1,2,3\r\n2,3,4",
		"0,1,2\n1, 2,3\n2,\"3\",4\n3,4,5\n",
		"0,1,2\n\n1,2,3\n",
		"0,1,2\n1,2,3\n\n\n",
		"0,1,2\n1,2\n",
		"0,1,2,\n1,2,3,\n2,3,4\n",
		"0,1,2\n1,2,3,4\n",
		"0,1,2\n1,nan,3\n",
		"0,1,2\n1,1e400,3\n",
		"0,1,2\n1,2\x003\n",
		"0,1,2\n1,2,3\r\r\n",
		"0,1,2\n1,2,3\r",
		"0\n1\n2 \n3\n",
		"0;1;2\n1;2;3\n2;3,5;4\n3;4;5\n",
		"0;1,5;2\n0,5;2;3\n",
		"0\t1.5\t2\n1\t2\t3\n",
		"0,123456789012345678901,1e-30\n1,0.1234567890123,1\n",
	} {
		for h := range fuzzJobHeads {
			f.Add(uint8(h), []byte(s))
		}
	}
	f.Fuzz(func(t *testing.T, h uint8, body []byte) {
		hd := fuzzJobHeads[int(h)%len(fuzzJobHeads)]
		checkFastPath(t, hd.head, hd.opt, body)
	})
}

// checkFastPath parses body, the data rows after the header head, as one
// job with the fast path and without it, and fails t when the two differ.
func checkFastPath(t *testing.T, head string, opt Options, body []byte) {
	t.Helper()
	in := append([]byte(head), body...)
	var got, want parsedChunk
	var ps [2]*rowParser
	for i, c := range []*parsedChunk{&got, &want} {
		r, err := NewReader(bytes.NewReader(in), "fuzz.csv", -1, opt)
		if err != nil {
			return
		}
		p := r.newRowParser()
		if i == 1 {
			p.fast = false
		}
		nl := bytes.Count(body, []byte{'\n'})
		if len(body) > 0 && body[len(body)-1] != '\n' {
			nl++
		}
		j := &job{buf: body, startLine: r.line + 1, nLines: nl, eof: true}
		timeScale := r.timeScale
		if !r.info.HasTime {
			timeScale = 0
		}
		p.parseJob(j, c, len(r.info.Channels), timeScale, make([]float64, len(r.info.Channels)))
		ps[i] = p
	}
	if got.rows != want.rows || got.firstNonBlank != want.firstNonBlank || got.blank != want.blank ||
		got.timePlaces != want.timePlaces || !reflect.DeepEqual(got.err, want.err) {
		t.Fatalf("fast path: %d rows, lines %d/%d, places %v, error %v;\ngeneral: %d rows, lines %d/%d, places %v, error %v",
			got.rows, got.firstNonBlank, got.blank, got.timePlaces, got.err,
			want.rows, want.firstNonBlank, want.blank, want.timePlaces, want.err)
	}
	if ps[0].sep != ps[1].sep || ps[0].sepLocked != ps[1].sepLocked {
		t.Fatalf("separator %q (locked %v), general path %q (%v)", ps[0].sep, ps[0].sepLocked, ps[1].sep, ps[1].sepLocked)
	}
	for k := range got.rows {
		if math.Float64bits(got.t[k]) != math.Float64bits(want.t[k]) {
			t.Fatalf("row %d: time %v, general path %v", k, got.t[k], want.t[k])
		}
		for ch := range got.vals {
			if math.Float64bits(got.vals[ch][k]) != math.Float64bits(want.vals[ch][k]) {
				t.Fatalf("row %d channel %d: %v, general path %v", k, ch, got.vals[ch][k], want.vals[ch][k])
			}
		}
	}
}

// fuzzJobHeads are the headers of FuzzParseJob: ',' with time, ';' (the
// decimal separator found from the rows, or locked by the first one that
// shows it), tab without time, a trailing delimiter, a skipped column.
var fuzzJobHeads = []struct {
	head string
	opt  Options
}{
	{"time [s],a [g],b [m/s^2]\n", Options{}},
	{"t [ms];a;b\n", Options{}},
	{"a [g]\tb\tc\n", Options{SampleRateHz: 100}},
	{"t,a,b,\n", Options{}},
	{"time [s],a,b\n", Options{Channels: []string{"b"}}},
}

// The fast path's line length limit, at the limit and one byte past it,
// with and without "\r\n" and a trailing delimiter.
func TestFastPathLongLines(t *testing.T) {
	for _, n := range []int{MaxLineBytes, MaxLineBytes + 1} {
		for _, end := range []string{"\n", "\r\n", ",\n", ""} {
			head := "t,a,b\n"
			if end == ",\n" {
				head = "t,a,b,\n"
			}
			// "0,1," then a number padded so the line (without its end) is n bytes
			line := "0,1," + strings.Repeat("0", n-len("0,1,")-len(strings.TrimRight(end, "\r\n"))-1) + "5"
			checkFastPath(t, head, Options{}, []byte("0,1,2\n"+line+end+"1,2,3\n"))
		}
	}
}
