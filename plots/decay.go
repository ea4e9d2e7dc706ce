package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// DecayData is the input of the time history figure: measured signals, the
// fitted free-decay curves and the window that the fit used.
type DecayData struct {
	// TimeS is the time base of Measured, strictly increasing, s.
	TimeS []float64
	// Measured are the measured signals on TimeS.
	Measured []Series
	// FitTimeS is the time base of Fitted (often the window only), s.
	FitTimeS []float64
	// Fitted are fitted or free-decay curves on FitTimeS, drawn dashed;
	// may be nil.
	Fitted []Series
	// WindowStartS and WindowEndS mark the fit window; no window is marked
	// when WindowEndS <= WindowStartS.
	WindowStartS, WindowEndS float64
	// Unit is the unit of the signals; empty means "m/s²".
	Unit string
}

// Time history figure size, vg units.
const (
	decayWidth  = 7 * vg.Inch
	decayHeight = 3.4 * vg.Inch
)

// DecayFigure draws the measured signals against time with the fitted
// curves overlaid and the fit window shaded.
func DecayFigure(d DecayData) (*Figure, error) {
	if len(d.Measured) == 0 {
		return nil, &SeriesError{Series: "time history signals", Index: -1, Problem: "has no signal"}
	}
	if err := checkTimes("time history time", d.TimeS, d.Measured); err != nil {
		return nil, err
	}
	if len(d.Fitted) > 0 {
		if err := checkTimes("time history fit time", d.FitTimeS, d.Fitted); err != nil {
			return nil, err
		}
	}
	if err := checkFinite("time history window", []float64{d.WindowStartS, d.WindowEndS}); err != nil {
		return nil, err
	}
	unit := d.Unit
	if unit == "" {
		unit = "m/s²"
	}
	p := newPanel("time history", "time [s]", fmt.Sprintf("vertical acceleration [%s]", unit))
	p.X.Min, p.X.Max = d.TimeS[0], d.TimeS[len(d.TimeS)-1]
	if d.WindowEndS > d.WindowStartS {
		text := plot.New().Title.TextStyle
		text.Font.Size = vg.Points(8.5)
		text.Color = inkDark
		text.XAlign, text.YAlign = draw.XLeft, draw.YBottom
		p.Add(&xSpan{from: d.WindowStartS, to: d.WindowEndS, fill: tint(palette[5], 0x1c), text: text,
			label: fmt.Sprintf("fit window %.3g-%.3g s", d.WindowStartS, d.WindowEndS)})
	}
	for i, s := range d.Measured {
		l, err := plotter.NewLine(xyOf(d.TimeS, s.Values))
		if err != nil {
			return nil, fmt.Errorf("plots: time history %q: %w", s.Name, err)
		}
		l.LineStyle = seriesLine(i)
		l.Width = vg.Points(1)
		p.Add(l)
		p.Legend.Add(s.Name, l)
	}
	for i, s := range d.Fitted {
		l, err := plotter.NewLine(xyOf(d.FitTimeS, s.Values))
		if err != nil {
			return nil, fmt.Errorf("plots: time history fit %q: %w", s.Name, err)
		}
		l.LineStyle = fitLine(i)
		l.Width = vg.Points(1.6)
		p.Add(l)
		p.Legend.Add(s.Name, l)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, group := range [][]Series{d.Measured, d.Fitted} {
		for _, s := range group {
			for _, v := range s.Values {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	// Head room above the data for the legend.
	p.Y.Min, p.Y.Max = lo-0.05*(hi-lo), hi+0.35*(hi-lo)
	return newFigure(decayWidth, decayHeight, p), nil
}

// checkTimes checks a time base and the series on it.
func checkTimes(name string, timeS []float64, series []Series) error {
	if err := checkFinite(name, timeS); err != nil {
		return err
	}
	if err := checkIncreasing(name, timeS); err != nil {
		return err
	}
	for _, s := range series {
		sname := fmt.Sprintf("time history %q", s.Name)
		if err := checkLen(sname, s.Values, len(timeS)); err != nil {
			return err
		}
		if err := checkFinite(sname, s.Values); err != nil {
			return err
		}
	}
	return nil
}
