package plots

import (
	"bytes"
	"encoding/xml"
	"errors"
	"flag"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// figureDir, when set, keeps the test figures and report there to be looked at:
//
//	go test ./plots/ -figures /tmp/figs
var figureDir = flag.String("figures", "", "write the test figures into this directory")

// figureCases are the figures drawn from the synthetic data of synth_test.go.
func figureCases() []struct {
	name string
	make func() (*Figure, error)
} {
	return []struct {
		name string
		make func() (*Figure, error)
	}{
		{"frf", func() (*Figure, error) { return FRFFigure(synthFRF(false)) }},
		{"frf_log", func() (*Figure, error) { return FRFFigure(synthFRF(true)) }},
		{"frf_fourpost", func() (*Figure, error) { return FRFFigure(fourPostFRF()) }},
		{"shapes", func() (*Figure, error) { return ShapeFigure(synthShapes()) }},
		{"indicator", func() (*Figure, error) { return IndicatorFigure(synthIndicator()) }},
		{"stabilisation", func() (*Figure, error) { return StabFigure(synthStab()) }},
		{"decay", func() (*Figure, error) { return DecayFigure(synthDecay()) }},
	}
}

// TestFigureFormats draws every figure to PNG and SVG and checks that the
// PNG decodes at the size the figure states and that the SVG is XML.
func TestFigureFormats(t *testing.T) {
	for _, tc := range figureCases() {
		t.Run(tc.name, func(t *testing.T) {
			fig, err := tc.make()
			if err != nil {
				t.Fatal(err)
			}
			dir := t.TempDir()
			if *figureDir != "" {
				dir = *figureDir
			}
			for _, ext := range []string{".png", ".svg"} {
				path := filepath.Join(dir, tc.name+ext)
				if err := fig.Save(path); err != nil {
					t.Fatal(err)
				}
				b, err := os.ReadFile(path)
				if err != nil {
					t.Fatal(err)
				}
				if ext == ".png" {
					checkPNG(t, b, fig)
				} else {
					checkXML(t, b)
				}
			}
		})
	}
}

// checkPNG checks that b decodes as a PNG image of the figure's size.
func checkPNG(t *testing.T, b []byte, fig *Figure) {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("PNG does not decode: %v", err)
	}
	w, h := fig.Size()
	wantW := int(math.Ceil(w.Points() / 72 * PNGDotsPerInch))
	wantH := int(math.Ceil(h.Points() / 72 * PNGDotsPerInch))
	if got := img.Bounds().Size(); abs(got.X-wantW) > 1 || abs(got.Y-wantH) > 1 {
		t.Errorf("PNG is %dx%d px, want %dx%d", got.X, got.Y, wantW, wantH)
	}
}

