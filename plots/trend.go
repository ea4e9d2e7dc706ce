package plots

import (
	"fmt"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// TrendData is the input of a trend figure: one quantity over a campaign's
// runs, in time order, with the limits of its individuals (X) and
// moving-range (MR) control charts.
type TrendData struct {
	// Name is the quantity ("pitch frequency"); Unit its unit as printed
	// ("Hz"; empty for a ratio).
	Name, Unit string
	// Runs name the runs on the run axis, one per value.
	Runs []string
	// Values are the measured values; SD their standard deviations (NaN:
	// unknown, no bar); Design the design values (NaN: none). Named marks
	// the runs that the drift check names. SD, Design and Named have the
	// length of Values.
	Values, SD, Design []float64
	Named              []bool
	// Limits is false when there are too few runs for a chart; the other
	// fields are then ignored.
	Limits bool
	// Center, Lower, Upper are the X chart's centre line and limits.
	Center, Lower, Upper float64
	// MR are the moving ranges |x[i+1] - x[i]|; MeanMR and UpperMR the MR
	// chart's centre line and upper limit.
	MR              []float64
	MeanMR, UpperMR float64
}

// Trend figure size, vg units: the X panel, and the MR panel under it.
const (
	trendWidth       = 7.5 * vg.Inch
	trendPanelHeight = 2.6 * vg.Inch
)

// errorPoints are values with symmetric bars of ± 2 sd (none for an
// unknown sd), for plotter.YErrorBars.
type errorPoints struct{ x, y, sd []float64 }

func (e errorPoints) Len() int                    { return len(e.x) }
func (e errorPoints) XY(i int) (float64, float64) { return e.x[i], e.y[i] }
func (e errorPoints) YError(i int) (float64, float64) {
	if math.IsNaN(e.sd[i]) {
		return 0, 0
	}
	return 2 * e.sd[i], 2 * e.sd[i]
}

// TrendFigure draws a quantity over the runs: the values with ± 2 sd bars,
// the design value, the runs the drift check names (ringed) and, when
// d.Limits, the X chart's centre line and limits in the upper panel and the
// moving-range chart in the lower one.
func TrendFigure(d TrendData) (*Figure, error) {
	name := "trend " + d.Name
	if err := checkFinite(name+" values", d.Values); err != nil {
		return nil, err
	}
	n := len(d.Values)
	for _, l := range []struct {
		what string
		n    int
	}{{"runs", len(d.Runs)}, {"sd", len(d.SD)}, {"design", len(d.Design)}, {"named", len(d.Named)}} {
		if l.n != n {
			return nil, &SeriesError{Series: name + " " + l.what, Index: -1, Problem: fmt.Sprintf("has %d values, want %d", l.n, n)}
		}
	}
	if d.Limits {
		if err := checkLen(name+" moving ranges", d.MR, n-1); err != nil {
			return nil, err
		}
		if err := checkFinite(name+" limits", append([]float64{d.Center, d.Lower, d.Upper, d.MeanMR, d.UpperMR}, d.MR...)); err != nil {
			return nil, err
		}
	}
	unit := ""
	if d.Unit != "" {
		unit = " [" + d.Unit + "]"
	}
	x := make([]float64, n)
	for i := range x {
		x[i] = float64(i + 1)
	}
	p := newPanel(d.Name+": individuals", "run", d.Name+unit)
	runAxis(p, d.Runs)
	if d.Limits {
		limit := draw.LineStyle{Color: seriesColor(1), Width: vg.Points(1.1), Dashes: fitDashes}
		addLevel(p, "mean "+trendNum(d.Center), draw.LineStyle{Color: inkDark, Width: vg.Points(0.8)}, d.Center)
		addLevel(p, "limits "+trendNum(d.Lower)+", "+trendNum(d.Upper), limit, d.Lower, d.Upper)
	}
	if err := addDesign(p, d.Design); err != nil {
		return nil, err
	}
	bars, err := plotter.NewYErrorBars(errorPoints{x, d.Values, d.SD})
	if err != nil {
		return nil, err
	}
	bars.LineStyle = draw.LineStyle{Color: seriesColor(0), Width: vg.Points(1)}
	pts, err := plotter.NewScatter(xyOf(x, d.Values))
	if err != nil {
		return nil, err
	}
	pts.GlyphStyle = draw.GlyphStyle{Color: seriesColor(0), Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
	p.Add(bars, pts)
	p.Legend.Add("measured ± 2 sd", pts)
	var named plotter.XYs
	for i, v := range d.Values {
		if d.Named[i] {
			named = append(named, plotter.XY{X: x[i], Y: v})
		}
	}
	if len(named) > 0 {
		ring, err := plotter.NewScatter(named)
		if err != nil {
			return nil, err
		}
		ring.GlyphStyle = draw.GlyphStyle{Color: inkDark, Radius: vg.Points(5.5), Shape: draw.RingGlyph{}}
		p.Add(ring)
		p.Legend.Add("named by the drift check", ring)
	}
	headroom(p)
	if !d.Limits {
		return newFigure(trendWidth, []vg.Length{trendPanelHeight}, p), nil
	}
	mr := newPanel(d.Name+": moving range", "run", "moving range"+unit)
	runAxis(mr, d.Runs)
	addLevel(mr, "mean "+trendNum(d.MeanMR), draw.LineStyle{Color: inkDark, Width: vg.Points(0.8)}, d.MeanMR)
	addLevel(mr, "upper limit "+trendNum(d.UpperMR), draw.LineStyle{Color: seriesColor(1), Width: vg.Points(1.1), Dashes: fitDashes}, d.UpperMR)
	line, err := plotter.NewLine(xyOf(x[1:], d.MR))
	if err != nil {
		return nil, err
	}
	line.LineStyle = seriesLine(0)
	mrPts, err := plotter.NewScatter(xyOf(x[1:], d.MR))
	if err != nil {
		return nil, err
	}
	mrPts.GlyphStyle = draw.GlyphStyle{Color: seriesColor(0), Radius: vg.Points(2.6), Shape: draw.BoxGlyph{}}
	mr.Add(line, mrPts)
	mr.Legend.Add("|change from the run before|", line, mrPts)
	mr.Y.Min = 0
	headroom(mr)
	return newFigure(trendWidth, []vg.Length{trendPanelHeight, trendPanelHeight}, p, mr), nil
}

// trendNum prints a limit with 4 significant digits, never in exponent
// form (42150, 1.443, 0.05097).
func trendNum(x float64) string {
	decimals := 0
	if x != 0 {
		decimals = max(0, 3-int(math.Floor(math.Log10(math.Abs(x)))))
	}
	return strconv.FormatFloat(x, 'f', decimals, 64)
}

// runAxis spans the x axis of p over runs 1..n, labelled with the run
// names (every k-th when there are many).
func runAxis(p *plot.Plot, runs []string) {
	p.X.Min, p.X.Max = 0.5, float64(len(runs))+0.5
	step := max(1, (len(runs)+19)/20)
	p.X.Tick.Marker = plot.TickerFunc(func(min, max float64) []plot.Tick {
		var ticks []plot.Tick
		for i, r := range runs {
			t := plot.Tick{Value: float64(i + 1)}
			if i%step == 0 {
				t.Label = r
			}
			ticks = append(ticks, t)
		}
		return ticks
	})
}

// level is a horizontal line across the whole data area at each of ys: a
// centre line or control limits, named in the legend. Its data range holds
// ys only, so the axis always shows them.
type level struct {
	ys   []float64
	line draw.LineStyle
}

// addLevel adds horizontal lines at ys to p and names them in its legend.
func addLevel(p *plot.Plot, label string, style draw.LineStyle, ys ...float64) {
	p.Add(&level{ys: ys, line: style})
	p.Legend.Add(label, legendLine(style))
}

// Plot implements plot.Plotter.
func (l *level) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	for _, y := range l.ys {
		c.StrokeLine2(l.line, c.Min.X, trY(y), c.Max.X, trY(y))
	}
}

// DataRange implements plot.DataRanger: y only, no x range.
func (l *level) DataRange() (xmin, xmax, ymin, ymax float64) {
	return math.Inf(1), math.Inf(-1), slices.Min(l.ys), slices.Max(l.ys)
}

// headroom raises the top of p's y axis by a twelfth of its span, so that
// the highest point and its bar stay clear of the frame.
func headroom(p *plot.Plot) {
	span := p.Y.Max - p.Y.Min
	if span <= 0 {
		span = math.Max(math.Abs(p.Y.Max), 1) * 0.1
		p.Y.Min -= span / 2
	}
	p.Y.Max += span / 12
}

// addDesign draws the design values as a step line, each run's value
// across its slot (a campaign may change its design); runs without one
// leave a gap.
func addDesign(p *plot.Plot, design []float64) error {
	style := draw.LineStyle{Color: seriesColor(2), Width: vg.Points(1.4), Dashes: levelDashes}
	var seg plotter.XYs
	added := false
	flush := func() error {
		if len(seg) == 0 {
			return nil
		}
		l, err := plotter.NewLine(seg)
		if err != nil {
			return err
		}
		l.LineStyle = style
		p.Add(l)
		if !added {
			p.Legend.Add("design", l)
			added = true
		}
		seg = nil
		return nil
	}
	for i, v := range design {
		if math.IsNaN(v) {
			if err := flush(); err != nil {
				return err
			}
			continue
		}
		seg = append(seg, plotter.XY{X: float64(i) + 0.5, Y: v}, plotter.XY{X: float64(i) + 1.5, Y: v})
	}
	return flush()
}
