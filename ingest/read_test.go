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
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"time"
)

// readAllFrom reads a whole log from rd, name standing for the file.
func readAllFrom(rd io.Reader, name string, opt Options) (*Log, error) {
	r, err := NewReader(rd, name, -1, opt)
	if err != nil {
		return nil, err
	}
	return r.ReadAll()
}

// readFile opens and reads a whole log file.
func readFile(path string, opt Options) (*Log, error) {
	r, err := Open(path, opt)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	return r.ReadAll()
}

// readString reads a log held in a string, as "test.csv".
func readString(in string, opt Options) (*Log, error) {
	return readAllFrom(strings.NewReader(in), "test.csv", opt)
}

func mustRead(t *testing.T, in string, opt Options) *Log {
	t.Helper()
	l, err := readString(in, opt)
	if err != nil {
		t.Fatalf("read: %v", err)
	}
	return l
}

// rigLog writes n rows at fs of a time column and two channels, in the
// given dialect: values v1 = i/10 - 3, v2 = sin(i/7)/4 (g).
func rigLog(n int, fs float64, delim string, decimalComma bool) string {
	var b strings.Builder
	b.WriteString("# dialect test\n")
	fmt.Fprintf(&b, "time [s]%span_f [m/s^2]%sbody_front [g]\n", delim, delim)
	f := func(v float64) string {
		s := strconv.FormatFloat(v, 'g', 10, 64)
		if decimalComma {
			s = strings.Replace(s, ".", ",", 1)
		}
		return s
	}
	for i := range n {
		b.WriteString(f(float64(i) / fs))
		b.WriteString(delim)
		b.WriteString(f(float64(i)/10 - 3))
		b.WriteString(delim)
		b.WriteString(f(math.Sin(float64(i)/7) / 4))
		b.WriteString("\n")
	}
	return b.String()
}

func TestDialectsReadIdentically(t *testing.T) {
	const n, fs = 3000, 500.0
	ref := mustRead(t, rigLog(n, fs, ",", false), Options{})
	if ref.Info.Delimiter != ',' || ref.Info.DecimalComma || !ref.Info.HasTime {
		t.Fatalf("comma log info %+v", ref.Info)
	}
	for _, d := range []struct {
		name, delim string
		comma       bool
	}{{"semicolon, decimal point", ";", false}, {"semicolon, decimal comma", ";", true},
		{"tab, decimal point", "\t", false}, {"tab, decimal comma", "\t", true}} {
		l := mustRead(t, rigLog(n, fs, d.delim, d.comma), Options{})
		if l.Info.Delimiter != d.delim[0] || l.Info.DecimalComma != d.comma {
			t.Errorf("%s: delimiter %q decimal comma %v", d.name, l.Info.Delimiter, l.Info.DecimalComma)
		}
		for k := range ref.Data {
			for i := range ref.Data[k] {
				if math.Float64bits(l.Data[k][i]) != math.Float64bits(ref.Data[k][i]) {
					t.Fatalf("%s: channel %d sample %d = %v, comma log %v", d.name, k, i, l.Data[k][i], ref.Data[k][i])
				}
			}
		}
		if l.Summary.SampleRateHz != ref.Summary.SampleRateHz || l.Summary.Samples != n {
			t.Errorf("%s: summary %+v", d.name, l.Summary)
		}
	}
	// the values themselves: body_front is in g
	if got, want := ref.Data[1][10], math.Sin(10.0/7)/4*standardGravity; math.Abs(got-want) > 1e-9 {
		t.Errorf("body_front[10] = %v m/s^2, want %v", got, want)
	}
	if math.Abs(ref.Summary.SampleRateHz-fs) > 1e-6 {
		t.Errorf("rate %v", ref.Summary.SampleRateHz)
	}
}