// checkXML checks that b parses as XML from start to end.
func checkXML(t *testing.T, b []byte) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	for {
		_, err := dec.Token()
		if errors.Is(err, io.EOF) {
			return
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v", err)
		}
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// TestFigureDataErrors feeds each figure bad data and checks that it
// returns a *SeriesError naming the series and the index, without a panic.
func TestFigureDataErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name      string
		draw      func() (*Figure, error)
		series    string
		wantIndex int
	}{
		{"FRF empty", func() (*Figure, error) { return FRFFigure(FRFData{}) }, "FRF curves", -1},
		{"FRF no frequencies", func() (*Figure, error) {
			return FRFFigure(FRFData{Curves: []FRFCurve{{Name: "a"}}})
		}, "FRF frequency", -1},
		{"FRF NaN magnitude", func() (*Figure, error) {
			d := synthFRF(false)
			d.Curves[0].Magnitude[3] = nan
			return FRFFigure(d)
		}, `"body_front / pan_f" magnitude`, 3},
		{"FRF zero magnitude", func() (*Figure, error) {
			d := synthFRF(true)
			d.Curves[1].FitMagnitude[9] = 0
			return FRFFigure(d)
		}, `"body_rear / pan_r" fitted magnitude`, 9},
		{"FRF short phase", func() (*Figure, error) {
			d := synthFRF(false)
			d.Curves[0].PhaseDeg = d.Curves[0].PhaseDeg[:5]
			return FRFFigure(d)
		}, `"body_front / pan_f" phase`, -1},
		{"FRF band half given", func() (*Figure, error) {
			d := synthFRF(false)
			d.Curves[0].Upper = nil
			return FRFFigure(d)
		}, `"body_front / pan_f" band`, -1},
		{"FRF coherence Inf", func() (*Figure, error) {
			d := synthFRF(false)
			d.Coherence[1].Values[4] = inf
			return FRFFigure(d)
		}, `coherence "body_rear"`, 4},
		{"FRF frequency not increasing", func() (*Figure, error) {
			d := synthFRF(false)
			d.FreqHz[6] = d.FreqHz[5]
			return FRFFigure(d)
		}, "FRF frequency", 6},
		{"FRF marker NaN", func() (*Figure, error) {
			d := synthFRF(false)
			d.Markers[1].FreqHz = nan
			return FRFFigure(d)
		}, `FRF marker "pitch 1.37 Hz"`, 1},
		{"indicator empty", func() (*Figure, error) { return IndicatorFigure(IndicatorData{}) }, "indicator frequency", -1},
		{"indicator peak series count", func() (*Figure, error) {
			d := synthIndicator()
			d.PeakSeries = []int{0}
			return IndicatorFigure(d)
		}, "indicator peak series", -1},
		{"indicator peak series out of range", func() (*Figure, error) {
			d := synthIndicator()
			d.PeakSeries = []int{0, 5}
			return IndicatorFigure(d)
		}, "indicator peak series", 1},
		{"indicator negative", func() (*Figure, error) {
			d := synthIndicator()
			d.Values[1].Values[2] = -1
			return IndicatorFigure(d)
		}, `singular value "second"`, 2},
		{"stabilisation empty", func() (*Figure, error) { return StabFigure(StabData{}) }, "stabilisation poles", -1},
		{"stabilisation unknown status", func() (*Figure, error) {
			d := synthStab()
			d.Poles[4].Status = "maybe"
			return StabFigure(d)
		}, "stabilisation pole status", 4},
		{"stabilisation indicator NaN", func() (*Figure, error) {
			d := synthStab()
			d.Indicator[8] = nan
			return StabFigure(d)
		}, "stabilisation indicator", 8},
		{"shapes empty", func() (*Figure, error) { return ShapeFigure(ShapeData{}) }, "axle distances", 0},
		{"shapes no mode", func() (*Figure, error) { return ShapeFigure(ShapeData{FrontM: 1, RearM: 1}) }, "mode shapes", -1},
		{"shapes NaN pitch per bounce", func() (*Figure, error) {
			d := synthShapes()
			d.Modes[1].Model.PitchPerBounceRadPerM = nan
			return ShapeFigure(d)
		}, `mode "pitch" model shape`, 2},
		{"shapes sensor count", func() (*Figure, error) {
			d := synthShapes()
			d.Modes[0].SensorW = d.Modes[0].SensorW[:1]
			return ShapeFigure(d)
		}, `mode "bounce" sensor motion`, -1},
		{"shapes neither estimate", func() (*Figure, error) {
			d := synthShapes()
			d.Modes[0].Measured, d.Modes[0].Model, d.Modes[0].SensorW = nil, nil, nil
			return ShapeFigure(d)
		}, `mode "bounce" shape`, -1},
		{"decay empty", func() (*Figure, error) { return DecayFigure(DecayData{}) }, "time history signals", -1},
		{"decay NaN", func() (*Figure, error) {
			d := synthDecay()
			d.Measured[0].Values[11] = nan
			return DecayFigure(d)
		}, `time history "body_front"`, 11},
		{"decay fit time short", func() (*Figure, error) {
			d := synthDecay()
			d.FitTimeS = d.FitTimeS[:10]
			return DecayFigure(d)
		}, `time history "body_front fit"`, -1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			fig, err := tc.draw()
			var se *SeriesError
			if !errors.As(err, &se) {
				t.Fatalf("got figure %v, error %v; want a *SeriesError", fig != nil, err)
			}
			if !strings.Contains(se.Series, tc.series) || se.Index != tc.wantIndex {
				t.Errorf("error %q names series %q index %d, want %q index %d", err, se.Series, se.Index, tc.series, tc.wantIndex)
			}
		})
	}
}

