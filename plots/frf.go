package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is a named sequence of values on the abscissa of the figure that
// holds it (a frequency grid, a time base).
type Series struct {
	Name   string
	Values []float64
}

// FRFCurve is one output/input pair of an FRF.
type FRFCurve struct {
	// Name names the pair, e.g. "body_front / pan_f".
	Name string
	// Output and Input name the pair's body sensor and rig input. When
	// every curve gives both, the curves take their colour from the output
	// and their glyph from the input, and the legend names each once;
	// otherwise each curve has a colour, a glyph and a legend entry.
	Output, Input string
	// Magnitude is |H| at each frequency, in MagnitudeUnit of FRFData.
	Magnitude []float64
	// PhaseDeg is the phase of H in degrees.
	PhaseDeg []float64
	// Lower and Upper bound an error band of |H| (e.g. ± 1 sigma); both or
	// neither. A lower bound <= 0 is drawn at the bottom of the axis.
	Lower, Upper []float64
	// FitMagnitude and FitPhaseDeg are the fitted model's |H| and phase,
	// drawn dashed; either may be nil.
	FitMagnitude, FitPhaseDeg []float64
}

// FRFData is the input of the FRF figure: FRFs on one frequency grid.
type FRFData struct {
	// FreqHz is the frequency grid, strictly increasing, in Hz.
	FreqHz []float64
	// Curves are the output/input pairs, one curve each.
	Curves []FRFCurve
	// Coherence, when given, is drawn in a strip under the phase (values
	// 0-1 on FreqHz), each series in the colour of the output it names.
	Coherence []Series
	// Markers are identified natural frequencies, drawn as labelled lines.
	Markers []Marker
	// LogFrequency puts frequency on a log axis; points at or below 0 Hz are
	// then left out.
	LogFrequency bool
	// MagnitudeUnit is the unit of |H|; empty means "-" (a ratio of
	// accelerations).
	MagnitudeUnit string
}

// FRF figure size, vg units (1/72 inch): the magnitude and phase panels
// and the compact coherence strip.
const (
	frfWidth       = 7.5 * vg.Inch
	frfPanelHeight = 2.5 * vg.Inch
	frfStripHeight = 1.1 * vg.Inch
)

// FRFFigure draws magnitude (log axis) over phase, with coherence as a
// compact strip when given, the panels' frequency axes aligned, the
// markers labelled in a band above the magnitudes and the legend beside
// the magnitude panel.
func FRFFigure(d FRFData) (*Figure, error) {
	if len(d.Curves) == 0 {
		return nil, &SeriesError{Series: "FRF curves", Index: -1, Problem: "has no curve"}
	}
	first, err := checkFrequency("FRF frequency", d.FreqHz, d.LogFrequency)
	if err != nil {
		return nil, err
	}
	if err := checkMarkers("FRF marker", d.Markers, d.LogFrequency); err != nil {
		return nil, err
	}
	n := len(d.FreqHz)
	freqHz := d.FreqHz[first:]
	for _, c := range d.Curves {
		if err := checkFRFCurve(c, n); err != nil {
			return nil, err
		}
	}
	for _, s := range d.Coherence {
		name := fmt.Sprintf("coherence %q", s.Name)
		if err := checkLen(name, s.Values, n); err != nil {
			return nil, err
		}
		if err := checkFinite(name, s.Values); err != nil {
			return nil, err
		}
	}

	unit := d.MagnitudeUnit
	if unit == "" {
		unit = "-"
	}
	mag := newPanel("frequency response", "", fmt.Sprintf("|H| [%s]", unit))
	setLog(&mag.Y)
	lo, hi := magnitudeRange(d.Curves, first)
	mag.Y.Min, mag.Y.Max = lo, logHeadroom(lo, hi, labelBand)
	phase := newPanel("", "", "phase [deg]")
	panels := []*plot.Plot{mag, phase}
	heights := []vg.Length{frfPanelHeight, frfPanelHeight}
	keys := frfKeys(d.Curves)
	phLo, phHi := math.Inf(1), math.Inf(-1)
	for i, c := range d.Curves {
		if err := addFRFCurve(mag, phase, keys[i], c, freqHz, first, d.LogFrequency); err != nil {
			return nil, err
		}
		for _, ys := range [][]float64{c.PhaseDeg, c.FitPhaseDeg} {
			for _, y := range ys[min(first, len(ys)):] {
				phLo, phHi = math.Min(phLo, y), math.Max(phHi, y)
			}
		}
	}
	phaseAxis(phase, phLo, phHi)
	addFRFLegend(mag, d.Curves, keys)
	if len(d.Coherence) > 0 {
		coh := newPanel("", "", "coherence [-]")
		coh.Y.Min, coh.Y.Max = 0, 1.05
		coh.Y.Tick.Marker = plot.ConstantTicks([]plot.Tick{{Value: 0, Label: "0"}, {Value: 0.5}, {Value: 1, Label: "1"}})
		for i, s := range d.Coherence {
			l, err := plotter.NewLine(xyOf(freqHz, s.Values[first:]))
			if err != nil {
				return nil, fmt.Errorf("plots: coherence %q: %w", s.Name, err)
			}
			l.LineStyle = seriesLine(outputIndex(keys, d.Curves, s.Name, i))
			coh.Add(l)
		}
		panels = append(panels, coh)
		heights = append(heights, frfStripHeight)
	}
	for i, p := range panels {
		freqAxis(p, freqHz, d.LogFrequency)
		p.Add(newVLines(d.Markers, i == 0))
		if i < len(panels)-1 {
			p.X.Label.Text = ""
		}
	}
	return newFigure(frfWidth, heights, panels...), nil
}