// The lead's CSV writer's format: notes, "time [s],pan_f [m/s^2],body_front [g]",
// strconv 'g' 10 digits, '\n'.
func TestReadsWriterFormat(t *testing.T) {
	in := "# ridemodes simulate\n# seed 1\ntime [s],pan_f [m/s^2],body_front [g]\n" +
		"0,0.1234567891,-0.01\n0.002,1.5e-05,0.02\n0.004,-2.25,0.125\n0.006,3,-0.25\n"
	l := mustRead(t, in, Options{Channels: []string{"body_front", "pan_f"}})
	if strings.Join(l.Info.Notes, "|") != "ridemodes simulate|seed 1" {
		t.Errorf("notes %q", l.Info.Notes)
	}
	if strings.Join(l.Info.Channels, ",") != "body_front,pan_f" {
		t.Errorf("channels %v", l.Info.Channels)
	}
	wantPan := []float64{0.1234567891, 1.5e-05, -2.25, 3}
	for i, v := range wantPan {
		if l.Data[1][i] != v {
			t.Errorf("pan_f[%d] = %v, want %v", i, l.Data[1][i], v)
		}
	}
	if l.Data[0][2] != 0.125*standardGravity {
		t.Errorf("body_front[2] = %v", l.Data[0][2])
	}
	if l.Summary.SampleRateHz != 500 || l.Summary.DurationS != 4.0/500 || l.Summary.T0S != 0 {
		t.Errorf("summary %+v", l.Summary)
	}
	sum := sha256.Sum256([]byte(in))
	if l.Summary.SHA256 != hex.EncodeToString(sum[:]) || l.Summary.Bytes != int64(len(in)) {
		t.Errorf("sha %s bytes %d", l.Summary.SHA256, l.Summary.Bytes)
	}
	if len(l.Summary.Warnings) != 0 {
		t.Errorf("warnings %v", l.Summary.Warnings)
	}
}

func TestUnits(t *testing.T) {
	cases := []struct {
		unit  string
		scale float64
	}{
		{"m/s^2", 1}, {"m/s2", 1}, {"m/s²", 1}, {"m s^-2", 1}, {"m s-2", 1}, {"mm/s^2", 1e-3}, {"mm/s2", 1e-3},
		{"g", 9.80665}, {"G", 9.80665},
	}
	for _, c := range cases {
		in := fmt.Sprintf("time [s],a [%s],b\n0,2,1\n0.01,-4,2\n", c.unit)
		l := mustRead(t, in, Options{Channels: []string{"a"}})
		if l.Data[0][0] != 2*c.scale || l.Data[0][1] != -4*c.scale {
			t.Errorf("[%s]: %v, want scale %v", c.unit, l.Data[0], c.scale)
		}
		if l.Info.Columns[1].Scale != c.scale || l.Info.Columns[1].Unit != c.unit {
			t.Errorf("[%s]: column %+v", c.unit, l.Info.Columns[1])
		}
	}
	// time in ms
	l := mustRead(t, "t [ms],a [g]\n0,1\n2,2\n4,3\n", Options{})
	if l.Summary.SampleRateHz != 500 || l.Summary.LogSpanS != 0.004 {
		t.Errorf("ms time: %+v", l.Summary)
	}
	// a missing unit is m/s^2, with a warning naming the channel; a missing time unit is s
	l = mustRead(t, "Time,a,b [g]\n0,1,1\n0.5,2,2\n1,3,3\n", Options{})
	if l.Data[0][1] != 2 || l.Summary.SampleRateHz != 2 {
		t.Errorf("no unit: %v %v", l.Data[0], l.Summary.SampleRateHz)
	}
	var codes []string
	for _, w := range l.Summary.Warnings {
		if w.Code == WarnUnitMissing {
			codes = append(codes, w.Channel)
			if w.Line != 1 {
				t.Errorf("unit warning line %d", w.Line)
			}
		}
	}
	if strings.Join(codes, ",") != "Time,a" {
		t.Errorf("unit_missing warnings for %v, want Time and a", codes)
	}
	// a known unit in parentheses is read like one in brackets; other
	// parentheses belong to the name, and a channel asked for by the name
	// before them gets advice on where the unit goes
	l = mustRead(t, "t (ms),accel (g),pan (front) [m/s^2]\n0,1,1\n1,2,2\n", Options{})
	if c := l.Info.Columns; c[1].Name != "accel" || c[1].Scale != 9.80665 || c[0].Scale != 1e-3 || c[2].Name != "pan (front)" ||
		len(l.Summary.Warnings) != 0 {
		t.Errorf("units in parentheses: %+v, %v", c, l.Summary.Warnings)
	}
	_, err := readString("t [s],accel (furlongs)\n0,1\n1,2\n", Options{Channels: []string{"accel"}})
	if err == nil || !strings.Contains(err.Error(), `write the unit in brackets after the name, e.g. "accel [m/s^2]"`) {
		t.Errorf("unknown unit in parentheses: %v", err)
	}
}

