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
	"gonum.org/v1/plot/text"
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
// data areas aligned, with each panel's legend in a column to the right of
// the data (never over it), ready to be encoded as PNG or SVG.
type Figure struct {
	panels []*plot.Plot
	// heights are the panels' heights; legends their legends, taken out of
	// the panels so that gonum/plot does not draw them over the data.
	heights []vg.Length
	legends []plot.Legend
	width   vg.Length
}

// newFigure stacks panels in a column, panel i heights[i] high, and moves
// each panel's legend to the column right of the data areas.
func newFigure(width vg.Length, heights []vg.Length, panels ...*plot.Plot) *Figure {
	if len(heights) != len(panels) {
		panic(fmt.Sprintf("plots: %d heights for %d panels", len(heights), len(panels)))
	}
	f := &Figure{panels: panels, heights: heights, width: width}
	for _, p := range panels {
		f.legends = append(f.legends, p.Legend)
		p.Legend = plot.NewLegend()
	}
	return f
}

// Size returns the width and height of the figure in vg units (1/72 inch).
func (f *Figure) Size() (width, height vg.Length) {
	for _, h := range f.heights {
		height += h
	}
	return f.width, height
}

// Figure layout, vg units: the gap between the data and the legend column,
// the space between stacked panels, and the figure's outer margin.
const (
	legendGap  = 10
	panelGap   = 6
	edgeMargin = 4
)

// figureLayout is where the parts of a figure go on a canvas: each panel's
// canvas (cut so that all data areas share their left and right edges) and
// each legend's box in the column right of the data areas (empty for a
// panel without a legend).
type figureLayout struct {
	panels  []draw.Canvas
	data    []vg.Rectangle
	legends []vg.Rectangle
}

// legendSize is the width and height of a legend's entries.
func legendSize(l *plot.Legend) (width, height vg.Length) {
	s := l.Rectangle(draw.Canvas{}).Size()
	return s.X, s.Y
}

// layout places the panels and legends of f on c, as plot.Align does for a
// column of plots, with room for the widest legend on the right.
func (f *Figure) layout(c draw.Canvas) figureLayout {
	var legendW vg.Length
	for i := range f.legends {
		if w, _ := legendSize(&f.legends[i]); w > 0 {
			legendW = max(legendW, w+legendGap)
		}
	}
	inner := draw.Crop(c, edgeMargin, -edgeMargin-legendW, edgeMargin, -edgeMargin)
	l := figureLayout{}
	top := inner.Max.Y
	_, total := f.Size()
	scale := (inner.Max.Y - inner.Min.Y) / total
	var left, right vg.Length
	for i, p := range f.panels {
		h := f.heights[i] * scale
		pc := inner
		pc.Max.Y, pc.Min.Y = top, top-h
		if i > 0 {
			pc.Max.Y -= panelGap / 2
		}
		if i < len(f.panels)-1 {
			pc.Min.Y += panelGap / 2
		}
		top -= h
		dc := p.DataCanvas(pc)
		left = max(left, dc.Min.X-pc.Min.X)
		right = max(right, pc.Max.X-dc.Max.X)
		l.panels = append(l.panels, pc)
	}
	for i, p := range f.panels {
		pc := &l.panels[i]
		dc := p.DataCanvas(*pc)
		pc.Min.X += left - (dc.Min.X - pc.Min.X)
		pc.Max.X -= right - (pc.Max.X - dc.Max.X)
		data := p.DataCanvas(*pc).Rectangle
		l.data = append(l.data, data)
		var box vg.Rectangle
		if w, h := legendSize(&f.legends[i]); w > 0 {
			box.Min = vg.Point{X: data.Max.X + legendGap, Y: data.Max.Y - h}
			box.Max = vg.Point{X: box.Min.X + w, Y: data.Max.Y}
		}
		l.legends = append(l.legends, box)
	}
	return l
}

// Encode renders the figure in format "png" or "svg".
func (f *Figure) Encode(format string) ([]byte, error) {
	w, h := f.Size()
	var c vg.CanvasWriterTo
	switch format {
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(PNGDotsPerInch))}
	case "svg":
		c = vgsvg.New(w, h)
	default:
		return nil, fmt.Errorf("plots: figure format %q is not supported: use png or svg", format)
	}
	dc := draw.New(c)
	l := f.layout(dc)
	for i, p := range f.panels {
		p.Draw(l.panels[i])
		if l.legends[i].Size().X > 0 {
			leg := f.legends[i]
			leg.Top, leg.Left = true, true
			leg.Draw(draw.Canvas{Canvas: dc.Canvas, Rectangle: l.legends[i]})
		}
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("plots: encoding %s: %w", format, err)
	}
	b := buf.Bytes()
	if format == "svg" {
		// Name fallbacks for the figures' font: Liberation Sans has the
		// metrics of Arial, so the text keeps the width it was laid out
		// with where Liberation is not installed.
		b = bytes.ReplaceAll(b, []byte("font-family:"+figureFontFamily+";"), []byte("font-family:'"+figureFontFamily+"',Arial,Helvetica,sans-serif;"))
	}
	return b, nil
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

