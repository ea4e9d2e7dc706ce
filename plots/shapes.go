package plots

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ShapeLine is one estimate (measured or model) of a rigid-body mode shape,
// with z = 1: w(s) = 1 - s*PitchPerBounceRadPerM.
type ShapeLine struct {
	// FreqHz is the natural frequency, Hz.
	FreqHz float64
	// DampingRatio is the damping ratio, -.
	DampingRatio float64
	// PitchPerBounceRadPerM is theta/z, rad/m (pitch positive nose-down).
	PitchPerBounceRadPerM float64
}

// ShapeMode is one body mode of the mode shape figure.
type ShapeMode struct {
	// Label names the mode, e.g. "bounce" or "pitch".
	Label string
	// Measured and Model are the two estimates; either may be nil, not both.
	Measured, Model *ShapeLine
	// SensorW is the measured vertical motion at ShapeData.SensorXM, real
	// part, with z = 1 (the same scale as Measured); may be nil.
	SensorW []float64
}

// ShapeData is the input of the mode shape figure: a side view of the body.
type ShapeData struct {
	// FrontM is a, the distance from the CG forward to the front axle, m.
	FrontM float64
	// RearM is b, the distance from the CG back to the rear axle, m (the
	// rear axle is at s = -RearM).
	RearM float64
	// SensorXM are the sensor positions s, m.
	SensorXM []float64
	// Modes are drawn one panel each.
	Modes []ShapeMode
}

// Mode shape figure size, vg units.
const (
	shapeWidth       = 7.5 * vg.Inch
	shapePanelHeight = 2.4 * vg.Inch
	// shapeMargin is the part of the wheelbase shown beyond each axle.
	shapeMargin = 0.12
)

// ShapeFigure draws each mode as a side view: the wheelbase from the rear
// axle (-b) to the front axle (+a), the deflected body line w(s) = z - s*theta
// (z = 1, scaled to a largest |w| of 1 over the wheelbase), the node where w
// vanishes (labelled at the edge when it lies beyond the view), the sensor
// positions, and the measured and model shapes overlaid.
func ShapeFigure(d ShapeData) (*Figure, error) {
	if err := checkGeometry(d); err != nil {
		return nil, err
	}
	if len(d.Modes) == 0 {
		return nil, &SeriesError{Series: "mode shapes", Index: -1, Problem: "has no mode"}
	}
	panels := make([]*plot.Plot, len(d.Modes))
	heights := make([]vg.Length, len(d.Modes))
	for i, m := range d.Modes {
		p, err := shapePanel(d, m)
		if err != nil {
			return nil, err
		}
		panels[i], heights[i] = p, shapePanelHeight
	}
	return newFigure(shapeWidth, heights, panels...), nil
}

// checkGeometry checks the axle distances and sensor positions.
func checkGeometry(d ShapeData) error {
	if err := checkPositive("axle distances (front, rear)", []float64{d.FrontM, d.RearM}); err != nil {
		return err
	}
	if d.SensorXM == nil {
		return nil
	}
	return checkFinite("sensor positions", d.SensorXM)
}

// shapePanel draws one mode.
func shapePanel(d ShapeData, m ShapeMode) (*plot.Plot, error) {
	if m.Measured == nil && m.Model == nil {
		return nil, &SeriesError{Series: fmt.Sprintf("mode %q shape", m.Label), Index: -1, Problem: "has neither a measured nor a model shape"}
	}
	lines := []struct {
		what  string
		shape *ShapeLine
	}{{"measured", m.Measured}, {"model", m.Model}}
	for _, l := range lines {
		if l.shape == nil {
			continue
		}
		name := fmt.Sprintf("mode %q %s shape", m.Label, l.what)
		if err := checkFinite(name, []float64{l.shape.FreqHz, l.shape.DampingRatio, l.shape.PitchPerBounceRadPerM}); err != nil {
			return nil, err
		}
	}
	if m.SensorW != nil {
		name := fmt.Sprintf("mode %q sensor motion", m.Label)
		if err := checkLen(name, m.SensorW, len(d.SensorXM)); err != nil {
			return nil, err
		}
		if err := checkFinite(name, m.SensorW); err != nil {
			return nil, err
		}
		if m.Measured == nil {
			return nil, &SeriesError{Series: name, Index: -1, Problem: "is given without a measured shape"}
		}
	}

	wheelbaseM := d.FrontM + d.RearM
	sMin, sMax := -d.RearM-shapeMargin*wheelbaseM, d.FrontM+shapeMargin*wheelbaseM
	p := newPanel(shapeTitle(m), "position s from CG, forward positive [m]", "w(s), scaled [-]")
	p.X.Min, p.X.Max = sMin, sMax
	p.X.Tick.Marker = bodyTicks(d.FrontM, d.RearM)
	p.Y.Min, p.Y.Max = -1.5, 1.5

	if err := addBody(p, d); err != nil {
		return nil, err
	}
	for i, l := range lines {
		if l.shape == nil {
			continue
		}
		ppb := l.shape.PitchPerBounceRadPerM
		scale := 1 / math.Max(math.Abs(1+d.RearM*ppb), math.Abs(1-d.FrontM*ppb))
		body := plotter.XYs{{X: sMin, Y: scale * (1 - sMin*ppb)}, {X: sMax, Y: scale * (1 - sMax*ppb)}}
		line, err := plotter.NewLine(body)
		if err != nil {
			return nil, fmt.Errorf("plots: mode %q %s shape: %w", m.Label, l.what, err)
		}
		line.LineStyle = draw.LineStyle{Color: seriesColor(i), Width: vg.Points(2)}
		if i == 1 {
			line.Dashes = fitDashes
		}
		p.Add(line)
		text, err := addNode(p, ppb, sMin, sMax, i)
		if err != nil {
			return nil, fmt.Errorf("plots: mode %q %s node: %w", m.Label, l.what, err)
		}
		p.Legend.Add(l.what+": "+text, line)
		if i == 0 && m.SensorW != nil {
			pts := make(plotter.XYs, len(m.SensorW))
			for k, w := range m.SensorW {
				pts[k] = plotter.XY{X: d.SensorXM[k], Y: scale * w}
			}
			sc, err := plotter.NewScatter(pts)
			if err != nil {
				return nil, fmt.Errorf("plots: mode %q sensor motion: %w", m.Label, err)
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: seriesColor(0), Radius: vg.Points(3.5), Shape: draw.BoxGlyph{}}
			p.Add(sc)
			p.Legend.Add("measured at sensors", sc)
		}
	}
	return p, nil
}