func TestHeaderCells(t *testing.T) {
	// spaces, quotes, any-case time, no space before the bracket, BOM, CRLF,
	// a quoted name holding the delimiter, a trailing delimiter
	in := "\xef\xbb\xbf# note\r\n  \"TIME [s]\" , \" body front [g] \",\"pan, f[m/s^2]\",\r\n0, 1 ,\"2\",\r\n0.25,3,4,\r\n"
	l := mustRead(t, in, Options{})
	if !l.Info.HasTime || l.Info.Columns[0].Name != "TIME" {
		t.Fatalf("time column: %+v", l.Info.Columns)
	}
	if strings.Join(l.Info.Channels, "|") != "body front|pan, f" {
		t.Errorf("channels %q", l.Info.Channels)
	}
	if l.Data[0][1] != 3*standardGravity || l.Data[1][0] != 2 || l.Info.Notes[0] != "note" {
		t.Errorf("data %v notes %q", l.Data, l.Info.Notes)
	}
	if l.Summary.SampleRateHz != 4 {
		t.Errorf("rate %v", l.Summary.SampleRateHz)
	}
	// "t" is a time column, and only first
	l = mustRead(t, "t,x [g]\n0,1\n1,2\n", Options{})
	if !l.Info.HasTime {
		t.Error("t not taken as time")
	}
}

func TestNoTimeColumn(t *testing.T) {
	in := "a [g];b [m/s^2]\n0,5;1\n1,5;2\n-0,25;3\n2;4\n"
	l := mustRead(t, in, Options{SampleRateHz: 200})
	if l.Info.HasTime || !l.Info.DecimalComma || l.Summary.SampleRateHz != 200 || l.Summary.Samples != 4 {
		t.Fatalf("%+v %+v", l.Info, l.Summary)
	}
	if l.Data[0][2] != -0.25*standardGravity || l.Data[1][3] != 4 {
		t.Errorf("data %v", l.Data)
	}
	if l.Summary.DurationS != 4.0/200 || l.Summary.LogSpanS != 3.0/200 {
		t.Errorf("duration %v span %v", l.Summary.DurationS, l.Summary.LogSpanS)
	}
}

// A ';' log whose first rows hold only integers fixes its decimal separator
// at the first cell that shows one.
func TestDecimalSeparatorLockedLate(t *testing.T) {
	var b strings.Builder
	b.WriteString("time [s];a [g]\n")
	for i := range 20000 { // more than the 64 KiB looked at by Open
		fmt.Fprintf(&b, "%d;%d\n", i, i%7)
	}
	b.WriteString("20000;1,5\n20001;2,25\n")
	l := mustRead(t, b.String(), Options{})
	if !l.Info.DecimalComma || l.Data[0][20001] != 2.25*standardGravity {
		t.Errorf("decimal comma %v, last %v", l.Info.DecimalComma, l.Data[0][20001])
	}
	_, err := readString(b.String()+"20002;2.5\n", Options{})
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, ErrDecimal) || pe.Line != 20004 || pe.Column != "a" {
		t.Errorf("mixed separators: %v", err)
	}
}

