package plots

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"github.com/ridemodes/ridemodes/ingest"
)

// PNGDotsPerInch is the resolution of PNG figures. A figure of width w
// (in vg units, 1/72 inch) is w/72*PNGDotsPerInch pixels wide.
const PNGDotsPerInch = 120

// Figure is a drawn figure: one or more panels stacked in a column, their
// data areas aligned, ready to be encoded as PNG or SVG.
type Figure struct {
	panels        []*plot.Plot
	width, height vg.Length
}

// newFigure stacks panels in a column, each panel panelHeight high.
func newFigure(width, panelHeight vg.Length, panels ...*plot.Plot) *Figure {
	return &Figure{panels: panels, width: width, height: panelHeight * vg.Length(len(panels))}
}

// Size returns the width and height of the figure in vg units (1/72 inch).
func (f *Figure) Size() (width, height vg.Length) { return f.width, f.height }

// Encode renders the figure in format "png" or "svg".
func (f *Figure) Encode(format string) ([]byte, error) {
	var c vg.CanvasWriterTo
	switch format {
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(f.width, f.height), vgimg.UseDPI(PNGDotsPerInch))}
	case "svg":
		c = vgsvg.New(f.width, f.height)
	default:
		return nil, fmt.Errorf("plots: figure format %q is not supported: use png or svg", format)
	}
	dc := draw.New(c)
	if len(f.panels) == 1 {
		f.panels[0].Draw(dc)
	} else {
		rows := make([][]*plot.Plot, len(f.panels))
		for i, p := range f.panels {
			rows[i] = []*plot.Plot{p}
		}
		tiles := draw.Tiles{Rows: len(rows), Cols: 1, PadY: vg.Points(6), PadTop: vg.Points(2), PadBottom: vg.Points(2), PadLeft: vg.Points(2), PadRight: vg.Points(6)}
		canvases := plot.Align(rows, tiles, dc)
		for i, p := range f.panels {
			p.Draw(canvases[i][0])
		}
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("plots: encoding %s: %w", format, err)
	}
	return buf.Bytes(), nil
}

// Save writes the figure to path as PNG or SVG, chosen by the extension
// (.png or .svg, any case). The file is written to a temporary file in the
// same folder and renamed, so a failure leaves nothing behind.
func (f *Figure) Save(path string) error {
	format := strings.ToLower(strings.TrimPrefix(filepath.Ext(path), "."))
	b, err := f.Encode(format)
	if err != nil {
		return fmt.Errorf("plots: saving %s: %w", path, err)
	}
	return ingest.WriteFileAtomic(path, b)
}

// SeriesError reports a data problem in one series of a figure's input.
type SeriesError struct {
	// Series names the series, e.g. `FRF curve "body_front/pan_f" magnitude`.
	Series string
	// Index is the index of the bad value, or -1 when the problem is the
	// series as a whole (empty, wrong length).
	Index int
	// Value is the bad value when Index >= 0 and the value is a number.
	Value float64
	// Problem says what is wrong, the bad value included.
	Problem string
}

func (e *SeriesError) Error() string {
	if e.Index < 0 {
		return fmt.Sprintf("plots: %s: %s", e.Series, e.Problem)
	}
	return fmt.Sprintf("plots: %s: value %d %s", e.Series, e.Index, e.Problem)
}

// checkFinite returns a *SeriesError when xs is empty or holds NaN or Inf.
func checkFinite(name string, xs []float64) error {
	if len(xs) == 0 {
		return &SeriesError{Series: name, Index: -1, Problem: "has no data"}
	}
	for i, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return &SeriesError{Series: name, Index: i, Value: x, Problem: fmt.Sprintf("is %g, not a finite number", x)}
		}
	}
	return nil
}

// checkPositive is checkFinite that also refuses values <= 0, for log axes.
func checkPositive(name string, xs []float64) error {
	if err := checkFinite(name, xs); err != nil {
		return err
	}
	for i, x := range xs {
		if x <= 0 {
			return &SeriesError{Series: name, Index: i, Value: x, Problem: fmt.Sprintf("is %g, not positive as a log axis needs", x)}
		}
	}
	return nil
}

// checkLen returns a *SeriesError when xs does not have n values.
func checkLen(name string, xs []float64, n int) error {
	if len(xs) != n {
		return &SeriesError{Series: name, Index: -1, Problem: fmt.Sprintf("has %d values, want %d", len(xs), n)}
	}
	return nil
}

// checkIncreasing returns a *SeriesError when xs is not strictly increasing.
func checkIncreasing(name string, xs []float64) error {
	for i := 1; i < len(xs); i++ {
		if !(xs[i] > xs[i-1]) {
			return &SeriesError{Series: name, Index: i, Value: xs[i], Problem: fmt.Sprintf("(%g) does not increase on the one before", xs[i])}
		}
	}
	return nil
}

