package plots

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// PoleStatus says how a pole of one model order agrees with the poles of
// the order below it.
type PoleStatus string

// The pole statuses of the stabilisation figure.
const (
	// PoleStable agrees in frequency, damping and shape.
	PoleStable PoleStatus = "stable"
	// PoleFrequencyOnly agrees in frequency only.
	PoleFrequencyOnly PoleStatus = "frequency"
	// PoleNew has no counterpart at the order below, or does not settle.
	PoleNew PoleStatus = "new"
)

// StabPole is one pole of the stabilisation figure.
type StabPole struct {
	Order  int
	FreqHz float64
	Status PoleStatus
}

// StabData is the input of the stabilisation figure.
type StabData struct {
	// Poles are the poles found at each model order.
	Poles []StabPole
	// IndicatorFreqHz and Indicator are a mode indicator curve (positive
	// values) drawn faintly behind the poles, scaled on a log scale to the
	// span of model orders; both may be nil.
	IndicatorFreqHz, Indicator []float64
	// Selected are the frequencies finally chosen, drawn as labelled lines.
	Selected []Marker
	// LogFrequency puts frequency on a log axis; every pole and indicator
	// frequency must then be above 0 Hz.
	LogFrequency bool
}

// Stabilisation figure size, vg units.
const (
	stabWidth  = 7.5 * vg.Inch
	stabHeight = 4 * vg.Inch
)

// stabStyles are our own glyphs for each status: a filled diamond for a
// stable pole, an open square for a frequency-only one, a small slanted
// cross for a new one.
var stabStyles = []struct {
	status PoleStatus
	legend string
	glyph  draw.GlyphStyle
}{
	{PoleStable, "stable pole", draw.GlyphStyle{Color: palette[0], Radius: vg.Points(3.6), Shape: diamondGlyph{}}},
	{PoleFrequencyOnly, "frequency-stable only", draw.GlyphStyle{Color: palette[1], Radius: vg.Points(3), Shape: draw.SquareGlyph{}}},
	{PoleNew, "new or unstable", draw.GlyphStyle{Color: inkFaint, Radius: vg.Points(2.2), Shape: draw.CrossGlyph{}}},
}

// diamondGlyph is a filled square standing on a corner.
type diamondGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	c.FillPolygon(sty.Color, []vg.Point{{X: pt.X, Y: pt.Y + r}, {X: pt.X + r, Y: pt.Y}, {X: pt.X, Y: pt.Y - r}, {X: pt.X - r, Y: pt.Y}})
}

// StabFigure draws model order against frequency, each pole shaped and
// coloured by its status, over a faint mode indicator curve.
func StabFigure(d StabData) (*Figure, error) {
	if len(d.Poles) == 0 {
		return nil, &SeriesError{Series: "stabilisation poles", Index: -1, Problem: "has no pole"}
	}
	byStatus := make(map[PoleStatus]plotter.XYs)
	minOrder, maxOrder := math.Inf(1), math.Inf(-1)
	minHz, maxHz := math.Inf(1), math.Inf(-1)
	for i, pole := range d.Poles {
		if math.IsNaN(pole.FreqHz) || math.IsInf(pole.FreqHz, 0) {
			return nil, &SeriesError{Series: "stabilisation pole frequency", Index: i, Value: pole.FreqHz, Problem: fmt.Sprintf("is %g, not a finite number", pole.FreqHz)}
		}
		if d.LogFrequency && pole.FreqHz <= 0 {
			return nil, &SeriesError{Series: "stabilisation pole frequency", Index: i, Value: pole.FreqHz, Problem: fmt.Sprintf("is %g, not positive as a log axis needs", pole.FreqHz)}
		}
		if !knownStatus(pole.Status) {
			return nil, &SeriesError{Series: "stabilisation pole status", Index: i, Value: math.NaN(), Problem: fmt.Sprintf("(order %d, %.3g Hz) has status %q: want %q, %q or %q", pole.Order, pole.FreqHz, pole.Status, PoleStable, PoleFrequencyOnly, PoleNew)}
		}
		o := float64(pole.Order)
		byStatus[pole.Status] = append(byStatus[pole.Status], plotter.XY{X: pole.FreqHz, Y: o})
		minOrder, maxOrder = math.Min(minOrder, o), math.Max(maxOrder, o)
		minHz, maxHz = math.Min(minHz, pole.FreqHz), math.Max(maxHz, pole.FreqHz)
	}
	if err := checkMarkers("stabilisation selected", d.Selected, d.LogFrequency); err != nil {
		return nil, err
	}
	p := newPanel("stabilisation across model order", "frequency [Hz]", "model order [-]")
	if maxOrder == minOrder {
		minOrder, maxOrder = minOrder-1, maxOrder+1
	}
	// Head room above the highest order keeps the labels of the selected
	// frequencies off the poles.
	p.Y.Min, p.Y.Max = minOrder-1, maxOrder+1+0.3*(maxOrder-minOrder)
	p.Y.Tick.Marker = orderTicks
	if d.Indicator != nil || d.IndicatorFreqHz != nil {
		lo, hi, err := addIndicatorBackdrop(p, d, minOrder, maxOrder)
		if err != nil {
			return nil, err
		}
		minHz, maxHz = math.Min(minHz, lo), math.Max(maxHz, hi)
	}
	for _, st := range stabStyles {
		pts := byStatus[st.status]
		if len(pts) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, fmt.Errorf("plots: stabilisation poles %q: %w", st.status, err)
		}
		sc.GlyphStyle = st.glyph
		p.Add(sc)
		p.Legend.Add(st.legend, sc)
	}
	if minHz == maxHz && !d.LogFrequency {
		minHz, maxHz = minHz-0.5, maxHz+0.5
	}
	freqAxis(p, []float64{minHz, maxHz}, d.LogFrequency)
	p.Add(newVLines(d.Selected, true))
	return newFigure(stabWidth, []vg.Length{stabHeight}, p), nil
}