// The figures' colours are those of Okabe and Ito's palette for readers
// with any common colour vision, blue first and yellow (weak on white)
// last; each series also has a glyph of its own, so that a print in grey
// still tells the series apart.
//
// Reference: M. Okabe and K. Ito, "Color Universal Design (CUD): how to make
// figures and presentations that are friendly to colorblind people", J*Fly,
// 2008 (the palette's eight colours).
var (
	inkDark  = color.NRGBA{R: 0x00, G: 0x00, B: 0x00, A: 0xFF}
	inkFaint = color.NRGBA{R: 0x99, G: 0x99, B: 0x99, A: 0xFF}
	palette  = []color.NRGBA{
		{R: 0x00, G: 0x72, B: 0xB2, A: 0xFF}, // blue
		{R: 0xD5, G: 0x5E, B: 0x00, A: 0xFF}, // vermillion
		{R: 0x00, G: 0x9E, B: 0x73, A: 0xFF}, // bluish green
		{R: 0xCC, G: 0x79, B: 0xA7, A: 0xFF}, // reddish purple
		{R: 0xE6, G: 0x9F, B: 0x00, A: 0xFF}, // orange
		{R: 0x56, G: 0xB4, B: 0xE9, A: 0xFF}, // sky blue
		{R: 0x00, G: 0x00, B: 0x00, A: 0xFF}, // black
		{R: 0xF0, G: 0xE4, B: 0x42, A: 0xFF}, // yellow
	}
	// glyphs mark the series in the order of the palette: filled shapes
	// first, then open ones and strokes.
	glyphs = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, diamondGlyph{},
		draw.RingGlyph{}, draw.CrossGlyph{}, draw.SquareGlyph{}, draw.PlusGlyph{}}
	// fitDashes marks fitted and model curves, in the colour of their data.
	fitDashes = []vg.Length{vg.Points(5), vg.Points(2.5)}
	// levelDashes marks limits and design values.
	levelDashes = []vg.Length{vg.Points(2), vg.Points(2)}
)

// figureFontFamily is the family of the figures' text, matched by the
// reports' style sheet.
const figureFontFamily = "Liberation Sans"

// seriesColor returns the i-th palette colour.
func seriesColor(i int) color.NRGBA { return palette[i%len(palette)] }

// seriesLine returns the line style of the i-th measured series: solid,
// slightly transparent so that a dashed fit over it stays visible.
func seriesLine(i int) draw.LineStyle {
	return draw.LineStyle{Color: tint(seriesColor(i), 0xC8), Width: vg.Points(1.3)}
}

// seriesGlyph returns the glyph style of the i-th series.
func seriesGlyph(i int) draw.GlyphStyle {
	return draw.GlyphStyle{Color: seriesColor(i), Radius: vg.Points(2.8), Shape: glyphs[i%len(glyphs)]}
}

// fitLine returns the line style of the fitted curve of the i-th series: its
// colour, dashed.
func fitLine(i int) draw.LineStyle {
	return draw.LineStyle{Color: seriesColor(i), Width: vg.Points(1.5), Dashes: fitDashes}
}

// tint returns c with alpha a (0-255), for bands and shading.
func tint(c color.NRGBA, a uint8) color.NRGBA {
	c.A = a
	return c
}

// textStyle is the figures' text style at size points in colour c.
func textStyle(size float64, c color.Color) text.Style {
	sty := plot.New().Title.TextStyle
	sty.Font.Variant = "Sans"
	sty.Font.Size = vg.Points(size)
	sty.Color = c
	return sty
}

// newPanel returns a plot with our fonts, grid and axis labels.
func newPanel(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Variant = "Sans"
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font.Variant = "Sans"
		a.Label.TextStyle.Font.Size = vg.Points(10)
		a.Tick.Label.Font.Variant = "Sans"
		a.Tick.Label.Font.Size = vg.Points(9)
	}
	p.X.Tick.Marker = plainTicks
	p.Y.Tick.Marker = plainTicks
	p.Legend.TextStyle.Font.Variant = "Sans"
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Legend.ThumbnailWidth = vg.Points(24)
	p.Legend.Padding = vg.Points(2)
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