// checkFrequency checks a frequency grid: finite and strictly increasing.
// On a log axis it returns the index of the first bin above 0 Hz, where the
// figure starts.
func checkFrequency(name string, freqHz []float64, logScale bool) (first int, err error) {
	if err := checkFinite(name, freqHz); err != nil {
		return 0, err
	}
	if err := checkIncreasing(name, freqHz); err != nil {
		return 0, err
	}
	if !logScale {
		return 0, nil
	}
	for first < len(freqHz) && freqHz[first] <= 0 {
		first++
	}
	if first == len(freqHz) {
		return 0, &SeriesError{Series: name, Index: -1, Problem: "has no value above 0 Hz for a log axis"}
	}
	return first, nil
}

// The palette: colours of our own, told apart in grey too by the dash
// patterns that go with them.
var (
	inkDark  = color.NRGBA{R: 0x22, G: 0x2B, B: 0x33, A: 0xFF}
	inkFaint = color.NRGBA{R: 0x9A, G: 0xA3, B: 0xAB, A: 0xFF}
	palette  = []color.NRGBA{
		{R: 0x0B, G: 0x5F, B: 0x7A, A: 0xFF}, // harbour blue
		{R: 0xC2, G: 0x5A, B: 0x17, A: 0xFF}, // brick orange
		{R: 0x5E, G: 0x7D, B: 0x1E, A: 0xFF}, // moss
		{R: 0x8A, G: 0x2F, B: 0x6B, A: 0xFF}, // mulberry
		{R: 0x4F, G: 0x4A, B: 0x99, A: 0xFF}, // slate violet
		{R: 0x9C, G: 0x7A, B: 0x0E, A: 0xFF}, // ochre
	}
	dashes = [][]vg.Length{nil, {vg.Points(6), vg.Points(2)}, {vg.Points(2), vg.Points(2)}, {vg.Points(8), vg.Points(2), vg.Points(2), vg.Points(2)}}
	// fitDashes marks fitted and model curves.
	fitDashes = []vg.Length{vg.Points(4), vg.Points(3)}
)

// seriesColor returns the i-th palette colour.
func seriesColor(i int) color.NRGBA { return palette[i%len(palette)] }

// seriesLine returns the line style of the i-th measured series.
func seriesLine(i int) draw.LineStyle {
	return draw.LineStyle{Color: seriesColor(i), Width: vg.Points(1.4), Dashes: dashes[(i/len(palette)+i)%len(dashes)]}
}

// fitLine returns the line style of the fitted curve of the i-th series.
func fitLine(i int) draw.LineStyle {
	c := seriesColor(i)
	c.R, c.G, c.B = c.R/2, c.G/2, c.B/2
	return draw.LineStyle{Color: c, Width: vg.Points(1.2), Dashes: fitDashes}
}

// tint returns c with alpha a (0-255), for bands and shading.
func tint(c color.NRGBA, a uint8) color.NRGBA {
	c.A = a
	return c
}

// newPanel returns a plot with our fonts, grid and axis labels.
func newPanel(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font.Size = vg.Points(10)
		a.Tick.Label.Font.Size = vg.Points(9)
	}
	p.X.Tick.Marker = plainTicks
	p.Y.Tick.Marker = plainTicks
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(22)
	p.Legend.Padding = vg.Points(1)
	grid := plotter.NewGrid()
	grid.Vertical.Color = tint(inkFaint, 0x60)
	grid.Horizontal.Color = tint(inkFaint, 0x60)
	grid.Vertical.Width = vg.Points(0.4)
	grid.Horizontal.Width = vg.Points(0.4)
	p.Add(grid)
	return p
}

// plainTicks are the default linear ticks labelled in the shortest form
// ("2.5", not "2.50").
var plainTicks = plot.TickerFunc(func(min, max float64) []plot.Tick {
	ticks := plot.DefaultTicks{}.Ticks(min, max)
	for i, t := range ticks {
		if t.Label != "" {
			ticks[i].Label = strconv.FormatFloat(t.Value, 'g', 6, 64)
		}
	}
	return ticks
})

