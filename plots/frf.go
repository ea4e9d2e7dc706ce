package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
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
	// Coherence, when given, is drawn in a third panel (values 0-1 on FreqHz).
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

// FRF figure size, vg units (1/72 inch).
const (
	frfWidth       = 7 * vg.Inch
	frfPanelHeight = 2.6 * vg.Inch
)

// FRFFigure draws magnitude (log axis) over phase, with coherence as a third
// panel when given, the panels' frequency axes aligned.
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
	// A body FRF starts near 1 and falls past the modes: the bottom left
	// is where the legend hides the least.
	mag.Legend.Top, mag.Legend.Left = false, true
	mag.Y.Min, mag.Y.Max = magnitudeRange(d.Curves, first)
	phase := newPanel("", "", "phase [deg]")
	panels := []*plot.Plot{mag, phase}
	for i, c := range d.Curves {
		if err := addFRFCurve(mag, phase, i, c, freqHz, first); err != nil {
			return nil, err
		}
	}
	if len(d.Coherence) > 0 {
		coh := newPanel("", "", "coherence [-]")
		coh.Y.Min, coh.Y.Max = 0, 1.02
		for i, s := range d.Coherence {
			l, err := plotter.NewLine(xyOf(freqHz, s.Values[first:]))
			if err != nil {
				return nil, fmt.Errorf("plots: coherence %q: %w", s.Name, err)
			}
			l.LineStyle = seriesLine(i)
			coh.Add(l)
			coh.Legend.Add(s.Name, l)
		}
		coh.Legend.Top = false
		panels = append(panels, coh)
	}
	for i, p := range panels {
		freqAxis(p, freqHz, d.LogFrequency)
		p.Add(newVLines(d.Markers, i == 0))
		if i < len(panels)-1 {
			p.X.Label.Text = ""
		}
	}
	return newFigure(frfWidth, frfPanelHeight, panels...), nil
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
// fitted magnitude and positive band bound from bin first on, with a margin.
func magnitudeRange(curves []FRFCurve, first int) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, c := range curves {
		for _, xs := range [][]float64{c.Magnitude, c.Upper, c.Lower, c.FitMagnitude} {
			for _, x := range xs[min(first, len(xs)):] {
				if x > 0 {
					lo, hi = math.Min(lo, x), math.Max(hi, x)
				}
			}
		}
	}
	return lo / 1.4, hi * 1.4
}

// addFRFCurve adds curve i (band, measured, fitted) to the magnitude and
// phase panels.
func addFRFCurve(mag, phase *plot.Plot, i int, c FRFCurve, freqHz []float64, first int) error {
	fail := func(err error) error { return fmt.Errorf("plots: FRF curve %q: %w", c.Name, err) }
	var thumbs []plot.Thumbnailer
	if c.Lower != nil {
		ring := make(plotter.XYs, 0, 2*len(freqHz))
		for k, f := range freqHz {
			ring = append(ring, plotter.XY{X: f, Y: c.Upper[first+k]})
		}
		for k := len(freqHz) - 1; k >= 0; k-- {
			ring = append(ring, plotter.XY{X: freqHz[k], Y: math.Max(c.Lower[first+k], mag.Y.Min)})
		}
		band, err := plotter.NewPolygon(ring)
		if err != nil {
			return fail(err)
		}
		band.Color = tint(seriesColor(i), 0x38)
		band.LineStyle.Width = 0
		mag.Add(band)
		thumbs = append(thumbs, band)
	}
	m, err := plotter.NewLine(xyOf(freqHz, c.Magnitude[first:]))
	if err != nil {
		return fail(err)
	}
	m.LineStyle = seriesLine(i)
	mag.Add(m)
	thumbs = append(thumbs, m)
	name := c.Name
	if c.Lower != nil {
		name += " (band: error estimate)"
	}
	mag.Legend.Add(name, thumbs...)
	ph, err := plotter.NewLine(xyOf(freqHz, c.PhaseDeg[first:]))
	if err != nil {
		return fail(err)
	}
	ph.LineStyle = seriesLine(i)
	phase.Add(ph)
	fitted := false
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
		l.LineStyle = fitLine(i)
		fit.p.Add(l)
		if !fitted {
			mag.Legend.Add(c.Name+", fitted model", l)
			fitted = true
		}
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