// orderTicks labels whole model orders in steps of 1, 2 or 5 times a
// power of ten, about six labels over the axis.
var orderTicks = plot.TickerFunc(func(min, max float64) []plot.Tick {
	step := 1.0
	for _, mult := range []float64{1, 2, 5, 10, 20, 50, 100, 200, 500} {
		step = mult
		if (max-min)/step <= 8 {
			break
		}
	}
	var ticks []plot.Tick
	for v := math.Ceil(min/step) * step; v <= max; v += step {
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', 0, 64)})
	}
	return ticks
})

// knownStatus reports whether s is one of the PoleStatus constants.
func knownStatus(s PoleStatus) bool {
	for _, st := range stabStyles {
		if st.status == s {
			return true
		}
	}
	return false
}

// addIndicatorBackdrop draws the mode indicator curve of d faintly, its log
// scaled onto [minOrder, maxOrder], and returns its frequency span.
func addIndicatorBackdrop(p *plot.Plot, d StabData, minOrder, maxOrder float64) (loHz, hiHz float64, err error) {
	if err := checkFinite("stabilisation indicator frequency", d.IndicatorFreqHz); err != nil {
		return 0, 0, err
	}
	if err := checkIncreasing("stabilisation indicator frequency", d.IndicatorFreqHz); err != nil {
		return 0, 0, err
	}
	if err := checkLen("stabilisation indicator", d.Indicator, len(d.IndicatorFreqHz)); err != nil {
		return 0, 0, err
	}
	if err := checkPositive("stabilisation indicator", d.Indicator); err != nil {
		return 0, 0, err
	}
	if d.LogFrequency {
		if err := checkPositive("stabilisation indicator frequency", d.IndicatorFreqHz); err != nil {
			return 0, 0, err
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range d.Indicator {
		lo, hi = math.Min(lo, math.Log(v)), math.Max(hi, math.Log(v))
	}
	span := hi - lo
	if span == 0 {
		span = 1
	}
	xy := make(plotter.XYs, len(d.Indicator))
	for i, v := range d.Indicator {
		xy[i] = plotter.XY{X: d.IndicatorFreqHz[i], Y: minOrder + (maxOrder-minOrder)*(math.Log(v)-lo)/span}
	}
	l, err := plotter.NewLine(xy)
	if err != nil {
		return 0, 0, fmt.Errorf("plots: stabilisation indicator: %w", err)
	}
	l.LineStyle = draw.LineStyle{Color: inkFaint, Width: vg.Points(1.2)}
	p.Add(l)
	p.Legend.Add("mode indicator (scaled)", l)
	return d.IndicatorFreqHz[0], d.IndicatorFreqHz[len(d.IndicatorFreqHz)-1], nil
}