// TestFigureEdgeCases draws inputs at the edges of what is valid.
func TestFigureEdgeCases(t *testing.T) {
	cases := []struct {
		name string
		draw func() (*Figure, error)
	}{
		{"FRF one bin", func() (*Figure, error) {
			return FRFFigure(FRFData{FreqHz: []float64{1}, Curves: []FRFCurve{{Name: "a", Magnitude: []float64{1}, PhaseDeg: []float64{0}}}})
		}},
		{"FRF one bin, log frequency", func() (*Figure, error) {
			return FRFFigure(FRFData{FreqHz: []float64{0, 0.5}, LogFrequency: true, Curves: []FRFCurve{{Name: "a", Magnitude: []float64{1, 1}, PhaseDeg: []float64{0, 0}}}})
		}},
		{"indicator one bin, log frequency", func() (*Figure, error) {
			return IndicatorFigure(IndicatorData{FreqHz: []float64{0.5}, LogFrequency: true, Values: []Series{{Name: "a", Values: []float64{2}}}, Peaks: []Marker{{FreqHz: 0.5}}})
		}},
		{"FRF band below zero on log axis", func() (*Figure, error) {
			d := synthFRF(true)
			d.Curves[0].Lower[20] = -0.5
			return FRFFigure(d)
		}},
		{"shapes pure bounce, model only", func() (*Figure, error) {
			return ShapeFigure(ShapeData{FrontM: 1.2, RearM: 1.4, Modes: []ShapeMode{{Label: "bounce", Model: &ShapeLine{FreqHz: 1.1, DampingRatio: 0.3}}}})
		}},
		{"shapes node beyond the front", func() (*Figure, error) {
			return ShapeFigure(ShapeData{FrontM: 1.2, RearM: 1.4, Modes: []ShapeMode{{Label: "bounce", Measured: &ShapeLine{FreqHz: 1.1, DampingRatio: 0.3, PitchPerBounceRadPerM: 0.2}}}})
		}},
		{"stabilisation one order, no indicator", func() (*Figure, error) {
			return StabFigure(StabData{Poles: []StabPole{{Order: 4, FreqHz: 1.2, Status: PoleStable}}})
		}},
		{"decay without fit or window", func() (*Figure, error) {
			return DecayFigure(DecayData{TimeS: []float64{0, 0.01, 0.02}, Measured: []Series{{Name: "a", Values: []float64{0, 1, 0}}}})
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			fig, err := tc.draw()
			if err != nil {
				t.Fatal(err)
			}
			for _, format := range []string{"png", "svg"} {
				if _, err := fig.Encode(format); err != nil {
					t.Fatal(err)
				}
			}
		})
	}
	fig, err := DecayFigure(synthDecay())
	if err != nil {
		t.Fatal(err)
	}
	if err := fig.Save(filepath.Join(t.TempDir(), "decay.gif")); err == nil {
		t.Error("saving as .gif did not fail")
	}
}

func TestSeriesErrorMessage(t *testing.T) {
	d := synthFRF(false)
	d.Curves[0].Magnitude[3] = math.NaN()
	_, err := FRFFigure(d)
	const want = `plots: FRF curve "body_front / pan_f" magnitude: value 3 is NaN, not a finite number`
	if err == nil || err.Error() != want {
		t.Errorf("error %v, want %s", err, want)
	}
}
