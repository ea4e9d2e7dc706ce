package ingest

import (
	"bytes"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// The reference for every value here is strconv.ParseFloat: the fast path
// must give the same bits.

func TestParseFloatMatchesStrconv(t *testing.T) {
	cases := []string{
		"0", "-0", "+0", "0.0", "-0.0", "00012", "1", "-1", "+1.5", ".5", "5.", "-.5e1",
		"0.001", "12.345", "-1.234567891", "0.04123456789", "1.234567891e-05", "9.80665",
		"1e22", "1e23", "1e-22", "1e-23", "123456789012345678", "1234567890123456789",
		"12345678901234567890", "9007199254740992", "9007199254740993", "9007199254740991",
		"0.1", "0.2", "0.3", "2.2250738585072014e-308", "4.9e-324", "1e-400", "1.7976931348623157e308",
		"3.14159265358979323846264338327950288", "0.000000000000000000000000001", "1E5", "1e+05",
		"123.456e-7", "100000000000000000000000", "0.5000000000000000000001", "1.00000000000000011102230246251565404236316680908203125",
	}
	// strconv 'g' with 10 digits of seeded random values: the writer's format
	rng := rand.New(rand.NewPCG(3, 4))
	for range 2000 {
		v := rng.NormFloat64() * math.Pow(10, float64(rng.IntN(30)-15))
		cases = append(cases, strconv.FormatFloat(v, 'g', 10, 64), strconv.FormatFloat(v, 'g', -1, 64),
			strconv.FormatFloat(v, 'f', 6, 64), strconv.FormatFloat(v, 'e', 18, 64))
	}
	for _, s := range cases {
		want, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("bad case %q: %v", s, err)
		}
		got, st := parseFloat([]byte(s), '.')
		if st != numOK || math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("parseFloat(%q) = %v (%b), status %d; strconv %v (%b)", s, got, math.Float64bits(got), st, want, math.Float64bits(want))
		}
		comma := strings.Replace(s, ".", ",", 1)
		got, st = parseFloat([]byte(comma), ',')
		if st != numOK || math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("parseFloat(%q, ',') = %v, status %d; want %v", comma, got, st, want)
		}
	}
}

func TestParseFloatRejects(t *testing.T) {
	cases := []struct {
		in   string
		want int
	}{
		{"", numBad}, {"-", numBad}, {"+", numBad}, {".", numBad}, {"e5", numBad}, {"1e", numBad}, {"1e+", numBad},
		{"1.2.3", numBad}, {"1x", numBad}, {"0x1p3", numBad}, {"1_000", numBad}, {" 1", numBad}, {"1 ", numBad},
		{"nan", numNotFinite}, {"NaN", numNotFinite}, {"-inf", numNotFinite}, {"+Inf", numNotFinite},
		{"Infinity", numNotFinite}, {"1e400", numNotFinite}, {"-1e309", numNotFinite},
		{"1,5", numOtherSep}, {"1.5e", numBad}, {"--1", numBad},
	}
	for _, c := range cases {
		if _, st := parseFloat([]byte(c.in), '.'); st != c.want {
			t.Errorf("parseFloat(%q) status %d, want %d", c.in, st, c.want)
		}
	}
	if _, st := parseFloat([]byte("1.5"), ','); st != numOtherSep {
		t.Errorf("'1.5' with decimal comma: status %d, want numOtherSep", st)
	}
}

func TestParseFloatNoAllocs(t *testing.T) {
	b := []byte("-1.234567891e-05")
	long := []byte("1.2345678901234567890123")
	if n := testing.AllocsPerRun(100, func() { parseFloat(b, '.'); parseFloat(long, '.') }); n != 0 {
		t.Errorf("%v allocations per parse", n)
	}
}