func TestStreamBlocks(t *testing.T) {
	const n = 10007
	in := rigLog(n, 1000, ",", false)
	r, err := NewReader(strings.NewReader(in), "s.csv", int64(len(in)), Options{BlockSamples: 1000})
	if err != nil {
		t.Fatal(err)
	}
	ref := mustRead(t, in, Options{})
	got := 0
	var progressed int64
	r.opt.Progress = func(read, total int64) {
		if read < progressed || total != int64(len(in)) {
			t.Errorf("progress %d of %d after %d", read, total, progressed)
		}
		progressed = read
	}
	sum, err := r.Stream(func(b Block) error {
		if b.Start != got || b.Len() > 1000 || math.Abs(b.SampleRateHz-1000) > 1e-9 {
			t.Fatalf("block start %d len %d rate %v after %d", b.Start, b.Len(), b.SampleRateHz, got)
		}
		if want := float64(b.Start) / 1000; math.Abs(b.TimeS-want) > 1e-12 {
			t.Errorf("block time %v, want %v", b.TimeS, want)
		}
		for k := range b.Data {
			for j, v := range b.Data[k] {
				if v != ref.Data[k][b.Start+j] {
					t.Fatalf("sample %d differs", b.Start+j)
				}
			}
		}
		got += b.Len()
		return nil
	})
	if err != nil || got != n || sum.Samples != n || progressed != int64(len(in)) {
		t.Fatalf("err %v, got %d samples, summary %d, progress %d", err, got, sum.Samples, progressed)
	}
	if _, err := r.Stream(func(Block) error { return nil }); err == nil {
		t.Error("second Stream did not fail")
	}
	// the consumer's error stops the stream and comes back as is
	stop := errors.New("stop")
	r2, _ := NewReader(strings.NewReader(in), "s.csv", -1, Options{})
	if _, err := r2.Stream(func(Block) error { return stop }); err != stop {
		t.Errorf("consumer error: %v", err)
	}
}

func TestWindow(t *testing.T) {
	in := rigLog(1001, 100, ",", false) // 0 to 10 s
	l := mustRead(t, in, Options{StartS: 2, EndS: 4.5})
	if l.Summary.Samples != 251 || l.Summary.T0S != 2 || l.Data[0][0] != 200.0/10-3 {
		t.Errorf("window 2-4.5 s: samples %d t0 %v first %v", l.Summary.Samples, l.Summary.T0S, l.Data[0][0])
	}
	l = mustRead(t, in, Options{StartS: 9})
	if l.Summary.Samples != 101 {
		t.Errorf("window 9 s to end: %d samples", l.Summary.Samples)
	}
	l = mustRead(t, in, Options{EndS: 10})
	if l.Summary.Samples != 1001 {
		t.Errorf("window to the last sample: %d samples", l.Summary.Samples)
	}
	// relative to the first sample's time
	var b strings.Builder
	b.WriteString("time [s],a [g]\n")
	for i := range 500 {
		fmt.Fprintf(&b, "%g,%d\n", 100+float64(i)/100, i)
	}
	l = mustRead(t, b.String(), Options{StartS: 1, EndS: 2})
	if l.Summary.Samples != 101 || l.Summary.T0S != 101 || l.Data[0][0] != 100*standardGravity {
		t.Errorf("offset log: %+v %v", l.Summary, l.Data[0][0])
	}
	// without a time column
	l = mustRead(t, "a\n1\n2\n3\n4\n5\n6\n", Options{SampleRateHz: 2, StartS: 1, EndS: 2})
	if l.Summary.Samples != 3 || l.Data[0][0] != 3 {
		t.Errorf("no time column: %v", l.Data)
	}
}