// logTicks marks every whole multiple 1-9 of each power of ten on a log
// axis and labels as many of them as the span allows: 1, 2, 3, 4 and 5
// times a power of ten over up to 1.3 decades (0.5, 1, 2, 3, 4 Hz on the
// usual 0.5-4 Hz band), 1, 2 and 5 up to 3 decades, powers of ten beyond.
// A span with fewer than two marks falls back to linear ticks.
var logTicks = plot.TickerFunc(func(min, max float64) []plot.Tick {
	span := math.Log10(max / min)
	labelled := map[int]bool{1: true}
	switch {
	case span <= 1.3:
		labelled = map[int]bool{1: true, 2: true, 3: true, 4: true, 5: true}
	case span <= 3:
		labelled = map[int]bool{1: true, 2: true, 5: true}
	}
	var ticks []plot.Tick
	labels := 0
	for e := int(math.Floor(math.Log10(min))); e <= int(math.Ceil(math.Log10(max))); e++ {
		for m := 1; m <= 9; m++ {
			v := float64(m) * math.Pow10(e)
			if e < 0 {
				v = float64(m) / math.Pow10(-e) // 3/10 is 0.3 exactly as printed, 3*0.1 is not
			}
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if labelled[m] {
				t.Label = strconv.FormatFloat(v, 'g', 6, 64)
				labels++
			}
			ticks = append(ticks, t)
		}
	}
	if labels < 2 {
		return plainTicks.Ticks(min, max)
	}
	return ticks
})

// setLog puts an axis on a log scale with logTicks.
func setLog(a *plot.Axis) {
	a.Scale = plot.LogScale{}
	a.Tick.Marker = logTicks
}

// phaseTicks label a phase axis every 90 degrees, with unlabelled ticks
// every 45; a span of over 900 degrees is labelled every 180.
var phaseTicks = plot.TickerFunc(func(min, max float64) []plot.Tick {
	step := 90.0
	if max-min > 900 {
		step = 180
	}
	var ticks []plot.Tick
	for v := math.Ceil(min/(step/2)) * step / 2; v <= max+1e-9; v += step / 2 {
		t := plot.Tick{Value: v}
		if math.Mod(math.Abs(v), step) < 1e-9 {
			t.Label = strconv.FormatFloat(v, 'f', 0, 64)
		}
		ticks = append(ticks, t)
	}
	return ticks
})

// phaseAxis puts the phase axis of p on whole multiples of 90 degrees that
// enclose the data range lo..hi, ticked by phaseTicks.
func phaseAxis(p *plot.Plot, lo, hi float64) {
	p.Y.Min, p.Y.Max = math.Floor(lo/90)*90, math.Ceil(hi/90)*90
	if p.Y.Max-p.Y.Min < 180 {
		p.Y.Max = p.Y.Min + 180
	}
	p.Y.Tick.Marker = phaseTicks
}

// logHeadroom returns the top of a log axis whose data reach up to hi from
// lo, with the top frac of the axis left free for labels.
func logHeadroom(lo, hi, frac float64) float64 {
	return hi * math.Pow(hi/lo, frac/(1-frac))
}

// markedLine draws xy as a line in style ls with a glyph of style gs at
// markerCount points evenly spaced along the x axis (on a log scale when
// logX), offset by the series' place k of n so that the glyphs of
// neighbouring series do not sit on each other. It returns the thumbnails
// of a legend entry for it.
func markedLine(p *plot.Plot, xy plotter.XYs, ls draw.LineStyle, gs draw.GlyphStyle, logX bool, k, n int) ([]plot.Thumbnailer, error) {
	l, err := plotter.NewLine(xy)
	if err != nil {
		return nil, err
	}
	l.LineStyle = ls
	pos := func(x float64) float64 { return x }
	if logX {
		pos = math.Log
	}
	lo, hi := pos(xy[0].X), pos(xy[len(xy)-1].X)
	var marks plotter.XYs
	j := 0
	for m := range markerCount {
		target := lo + (hi-lo)*(float64(m)+(float64(k)+0.5)/float64(max(n, 1)))/markerCount
		for j < len(xy)-1 && pos(xy[j+1].X) <= target {
			j++
		}
		if len(marks) == 0 || marks[len(marks)-1] != xy[j] {
			marks = append(marks, xy[j])
		}
	}
	sc, err := plotter.NewScatter(marks)
	if err != nil {
		return nil, err
	}
	sc.GlyphStyle = gs
	p.Add(l, sc)
	return []plot.Thumbnailer{l, sc}, nil
}

// markerCount is how many glyphs mark a curve.
const markerCount = 9

// freqAxis labels the frequency axis of p, spans it over freqHz (sorted)
// and puts it on a log scale when logScale is true, its ends rounded out to
// whole multiples of a power of ten (0.586-3.98 Hz is shown as 0.5-4 Hz). A single frequency is
// widened to a span the scale can show.
func freqAxis(p *plot.Plot, freqHz []float64, logScale bool) {
	p.X.Label.Text = "frequency [Hz]"
	lo, hi := freqHz[0], freqHz[len(freqHz)-1]
	if logScale {
		setLog(&p.X)
		if lo == hi {
			lo, hi = lo/2, hi*2
		}
		lo, hi = roundLog(lo, false), roundLog(hi, true)
	} else if lo == hi {
		lo, hi = lo-0.5, hi+0.5
	}
	p.X.Min, p.X.Max = lo, hi
}