// FuzzParseFloat checks the parser against strconv.ParseFloat: every number
// it accepts has strconv's bits, and it rejects only what strconv rejects or
// what the log grammar leaves out (hex, underscores, inf, nan).
func FuzzParseFloat(f *testing.F) {
	for _, s := range []string{"0", "-0", "1.5", ".5", "5.", "1e22", "1e23", "9007199254740993", "0.04123456789",
		"1.234567891e-05", "1e-400", "1e400", "nan", "0x1p3", "1_0", "12345678901234567890", "4.9e-324"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got, st := parseFloat([]byte(s), '.')
		want, err := strconv.ParseFloat(s, 64)
		switch st {
		case numOK:
			if err != nil {
				t.Fatalf("parseFloat(%q) = %v, strconv fails: %v", s, got, err)
			}
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("parseFloat(%q) = %v (%x), strconv %v (%x)", s, got, math.Float64bits(got), want, math.Float64bits(want))
			}
			// the same number with a decimal comma
			if strings.Count(s, ".") == 1 {
				c := strings.Replace(s, ".", ",", 1)
				if g2, st2 := parseFloat([]byte(c), ','); st2 != numOK || math.Float64bits(g2) != math.Float64bits(want) {
					t.Fatalf("parseFloat(%q, ',') = %v status %d, want %v", c, g2, st2, want)
				}
			}
		case numNotFinite:
			if err == nil && !math.IsInf(want, 0) && !math.IsNaN(want) {
				t.Fatalf("parseFloat(%q) not finite, strconv %v", s, want)
			}
		default:
			if err == nil && !math.IsInf(want, 0) && !math.IsNaN(want) &&
				!strings.ContainsAny(s, "xXpP_") && st != numOtherSep {
				t.Fatalf("parseFloat(%q) rejects (%d), strconv accepts %v", s, st, want)
			}
		}
	})
}

func BenchmarkParseFloatCell(b *testing.B) {
	cells := [][]byte{[]byte("-1.234567891"), []byte("0.04123456789"), []byte("12.345"), []byte("-0.001234567891"), []byte("1.234567891e-05")}
	var s float64
	for b.Loop() {
		for _, c := range cells {
			f, _ := parseFloat(c, '.')
			s += f
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/5, "ns/cell")
}

func BenchmarkStrconvParseFloatCell(b *testing.B) {
	cells := []string{"-1.234567891", "0.04123456789", "12.345", "-0.001234567891", "1.234567891e-05"}
	var s float64
	for b.Loop() {
		for _, c := range cells {
			f, _ := strconv.ParseFloat(c, 64)
			s += f
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/5, "ns/cell")
}

// BenchmarkParseRow parses the rows of a generated log (the writer's
// format, 5 columns) already split into lines: the parser alone.
func BenchmarkParseRow(b *testing.B) {
	data := genBytes(1<<20, 2)
	r, err := NewReader(strings.NewReader(string(data)), "b.csv", -1, Options{})
	if err != nil {
		b.Fatal(err)
	}
	p := r.newRowParser()
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")[3:]
	bl := make([][]byte, len(lines))
	for i, l := range lines {
		bl[i] = []byte(l)
	}
	vals := make([]float64, 4)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := p.parseRow(bl[i%len(bl)], vals); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkParseChunk parses one chunk of a generated log (the writer's
// format, 5 columns) the way a pipeline worker does: every cell converted
// and stored in the chunk's columns, the time cells' decimal places counted.
// Its rows are plain, so they take the fast path (fastRow).
func BenchmarkParseChunk(b *testing.B) { benchChunk(b, nil, true) }

// BenchmarkParseChunkGeneral parses the same chunk without the fast path:
// each line found with bytes.IndexByte, then parseRow.
func BenchmarkParseChunkGeneral(b *testing.B) { benchChunk(b, nil, false) }

// BenchmarkParseChunkUnusual parses the chunk with a blank before every
// line end: the fast path reads each row to its end before handing it to
// the general path (the worst case for the fast path).
func BenchmarkParseChunkUnusual(b *testing.B) {
	benchChunk(b, func(body []byte) []byte { return bytes.ReplaceAll(body, nl, []byte(" \n")) }, true)
}

// benchChunk times parseJob on the rows of a generated chunk, changed by
// edit when not nil, with the fast path or without it.
func benchChunk(b *testing.B, edit func([]byte) []byte, fast bool) {
	data := genBytes(chunkBytes, 5)
	r, err := NewReader(strings.NewReader(string(data)), "b.csv", -1, Options{})
	if err != nil {
		b.Fatal(err)
	}
	body := data[bytes.Index(data, []byte(genHeader))+len(genHeader):]
	body = body[:bytes.LastIndexByte(body, '\n')+1]
	if edit != nil {
		body = edit(body)
	}
	buf := make([]byte, len(body), len(body)+MaxLineBytes+2)
	copy(buf, body)
	j := &job{buf: buf, startLine: 4, nLines: bytes.Count(buf, nl)}
	p := r.newRowParser()
	p.fast = fast
	c := &parsedChunk{}
	nch := len(r.info.Channels)
	vals := make([]float64, nch)
	b.ReportAllocs()
	for b.Loop() {
		p.parseJob(j, c, nch, 1, vals)
		if c.err != nil || c.rows != j.nLines {
			b.Fatalf("%d rows of %d, %v", c.rows, j.nLines, c.err)
		}
	}
	cells := float64(j.nLines * (nch + 1))
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/cells, "ns/cell")
	b.SetBytes(int64(len(buf)))
}