func TestResample(t *testing.T) {
	// 1 kHz with every 10th step 3 % long: an error, or resampled with a warning
	var b strings.Builder
	b.WriteString("time [s],a [m/s^2]\n")
	tm := 0.0
	for i := range 2000 {
		fmt.Fprintf(&b, "%.6f,%g\n", tm, 2*tm+1) // a straight line: interpolation is exact
		step := 0.001
		if i%10 == 9 {
			step = 0.00103
		}
		tm += step
	}
	_, err := readString(b.String(), Options{})
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, ErrNonUniform) || pe.Line != 12 || pe.Column != "time" {
		t.Fatalf("want non-uniform at line 12, got %v", err)
	}
	l, err := readString(b.String(), Options{Resample: true})
	if err != nil {
		t.Fatal(err)
	}
	if l.Summary.SampleRateHz != 1000 || !l.Summary.Resample {
		t.Errorf("rate %v", l.Summary.SampleRateHz)
	}
	for i, v := range l.Data[0] {
		if want := 2*float64(i)/1000 + 1; math.Abs(v-want) > 1e-9 {
			t.Fatalf("sample %d = %v, want %v", i, v, want)
		}
	}
	var w *Warning
	for i := range l.Summary.Warnings {
		if l.Summary.Warnings[i].Code == WarnResampled {
			w = &l.Summary.Warnings[i]
		}
	}
	if w == nil || w.Line != 12 || !strings.Contains(w.Message, "linearly") {
		t.Errorf("resample warning %+v", w)
	}
	// onto a given rate
	l, err = readString(b.String(), Options{Resample: true, SampleRateHz: 250})
	if err != nil || l.Summary.SampleRateHz != 250 || math.Abs(l.Data[0][10]-(2*10.0/250+1)) > 1e-9 {
		t.Errorf("to 250 Hz: %v %+v", err, l.Summary)
	}
}

func TestRateMismatchAndRateLow(t *testing.T) {
	in := rigLog(100, 100, ",", false)
	l := mustRead(t, in, Options{SampleRateHz: 200, BandHighHz: 45})
	var codes []string
	for _, w := range l.Summary.Warnings {
		codes = append(codes, string(w.Code))
	}
	if strings.Join(codes, ",") != "rate_mismatch,rate_low" {
		t.Errorf("warnings %v", l.Summary.Warnings)
	}
	l = mustRead(t, in, Options{BandHighHz: 40})
	if len(l.Summary.Warnings) != 1 || !strings.Contains(l.Summary.Warnings[0].Message, "2.56") {
		t.Errorf("warnings %v", l.Summary.Warnings)
	}
	l = mustRead(t, in, Options{BandHighHz: 20})
	if len(l.Summary.Warnings) != 0 {
		t.Errorf("warnings %v", l.Summary.Warnings)
	}
}

func TestOpenFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "run.csv")
	in := rigLog(500, 100, ";", true)
	if err := os.WriteFile(path, []byte(in), 0o644); err != nil {
		t.Fatal(err)
	}
	l, err := readFile(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if l.Info.Path != path || l.Info.SizeBytes != int64(len(in)) || l.Summary.Samples != 500 {
		t.Errorf("%+v", l.Info)
	}
	if ch := l.Channel("pan_f"); len(ch) != 500 || l.Channel("nope") != nil {
		t.Error("Channel")
	}
	_, err = readFile(filepath.Join(dir, "missing.csv"), Options{})
	if !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}

func TestStatsAndWarningString(t *testing.T) {
	l := mustRead(t, "t [s],a\n0,1\n1,-1\n2,1\n3,-1\n", Options{})
	s := l.Summary.Channels[0]
	if s.Min != -1 || s.Max != 1 || s.Mean != 0 || s.RMS != 1 || s.Std != 1 || s.Count != 4 {
		t.Errorf("stats %+v", s)
	}
	ts := 1.5
	w := Warning{Code: WarnClipping, Channel: "a", Line: 7, TimeS: &ts, Message: "m"}
	if w.String() != "clipping [a]: m (line 7, t = 1.500 s)" {
		t.Errorf("%q", w.String())
	}
}

