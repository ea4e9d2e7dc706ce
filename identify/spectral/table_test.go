package spectral

import (
	"bytes"
	"encoding/csv"
	"math"
	"math/cmplx"
	"strconv"
	"testing"
)

// tableRoundTripTol: values are written with 10 significant digits.
const tableRoundTripTol = 1e-9

func readTable(t *testing.T, buf *bytes.Buffer) ([]string, [][]float64) {
	t.Helper()
	recs, err := csv.NewReader(buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows [][]float64
	for _, r := range recs[1:] {
		if len(r) != len(recs[0]) {
			t.Fatalf("row has %d fields, header %d", len(r), len(recs[0]))
		}
		var v []float64
		for _, s := range r {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			v = append(v, x)
		}
		rows = append(rows, v)
	}
	return recs[0], rows
}

func column(t *testing.T, header []string, name string) int {
	t.Helper()
	for i, h := range header {
		if h == name {
			return i
		}
	}
	t.Fatalf("no column %q in %v", name, header)
	return -1
}

func near(a, b float64) bool {
	return math.Abs(a-b) <= tableRoundTripTol*math.Max(1, math.Abs(b)) || (math.IsNaN(a) && math.IsNaN(b))
}

// TestWriteFRFTable: round trip of the CSV against the set it came from
// (magnitude and phase re-derived from re/im as a check of consistency).
func TestWriteFRFTable(t *testing.T) {
	rec := synthRig(testCar(), independentPans, 0, 20, 41*128, 31, outputNoiseFrac, 0)
	sp, err := spectraOf(rec, Config{FsHz: 20, SegmentLen: 256, Overlap: 128, Window: Hann}, 500)
	if err != nil {
		t.Fatal(err)
	}
	set, err := EstimateFRF(sp, []int{0, 1}, []int{2, 3}, FRFOptions{BandHz: frfBandHz})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteFRFTable(&buf, set); err != nil {
		t.Fatal(err)
	}
	header, rows := readTable(t, &buf)
	if len(header) != 1+4*8+2*2+1 || len(rows) != len(set.FreqsHz) {
		t.Fatalf("%d columns, %d rows", len(header), len(rows))
	}
	mag := column(t, header, "body_front/pan_r |H| [-]")
	ph := column(t, header, "body_front/pan_r phase [deg]")
	re := column(t, header, "body_front/pan_r re [-]")
	im := column(t, header, "body_front/pan_r im [-]")
	sd := column(t, header, "body_front/pan_r |H| sd [-]")
	mc := column(t, header, "body_rear multiple coherence [-]")
	p := set.Pairs[0][1]
	for f, r := range rows {
		h := complex(r[re], r[im])
		if !near(r[0], set.FreqsHz[f]) || !near(r[mag], cmplx.Abs(p.H[f])) || !near(r[re], real(p.H[f])) ||
			!near(r[sd], p.MagRelErr[f]*cmplx.Abs(p.H[f])) || !near(r[mc], set.MultipleCoherence[1][f]) {
			t.Fatalf("row %d differs from the set: %v", f, r)
		}
		if f > 0 && (math.Abs(cmplx.Abs(h)-r[mag]) > 1e-8*r[mag] || math.Abs(cmplx.Phase(h)*180/math.Pi-r[ph]) > 1e-6) {
			t.Fatalf("row %d: |H|, phase inconsistent with re, im", f)
		}
	}
}

func TestWriteSpectraTable(t *testing.T) {
	rec := synthRig(testCar(), independentPans, 0, 20, 21*128, 32, outputNoiseFrac, 0)
	sp, err := spectraOf(rec, Config{FsHz: 20, SegmentLen: 256, Overlap: 128, Window: Hann}, 500)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteSpectraTable(&buf, sp); err != nil {
		t.Fatal(err)
	}
	header, rows := readTable(t, &buf)
	if len(header) != 1+4*2+6*4 {
		t.Fatalf("%d columns: %v", len(header), header)
	}
	psd := column(t, header, "body_rear PSD [(m/s^2)^2/Hz]")
	csdIm := column(t, header, "pan_r*body_front CSD im [(m/s^2)^2/Hz]")
	coh := column(t, header, "pan_f*body_rear coherence [-]")
	c := sp.Coherence(0, 3)
	for f, r := range rows {
		if !near(r[psd], real(sp.G[f][3][3])) || !near(r[csdIm], imag(sp.G[f][1][2])) || !near(r[coh], c[f]) {
			t.Fatalf("row %d differs from the spectra", f)
		}
	}
}