// curveKey is how a curve is drawn: its colour and its glyph (indices into
// the palette and the glyphs).
type curveKey struct{ color, glyph int }

// frfKeys gives each curve its colour and glyph: by output and input when
// every curve names both, else by curve.
func frfKeys(curves []FRFCurve) []curveKey {
	keys := make([]curveKey, len(curves))
	outputs, inputs := map[string]int{}, map[string]int{}
	for _, c := range curves {
		if c.Output == "" || c.Input == "" {
			for i := range keys {
				keys[i] = curveKey{i, i}
			}
			return keys
		}
		if _, ok := outputs[c.Output]; !ok {
			outputs[c.Output] = len(outputs)
		}
		if _, ok := inputs[c.Input]; !ok {
			inputs[c.Input] = len(inputs)
		}
	}
	for i, c := range curves {
		keys[i] = curveKey{outputs[c.Output], inputs[c.Input]}
	}
	return keys
}

// factored reports whether keys colour the curves by output (frfKeys).
func factored(curves []FRFCurve) bool {
	for _, c := range curves {
		if c.Output == "" || c.Input == "" {
			return false
		}
	}
	return true
}

// outputIndex is the colour of the coherence of output name: that of its
// curves, or the series' own place i when no curve names it.
func outputIndex(keys []curveKey, curves []FRFCurve, name string, i int) int {
	for k, c := range curves {
		if c.Output == name {
			return keys[k].color
		}
	}
	return i
}

// addFRFLegend writes the legend of the magnitude panel: the outputs'
// colours and the inputs' glyphs once each (or one entry per curve), then
// what solid, dashed and shaded mean.
func addFRFLegend(mag *plot.Plot, curves []FRFCurve, keys []curveKey) {
	seen := map[string]bool{}
	if factored(curves) {
		for i, c := range curves {
			if !seen["o"+c.Output] {
				seen["o"+c.Output] = true
				mag.Legend.Add(c.Output, legendLine(draw.LineStyle{Color: seriesColor(keys[i].color), Width: vg.Points(2)}))
			}
		}
		for i, c := range curves {
			if !seen["i"+c.Input] {
				seen["i"+c.Input] = true
				g := seriesGlyph(keys[i].glyph)
				g.Color = inkDark
				mag.Legend.Add("from "+c.Input, legendGlyph(g))
			}
		}
	} else {
		for i, c := range curves {
			g := seriesGlyph(keys[i].glyph)
			mag.Legend.Add(c.Name, legendLine(seriesLine(keys[i].color)), legendGlyph(g))
		}
	}
	grey := draw.LineStyle{Color: inkDark, Width: vg.Points(1.3)}
	mag.Legend.Add("measured", legendLine(grey))
	fit, band := false, false
	for _, c := range curves {
		fit = fit || c.FitMagnitude != nil || c.FitPhaseDeg != nil
		band = band || c.Lower != nil
	}
	if fit {
		grey.Dashes = fitDashes
		mag.Legend.Add("fitted model", legendLine(grey))
	}
	if band {
		mag.Legend.Add("error band", legendFill(tint(inkFaint, 0x70)))
	}
}