// A long log streams through in blocks; ReadAll of a bigger generated log
// agrees with the rows as written.
func TestGeneratedLog(t *testing.T) {
	data := genBytes(3<<20, 5)
	l, err := readAllFrom(bytes.NewReader(data), "gen.csv", Options{Channels: []string{"body_rear"}})
	if err != nil {
		t.Fatal(err)
	}
	lines := bytes.Split(bytes.TrimSpace(data), []byte{'\n'})[3:]
	if len(lines) != l.Summary.Samples {
		t.Fatalf("%d rows, %d samples", len(lines), l.Summary.Samples)
	}
	for _, i := range []int{0, 1, 777, len(lines) / 2, len(lines) - 1} {
		cells := strings.Split(string(lines[i]), ",")
		v, _ := strconv.ParseFloat(cells[4], 64)
		if l.Data[0][i] != v*standardGravity {
			t.Errorf("row %d: %v, want %v", i, l.Data[0][i], v*standardGravity)
		}
	}
	if l.Summary.SampleRateHz < 999.999 || l.Summary.SampleRateHz > 1000.001 {
		t.Errorf("rate %v", l.Summary.SampleRateHz)
	}
	sum := sha256.Sum256(data)
	if l.Summary.SHA256 != hex.EncodeToString(sum[:]) || l.Summary.Bytes != int64(len(data)) {
		t.Errorf("sha %s bytes %d, want %x %d", l.Summary.SHA256, l.Summary.Bytes, sum, len(data))
	}
}

// What the lead's WriteLog writes reads back to the same values within its
// 10 significant digits.
func TestReadsWriteLog(t *testing.T) {
	const n, fs = 2000, 256.0
	pan := make([]float64, n)
	body := make([]float64, n)
	for i := range pan {
		pan[i] = 3 * math.Sin(float64(i)/5)
		body[i] = 0.4 * math.Cos(float64(i)/9)
	}
	var buf bytes.Buffer
	err := WriteLog(&buf, []string{"round trip"}, fs, 12.5, []LogColumn{
		{Name: "pan_f", Unit: "m/s^2", Data: pan}, {Name: "body_front", Unit: "g", Data: body}})
	if err != nil {
		t.Fatal(err)
	}
	l, err := readAllFrom(&buf, "w.csv", Options{Channels: []string{"pan_f", "body_front"}})
	if err != nil {
		t.Fatal(err)
	}
	if l.Summary.Samples != n || math.Abs(l.Summary.SampleRateHz-fs) > 1e-6 || l.Summary.T0S != 12.5 || l.Info.Notes[0] != "round trip" {
		t.Fatalf("%+v", l.Summary)
	}
	for i := range pan {
		if math.Abs(l.Data[0][i]-pan[i]) > 1e-9*3 || math.Abs(l.Data[1][i]-body[i]) > 1e-9 {
			t.Fatalf("sample %d: %v %v, wrote %v %v", i, l.Data[0][i], l.Data[1][i], pan[i], body[i])
		}
	}
}

// A stream stopped early (by the consumer or by bad data) leaves no
// goroutine behind.
func TestStreamStopsItsGoroutines(t *testing.T) {
	data := genBytes(4<<20, 3)
	bad := append(append([]byte{}, data[:2<<20]...), "x,1,2,3,4\n"...)
	base := runtime.NumGoroutine()
	for _, in := range [][]byte{data, bad} {
		r, err := NewReader(bytes.NewReader(in), "g.csv", int64(len(in)), Options{})
		if err != nil {
			t.Fatal(err)
		}
		stop := errors.New("stop")
		_, err = r.Stream(func(Block) error {
			if len(in) == len(data) {
				return stop
			}
			return nil
		})
		if err == nil {
			t.Fatal("no error")
		}
	}
	deadline := time.Now().Add(2 * time.Second)
	for runtime.NumGoroutine() > base && time.Now().Before(deadline) {
		time.Sleep(10 * time.Millisecond)
	}
	if n := runtime.NumGoroutine(); n > base {
		t.Errorf("%d goroutines left running (%d before)", n, base)
	}
}
