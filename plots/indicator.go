package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/interp"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// IndicatorData is the input of the mode indicator figure: the singular
// values of the FRF matrix at each frequency.
type IndicatorData struct {
	// FreqHz is the frequency grid, strictly increasing, in Hz.
	FreqHz []float64
	// Values holds one series per singular value, the largest first, each
	// positive and on FreqHz.
	Values []Series
	// Peaks are the peaks picked from the indicator, each marked on the
	// series PeakSeries gives (an index into Values), or on the first series
	// when PeakSeries is nil.
	Peaks      []Marker
	PeakSeries []int
	// LogFrequency puts frequency on a log axis; points at or below 0 Hz
	// are then left out.
	LogFrequency bool
	// Unit is the unit of the singular values (that of the FRF); empty
	// means "-".
	Unit string
}

// Mode indicator figure size, vg units.
const (
	indicatorWidth  = 7.5 * vg.Inch
	indicatorHeight = 3.6 * vg.Inch
)

// IndicatorFigure draws the singular values against frequency on a log
// axis, with the peaks marked on the largest.
func IndicatorFigure(d IndicatorData) (*Figure, error) {
	first, err := checkFrequency("indicator frequency", d.FreqHz, d.LogFrequency)
	if err != nil {
		return nil, err
	}
	if len(d.Values) == 0 {
		return nil, &SeriesError{Series: "indicator singular values", Index: -1, Problem: "has no series"}
	}
	for _, s := range d.Values {
		name := fmt.Sprintf("indicator singular value %q", s.Name)
		if err := checkLen(name, s.Values, len(d.FreqHz)); err != nil {
			return nil, err
		}
		if err := checkPositive(name, s.Values); err != nil {
			return nil, err
		}
	}
	freqHz := d.FreqHz[first:]
	if err := checkMarkers("indicator peak", d.Peaks, d.LogFrequency); err != nil {
		return nil, err
	}
	unit := d.Unit
	if unit == "" {
		unit = "-"
	}
	p := newPanel("mode indicator: singular values of the FRF matrix", "", fmt.Sprintf("singular value [%s]", unit))
	freqAxis(p, freqHz, d.LogFrequency)
	setLog(&p.Y)
	for i, s := range d.Values {
		thumbs, err := markedLine(p, xyOf(freqHz, s.Values[first:]), seriesLine(i), seriesGlyph(i), d.LogFrequency, i, len(d.Values))
		if err != nil {
			return nil, fmt.Errorf("plots: indicator singular value %q: %w", s.Name, err)
		}
		p.Legend.Add(s.Name, thumbs...)
	}
	if d.PeakSeries != nil && len(d.PeakSeries) != len(d.Peaks) {
		return nil, &SeriesError{Series: "indicator peak series", Index: -1, Problem: fmt.Sprintf(
			"%d series indices for %d peaks", len(d.PeakSeries), len(d.Peaks))}
	}
	if len(d.Peaks) > 0 && len(freqHz) > 1 {
		var pts plotter.XYs
		for k, m := range d.Peaks {
			j := 0
			if d.PeakSeries != nil {
				j = d.PeakSeries[k]
			}
			if j < 0 || j >= len(d.Values) {
				return nil, &SeriesError{Series: "indicator peak series", Index: k, Value: float64(j),
					Problem: fmt.Sprintf("names no series (there are %d)", len(d.Values))}
			}
			var curve interp.PiecewiseLinear
			if err := curve.Fit(freqHz, d.Values[j].Values[first:]); err != nil {
				return nil, fmt.Errorf("plots: indicator singular value %q: %w", d.Values[j].Name, err)
			}
			if m.FreqHz >= freqHz[0] && m.FreqHz <= freqHz[len(freqHz)-1] {
				pts = append(pts, plotter.XY{X: m.FreqHz, Y: curve.Predict(m.FreqHz)})
			}
		}
		if len(pts) > 0 {
			sc, err := plotter.NewScatter(pts)
			if err != nil {
				return nil, fmt.Errorf("plots: indicator peaks: %w", err)
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: inkDark, Radius: vg.Points(5), Shape: draw.RingGlyph{}}
			p.Add(sc)
			p.Legend.Add("picked peak", sc)
		}
	}
	p.Add(newVLines(d.Peaks, true))
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range d.Values {
		for _, v := range s.Values[first:] {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	p.Y.Min = lo / 1.4
	p.Y.Max = logHeadroom(p.Y.Min, hi*1.2, labelBand)
	return newFigure(indicatorWidth, []vg.Length{indicatorHeight}, p), nil
}
