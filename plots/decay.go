package plots

import (
	"fmt"
	"math"

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
	decayWidth  = 7.5 * vg.Inch
	decayHeight = 3.2 * vg.Inch
	// decayMargin is the part of the fit window's length shown before and
	// after it.
	decayMargin = 0.25
)

// DecayFigure draws the measured signals against time with the fitted
// curves dashed in the colours of their signals, zoomed on the fit window
// (with a quarter of its length shown on each side) and the window shaded;
// without a window it shows the whole record.
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
	from, to := d.TimeS[0], d.TimeS[len(d.TimeS)-1]
	if w := d.WindowEndS - d.WindowStartS; w > 0 {
		from, to = math.Max(from, d.WindowStartS-decayMargin*w), math.Min(to, d.WindowEndS+decayMargin*w)
		text := textStyle(8.5, inkDark)
		text.XAlign, text.YAlign = draw.XLeft, draw.YTop
		p.Add(&xSpan{from: d.WindowStartS, to: d.WindowEndS, fill: tint(palette[4], 0x22), text: text,
			label: fmt.Sprintf("fit window %.3g-%.3g s", d.WindowStartS, d.WindowEndS)})
	}
	if from >= to {
		from, to = d.TimeS[0], d.TimeS[len(d.TimeS)-1]
	}
	if from == to {
		from, to = from-0.5, to+0.5
	}
	p.X.Min, p.X.Max = from, to
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, group := range []struct {
		t      []float64
		series []Series
		fit    bool
	}{{d.TimeS, d.Measured, false}, {d.FitTimeS, d.Fitted, true}} {
		for i, s := range group.series {
			xy := visible(group.t, s.Values, from, to)
			if len(xy) == 0 {
				continue
			}
			for _, pt := range xy {
				lo, hi = math.Min(lo, pt.Y), math.Max(hi, pt.Y)
			}
			if group.fit {
				l, err := plotter.NewLine(xy)
				if err != nil {
					return nil, fmt.Errorf("plots: time history fit %q: %w", s.Name, err)
				}
				l.LineStyle = fitLine(i)
				l.Width = vg.Points(1.9)
				p.Add(l)
				p.Legend.Add(s.Name, l)
				continue
			}
			// Thin and light, so that the dashed fit over a noisy record shows.
			ls := seriesLine(i)
			ls.Color, ls.Width = tint(seriesColor(i), 0x80), vg.Points(0.8)
			thumbs, err := markedLine(p, xy, ls, seriesGlyph(i), false, i, len(d.Measured))
			if err != nil {
				return nil, fmt.Errorf("plots: time history %q: %w", s.Name, err)
			}
			p.Legend.Add(s.Name, thumbs...)
		}
	}
	if lo > hi {
		lo, hi = -1, 1
	}
	if lo == hi {
		lo, hi = lo-1, hi+1
	}
	// Head room above the data for the window's label.
	p.Y.Min, p.Y.Max = lo-0.05*(hi-lo), hi+0.18*(hi-lo)
	return newFigure(decayWidth, []vg.Length{decayHeight}, p), nil
}

// visible pairs the samples of ys at times t (equal lengths) that lie in
// [from, to].
func visible(t, ys []float64, from, to float64) plotter.XYs {
	var xy plotter.XYs
	for k, tk := range t {
		if tk >= from && tk <= to {
			xy = append(xy, plotter.XY{X: tk, Y: ys[k]})
		}
	}
	return xy
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
