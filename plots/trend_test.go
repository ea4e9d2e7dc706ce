package plots

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/compare/trend"
)

// trendCampaign is an invented campaign of eight rig runs of one car: the
// pitch frequency and rear rate step up at run 6 (a spring change), run 8
// could not be analysed, run 4 failed its targets. The scatter is a fixed
// pattern of our own, not a measurement.
func trendCampaign() *trend.Campaign {
	wobble := []float64{0.3, -0.8, 0.5, -0.2, 0.9, -0.6, 0.1, -0.4}
	var runs []store.Run
	for i := range 8 {
		step := 0.0
		if i >= 5 {
			step = 1
		}
		w := wobble[i]
		res := &compare.Result{
			Test: "rig",
			Modes: []compare.ModeJSON{
				{Label: "bounce", NaturalFrequencyHz: 1.18 + 0.004*w, DampingRatio: 0.28 + 0.005*w, Uncertainty: &compare.Uncertainty{NaturalFrequencyHz: 0.004, DampingRatio: 0.006}},
				{Label: "pitch", NaturalFrequencyHz: 1.42 + 0.08*step + 0.004*w, DampingRatio: 0.31 - 0.005*w, Uncertainty: &compare.Uncertainty{NaturalFrequencyHz: 0.004, DampingRatio: 0.006}},
			},
			Model: &compare.ModelJSON{Rates: compare.RatesJSON{FrontRateNPerM: 41000, RearRateNPerM: 44000},
				Modes: []compare.ModeJSON{{Label: "bounce", NaturalFrequencyHz: 1.18, DampingRatio: 0.28}, {Label: "pitch", NaturalFrequencyHz: 1.42, DampingRatio: 0.31}}},
			Updated: &compare.Updated{FrontRateNPerM: 41000 + 400*w, RearRateNPerM: 44000 + 5500*step - 400*w,
				Uncertainty: &compare.UpdatedUncertainty{FrontRateNPerM: 400, RearRateNPerM: 400}},
		}
		r := store.Run{RunKey: fmt.Sprint(i), Car: "hatch-01", Run: fmt.Sprint(i + 1), Test: "rig", Verdict: "pass", Result: res,
			AnalysedAt: time.Date(2031, 5, 1+i, 9, 0, 0, 0, time.UTC), LogPath: fmt.Sprintf("logs/rig-%d.csv", i+1)}
		switch i {
		case 3:
			r.Verdict = "fail"
		case 5:
			r.Meta = map[string]string{"notes": "after spring change"}
		case 7:
			r.Result, r.Verdict, r.Error = nil, store.VerdictError, "logs/rig-8.csv:40:2: not a number"
		}
		runs = append(runs, r)
	}
	return trend.Build("hatch-01", runs)
}

// TestTrendReportRenders: the trend report is well-formed XHTML whose
// verdict element states the campaign's worst verdict, names the run after
// the spring change, and embeds one decodable figure per followed quantity.
func TestTrendReportRenders(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "trend")
	if *figureDir != "" {
		dir = filepath.Join(*figureDir, "trend")
	}
	c := trendCampaign()
	files, err := WriteTrendReport(dir, c)
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != len(trend.Quantities)+1 || filepath.Base(files[len(files)-1]) != TrendReportFile {
		t.Fatalf("files %v", files)
	}
	page, err := os.ReadFile(files[len(files)-1])
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(page))
	var verdict, verdictText string
	inVerdict := 0
	images := 0
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("trend report is not well-formed XHTML: %v", err)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			attr := map[string]string{}
			for _, a := range tok.Attr {
				attr[a.Name.Local] = a.Value
			}
			if inVerdict > 0 {
				inVerdict++
			}
			if attr["id"] == "verdict" {
				verdict, inVerdict = attr["data-verdict"], 1
			}
			if tok.Name.Local == "svg" && attr["class"] == "figure" {
				images++
			}
		case xml.EndElement:
			if inVerdict > 0 {
				inVerdict--
			}
		case xml.CharData:
			if inVerdict > 0 {
				verdictText += string(tok)
			}
		}
	}
	if verdict != "fail" || !strings.Contains(verdictText, "FAIL") || !strings.Contains(verdictText, "run 4") {
		t.Errorf("verdict element: data-verdict %q, text %q", verdict, verdictText)
	}
	if images != len(trend.Quantities) {
		t.Errorf("%d inline figures, want %d", images, len(trend.Quantities))
	}
	for _, f := range files[:len(files)-1] {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(b))
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		if w := img.Bounds().Dx(); w != int(math.Round(float64(trendWidth)/72*PNGDotsPerInch)) {
			t.Errorf("%s is %d px wide", f, w)
		}
	}
	text := pageText(t, page)
	for _, want := range []string{"run 6 (after spring change): pitch frequency", "run 6 (after spring change): rear ride rate",
		"run 8 could not be analysed", "after spring change", "logs/rig-3.csv"} {
		if !strings.Contains(text, want) {
			t.Errorf("report lacks %q", want)
		}
	}
}

// TestTrendFigureChecksData: a NaN value or mismatched lengths are a
// *SeriesError, not a panic or a blank figure.
func TestTrendFigureChecksData(t *testing.T) {
	good := trendData(trendCampaign(), trendCampaign().Series[1])
	bad := good
	bad.Values = append([]float64{math.NaN()}, good.Values[1:]...)
	var se *SeriesError
	if _, err := TrendFigure(bad); !errors.As(err, &se) || se.Index != 0 {
		t.Errorf("NaN value: %v", err)
	}
	bad = good
	bad.SD = good.SD[1:]
	if _, err := TrendFigure(bad); !errors.As(err, &se) || !strings.Contains(err.Error(), "sd") {
		t.Errorf("short sd: %v", err)
	}
	if _, err := TrendFigure(good); err != nil {
		t.Error(err)
	}
}