// shapeTitle is the panel title: label, frequency and damping ratio (ζ)
// of each estimate.
func shapeTitle(m ShapeMode) string {
	var parts []string
	if m.Measured != nil {
		parts = append(parts, fmt.Sprintf("measured %.3g Hz, ζ %.2f", m.Measured.FreqHz, m.Measured.DampingRatio))
	}
	if m.Model != nil {
		parts = append(parts, fmt.Sprintf("model %.3g Hz, ζ %.2f", m.Model.FreqHz, m.Model.DampingRatio))
	}
	return m.Label + ": " + strings.Join(parts, "; ")
}

// bodyTicks labels the position axis at the axles and the CG only, with
// unlabelled ticks at the usual places between.
func bodyTicks(frontM, rearM float64) plot.Ticker {
	return plot.TickerFunc(func(min, max float64) []plot.Tick {
		ticks := []plot.Tick{
			{Value: -rearM, Label: fmt.Sprintf("%.3g\nrear axle", -rearM)},
			{Value: 0, Label: "0\nCG"},
			{Value: frontM, Label: fmt.Sprintf("+%.3g\nfront axle", frontM)},
		}
		for _, t := range (plot.DefaultTicks{}).Ticks(min, max) {
			ticks = append(ticks, plot.Tick{Value: t.Value})
		}
		return ticks
	})
}

// addBody draws the undeflected wheelbase line, the axles, the CG and the
// sensor positions.
func addBody(p *plot.Plot, d ShapeData) error {
	base, err := plotter.NewLine(plotter.XYs{{X: -d.RearM, Y: 0}, {X: d.FrontM, Y: 0}})
	if err != nil {
		return fmt.Errorf("plots: wheelbase: %w", err)
	}
	base.LineStyle = draw.LineStyle{Color: inkFaint, Width: vg.Points(3)}
	p.Add(base)

	axles, err := plotter.NewScatter(plotter.XYs{{X: -d.RearM, Y: 0}, {X: d.FrontM, Y: 0}, {X: 0, Y: 0}})
	if err != nil {
		return fmt.Errorf("plots: axles: %w", err)
	}
	axles.GlyphStyleFunc = func(i int) draw.GlyphStyle {
		if i == 2 {
			return draw.GlyphStyle{Color: inkDark, Radius: vg.Points(4), Shape: draw.CrossGlyph{}}
		}
		return draw.GlyphStyle{Color: inkDark, Radius: vg.Points(5), Shape: draw.RingGlyph{}}
	}
	p.Add(axles)
	if len(d.SensorXM) == 0 {
		return nil
	}
	pts := make(plotter.XYs, len(d.SensorXM))
	for i, s := range d.SensorXM {
		pts[i] = plotter.XY{X: s, Y: 0}
	}
	sensors, err := plotter.NewScatter(pts)
	if err != nil {
		return fmt.Errorf("plots: sensor positions: %w", err)
	}
	sensors.GlyphStyle = draw.GlyphStyle{Color: inkDark, Radius: vg.Points(3), Shape: draw.PyramidGlyph{}}
	p.Add(sensors)
	p.Legend.Add("sensor position", sensors)
	return nil
}

// addNode marks the node of shape i (0 measured, 1 model), with pitch per
// bounce ppb, by a glyph on the body line at rest when it lies within
// [sMin, sMax], and returns the words for the legend that say where it is.
func addNode(p *plot.Plot, ppb, sMin, sMax float64, i int) (string, error) {
	node := 1 / ppb
	switch {
	case ppb == 0:
		return "no node (pure bounce)", nil
	case node < sMin || node > sMax:
		return fmt.Sprintf("node %.3g m, off the view", node), nil
	}
	mark, err := plotter.NewScatter(plotter.XYs{{X: node, Y: 0}})
	if err != nil {
		return "", err
	}
	mark.GlyphStyle = draw.GlyphStyle{Color: seriesColor(i), Radius: vg.Points(4.5 - 1.5*float64(i)), Shape: draw.CircleGlyph{}}
	p.Add(mark)
	return fmt.Sprintf("node %.3g m (dot)", node), nil
}