// checkFRFCurve checks the lengths and values of one curve on n frequencies.
func checkFRFCurve(c FRFCurve, n int) error {
	if (c.Lower == nil) != (c.Upper == nil) {
		return &SeriesError{Series: fmt.Sprintf("FRF curve %q band", c.Name), Index: -1, Problem: "has a lower or an upper bound without the other"}
	}
	parts := []struct {
		what     string
		xs       []float64
		optional bool
		log      bool
	}{
		{"magnitude", c.Magnitude, false, true},
		{"phase", c.PhaseDeg, false, false},
		{"lower bound", c.Lower, true, false},
		{"upper bound", c.Upper, true, true},
		{"fitted magnitude", c.FitMagnitude, true, true},
		{"fitted phase", c.FitPhaseDeg, true, false},
	}
	for _, part := range parts {
		if part.optional && part.xs == nil {
			continue
		}
		name := fmt.Sprintf("FRF curve %q %s", c.Name, part.what)
		if err := checkLen(name, part.xs, n); err != nil {
			return err
		}
		check := checkFinite
		if part.log {
			check = checkPositive
		}
		if err := check(name, part.xs); err != nil {
			return err
		}
	}
	return nil
}

// magnitudeRange returns the log-axis range that shows every magnitude,
// fitted magnitude and upper band bound from bin first on, with a margin.
// Lower band bounds are left out: where the error band reaches down to
// nothing it runs off the bottom of the axis instead of squeezing the
// curves into the top of the panel.
func magnitudeRange(curves []FRFCurve, first int) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, c := range curves {
		for _, xs := range [][]float64{c.Magnitude, c.Upper, c.FitMagnitude} {
			for _, x := range xs[min(first, len(xs)):] {
				if x > 0 {
					lo, hi = math.Min(lo, x), math.Max(hi, x)
				}
			}
		}
	}
	return lo / 1.4, hi * 1.4
}

// addFRFCurve adds a curve (band, measured, fitted) drawn with key k to
// the magnitude and phase panels; the glyphs mark the measured curves.
func addFRFCurve(mag, phase *plot.Plot, k curveKey, c FRFCurve, freqHz []float64, first int, logX bool) error {
	fail := func(err error) error { return fmt.Errorf("plots: FRF curve %q: %w", c.Name, err) }
	if c.Lower != nil {
		ring := make(plotter.XYs, 0, 2*len(freqHz))
		for j, f := range freqHz {
			ring = append(ring, plotter.XY{X: f, Y: c.Upper[first+j]})
		}
		for j := len(freqHz) - 1; j >= 0; j-- {
			ring = append(ring, plotter.XY{X: freqHz[j], Y: math.Max(c.Lower[first+j], mag.Y.Min)})
		}
		band, err := plotter.NewPolygon(ring)
		if err != nil {
			return fail(err)
		}
		band.Color = tint(seriesColor(k.color), 0x30)
		band.LineStyle.Width = 0
		mag.Add(band)
	}
	// Curves that share a colour spread their glyphs apart.
	g := seriesGlyph(k.glyph)
	g.Color = seriesColor(k.color)
	for _, part := range []struct {
		p  *plot.Plot
		ys []float64
	}{{mag, c.Magnitude}, {phase, c.PhaseDeg}} {
		if _, err := markedLine(part.p, xyOf(freqHz, part.ys[first:]), seriesLine(k.color), g, logX, k.glyph, len(glyphs)/2); err != nil {
			return fail(err)
		}
	}
	for _, fit := range []struct {
		p  *plot.Plot
		ys []float64
	}{{mag, c.FitMagnitude}, {phase, c.FitPhaseDeg}} {
		if fit.ys == nil {
			continue
		}
		l, err := plotter.NewLine(xyOf(freqHz, fit.ys[first:]))
		if err != nil {
			return fail(err)
		}
		l.LineStyle = fitLine(k.color)
		fit.p.Add(l)
	}
	return nil
}

// xyOf pairs xs with ys (of equal length).
func xyOf(xs, ys []float64) plotter.XYs {
	xy := make(plotter.XYs, len(xs))
	for i := range xs {
		xy[i] = plotter.XY{X: xs[i], Y: ys[i]}
	}
	return xy
}