// roundLog rounds x > 0 out to a whole multiple of the power of ten below
// it: down when up is false, else up.
func roundLog(x float64, up bool) float64 {
	e := int(math.Floor(math.Log10(x)))
	m := x / math.Pow10(e)
	if up {
		m = math.Ceil(m - 1e-9)
	} else {
		m = math.Floor(m + 1e-9)
	}
	if e < 0 {
		return m / math.Pow10(-e)
	}
	return m * math.Pow10(e)
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

// vLines draws vertical lines across the whole data area at given
// abscissae. With labels, each is written at the top of the data area
// beside its line, on a white ground, moved down a row when it would meet
// the label before it: the panel keeps that top band free of data (see
// labelBand). It has no data range: it never widens an axis.
type vLines struct {
	marks      []Marker
	line       draw.LineStyle
	text       draw.TextStyle
	showLabels bool
}

// labelBand is the fraction of a panel's height, at the top, that is kept
// free of data for the labels of vLines.
const labelBand = 0.2

// newVLines returns the vertical-marker plotter for ms.
func newVLines(ms []Marker, showLabels bool) *vLines {
	text := textStyle(8.5, inkDark)
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
	var placed []vg.Rectangle
	for _, m := range v.marks {
		if m.FreqHz < p.X.Min || m.FreqHz > p.X.Max {
			continue
		}
		x := trX(m.FreqHz)
		c.StrokeLine2(v.line, x, c.Min.Y, x, c.Max.Y)
		if !v.showLabels || m.Label == "" {
			continue
		}
		w, h := v.text.Width(m.Label), v.text.Height(m.Label)
		box := vg.Rectangle{Min: vg.Point{X: x + vg.Points(2), Y: c.Max.Y - vg.Points(2) - h}}
		if box.Min.X+w > c.Max.X {
			box.Min.X = x - vg.Points(2) - w
		}
		box.Max = vg.Point{X: box.Min.X + w, Y: box.Min.Y + h}
		for overlaps(box, placed) {
			box.Min.Y -= h
			box.Max.Y -= h
		}
		placed = append(placed, box)
		c.FillPolygon(color.White, []vg.Point{box.Min, {X: box.Max.X, Y: box.Min.Y}, box.Max, {X: box.Min.X, Y: box.Max.Y}})
		c.FillText(v.text, vg.Point{X: box.Min.X, Y: box.Max.Y}, m.Label)
	}
}

// overlaps reports whether r meets any of rs.
func overlaps(r vg.Rectangle, rs []vg.Rectangle) bool {
	for _, o := range rs {
		if r.Min.X < o.Max.X && o.Min.X < r.Max.X && r.Min.Y < o.Max.Y && o.Min.Y < r.Max.Y {
			return true
		}
	}
	return false
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
	edge := draw.LineStyle{Color: inkFaint, Width: vg.Points(0.8), Dashes: levelDashes}
	c.StrokeLine2(edge, x0, c.Min.Y, x0, c.Max.Y)
	c.StrokeLine2(edge, x1, c.Min.Y, x1, c.Max.Y)
	c.FillText(s.text, vg.Point{X: x0 + vg.Points(3), Y: c.Max.Y - vg.Points(3)}, s.label)
}

// thumb is a legend thumbnail drawn by a function.
type thumb func(c *draw.Canvas)

// Thumbnail implements plot.Thumbnailer.
func (t thumb) Thumbnail(c *draw.Canvas) { t(c) }

// legendLine is a legend thumbnail of a line in style ls.
func legendLine(ls draw.LineStyle) plot.Thumbnailer {
	return thumb(func(c *draw.Canvas) {
		y := c.Center().Y
		c.StrokeLine2(ls, c.Min.X, y, c.Max.X, y)
	})
}

// legendGlyph is a legend thumbnail of one glyph in style gs.
func legendGlyph(gs draw.GlyphStyle) plot.Thumbnailer {
	return thumb(func(c *draw.Canvas) { c.DrawGlyph(gs, c.Center()) })
}

// legendFill is a legend thumbnail of an area filled with col.
func legendFill(col color.Color) plot.Thumbnailer {
	return thumb(func(c *draw.Canvas) {
		r := c.Rectangle
		r.Min.Y, r.Max.Y = c.Center().Y-vg.Points(3.5), c.Center().Y+vg.Points(3.5)
		c.FillPolygon(col, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
	})
}