// setLog puts an axis on a log scale with ticks labelled at 1, 2 and 5
// times powers of ten, so that a span of less than a decade still reads.
func setLog(a *plot.Axis) {
	a.Scale = plot.LogScale{}
	a.Tick.Marker = plot.TickerFunc(func(min, max float64) []plot.Tick {
		// gonum's LogTicks starts at 10^int(log10 min), which truncates
		// toward zero: below 1 it would start at 1 and leave the lower
		// decades bare. Give it a start just under min's decade.
		start := min
		if min < 1 {
			start = math.Pow10(int(math.Floor(math.Log10(min)))) * (1 - 1e-9)
		}
		ticks := plot.LogTicks{Prec: -1}.Ticks(start, max)
		labelled := 0
		for _, t := range ticks {
			if t.Label != "" && t.Value >= min && t.Value <= max {
				labelled++
			}
		}
		if labelled >= 3 {
			return ticks
		}
		for i, t := range ticks {
			lead := t.Value / math.Pow10(int(math.Floor(math.Log10(t.Value)+1e-9)))
			if math.Abs(lead-2) < 1e-9 || math.Abs(lead-5) < 1e-9 {
				ticks[i].Label = strconv.FormatFloat(t.Value, 'g', 6, 64)
			}
		}
		return ticks
	})
}

// freqAxis labels the frequency axis of p, spans it over freqHz (sorted)
// and puts it on a log scale when logScale is true. A single frequency is
// widened to a span the scale can show.
func freqAxis(p *plot.Plot, freqHz []float64, logScale bool) {
	p.X.Label.Text = "frequency [Hz]"
	lo, hi := freqHz[0], freqHz[len(freqHz)-1]
	if logScale {
		setLog(&p.X)
		if lo == hi {
			lo, hi = lo/2, hi*2
		}
	} else if lo == hi {
		lo, hi = lo-0.5, hi+0.5
	}
	p.X.Min, p.X.Max = lo, hi
}

// Marker is a labelled frequency, drawn as a vertical line: an identified
// natural frequency, a peak of the mode indicator.
type Marker struct {
	// Label is shown beside the line, e.g. "bounce 1.14 Hz"; may be empty.
	Label string
	// FreqHz is where the line is drawn.
	FreqHz float64
}

// checkMarkers checks that every marker frequency is finite (and positive on
// a log frequency axis).
func checkMarkers(name string, ms []Marker, logScale bool) error {
	for i, m := range ms {
		if math.IsNaN(m.FreqHz) || math.IsInf(m.FreqHz, 0) || (logScale && m.FreqHz <= 0) {
			return &SeriesError{Series: fmt.Sprintf("%s %q", name, m.Label), Index: i, Value: m.FreqHz, Problem: fmt.Sprintf("(%g Hz) is not a frequency that the axis can show", m.FreqHz)}
		}
	}
	return nil
}

// vLines draws vertical lines across the whole data area at given abscissae,
// with labels stacked near the top so that close lines stay readable. It has
// no data range: it never widens an axis.
type vLines struct {
	marks      []Marker
	line       draw.LineStyle
	text       draw.TextStyle
	showLabels bool
}

// newVLines returns the vertical-marker plotter for ms.
func newVLines(ms []Marker, showLabels bool) *vLines {
	text := plot.New().Title.TextStyle
	text.Font.Size = vg.Points(8.5)
	text.Color = inkDark
	text.XAlign = draw.XLeft
	text.YAlign = draw.YTop
	return &vLines{
		marks:      ms,
		line:       draw.LineStyle{Color: inkDark, Width: vg.Points(0.8), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2.5)}},
		text:       text,
		showLabels: showLabels,
	}
}

// Plot implements plot.Plotter.
func (v *vLines) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	row := 0
	for _, m := range v.marks {
		if m.FreqHz < p.X.Min || m.FreqHz > p.X.Max {
			continue
		}
		x := trX(m.FreqHz)
		c.StrokeLine2(v.line, x, c.Min.Y, x, c.Max.Y)
		if v.showLabels && m.Label != "" {
			h := v.text.Height(m.Label)
			pt := vg.Point{X: x + vg.Points(2), Y: c.Max.Y - vg.Points(2) - vg.Length(row)*h}
			if pt.X+v.text.Width(m.Label) > c.Max.X {
				pt.X = x - vg.Points(2) - v.text.Width(m.Label)
			}
			c.FillText(v.text, pt, m.Label)
			row++
		}
	}
}

// xSpan shades the data area between two abscissae, full height, with a
// label at the top. Like vLines it never widens an axis.
type xSpan struct {
	from, to float64
	label    string
	fill     color.Color
	text     draw.TextStyle
}

// Plot implements plot.Plotter.
func (s *xSpan) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	x0, x1 := trX(math.Max(s.from, p.X.Min)), trX(math.Min(s.to, p.X.Max))
	if x1 <= x0 {
		return
	}
	c.FillPolygon(s.fill, []vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y}})
	edge := draw.LineStyle{Color: inkFaint, Width: vg.Points(0.6)}
	c.StrokeLine2(edge, x0, c.Min.Y, x0, c.Max.Y)
	c.StrokeLine2(edge, x1, c.Min.Y, x1, c.Max.Y)
	c.FillText(s.text, vg.Point{X: x0 + vg.Points(3), Y: c.Min.Y + vg.Points(3)}, s.label)
}
