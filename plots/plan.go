package plots

import (
	_ "embed"
	"errors"
	"fmt"
	"html/template"
	"io"
	"math"
	"sync"
	"text/tabwriter"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/plan"
)

// PlanData is the input of the plan figure: the ratio of the predicted sd
// to the wanted sd of each wanted value against the record length or the
// number of drops.
type PlanData struct {
	// XLabel names the abscissa with its unit; X is increasing and positive.
	XLabel string
	X      []float64
	// Series are the ratios, one value per X, positive.
	Series []Series
	// Chosen is the planned x, drawn as a labelled line.
	Chosen      float64
	ChosenLabel string
}

// Plan figure size, vg units (1/72 inch).
const (
	planWidth  = 7 * vg.Inch
	planHeight = 3.6 * vg.Inch
)

// PlanFigure draws each series against X on log axes, with the wanted sd
// (ratio 1) as a level and the planned x as a vertical line.
func PlanFigure(d PlanData) (*Figure, error) {
	if err := checkPositive("plan x", d.X); err != nil {
		return nil, err
	}
	if err := checkIncreasing("plan x", d.X); err != nil {
		return nil, err
	}
	p := newPanel("Predicted uncertainty", d.XLabel, "predicted sd / wanted sd")
	setLog(&p.X)
	setLog(&p.Y)
	for i, s := range d.Series {
		name := fmt.Sprintf("plan series %q", s.Name)
		if err := checkLen(name, s.Values, len(d.X)); err != nil {
			return nil, err
		}
		if err := checkPositive(name, s.Values); err != nil {
			return nil, err
		}
		l, err := plotter.NewLine(xyOf(d.X, s.Values))
		if err != nil {
			return nil, err
		}
		l.LineStyle = seriesLine(i)
		p.Add(l)
		p.Legend.Add(s.Name, l)
	}
	addLevel(p, "wanted", draw.LineStyle{Color: inkDark, Width: vg.Points(1.1), Dashes: levelDashes}, 1)
	if err := checkMarkers("plan choice", []Marker{{Label: d.ChosenLabel, FreqHz: d.Chosen}}, true); err != nil {
		return nil, err
	}
	p.Add(newVLines([]Marker{{Label: d.ChosenLabel, FreqHz: d.Chosen}}, true))
	p.Legend.Top, p.Legend.Left = false, true
	return newFigure(planWidth, []vg.Length{planHeight}, p), nil
}

// planData converts a plan's curve for the figure.
func planData(p *plan.Plan) PlanData {
	d := PlanData{XLabel: p.Curve.XLabel, X: p.Curve.X, Chosen: p.Curve.Chosen}
	for _, s := range p.Curve.Series {
		d.Series = append(d.Series, Series{Name: s.Name, Values: s.Ratio})
	}
	d.ChosenLabel = fmt.Sprintf("planned: %g s", p.DurationS)
	if p.Drops != nil {
		d.ChosenLabel = fmt.Sprintf("planned: %d drops", *p.Drops)
	}
	return d
}

// planLines returns the plan's test conditions, one line each.
func planLines(p *plan.Plan) []string {
	var ls []string
	if r := p.Rig; r != nil {
		ls = append(ls,
			fmt.Sprintf("record %g s at %g Hz; analyse with --segment-samples %d (or [analysis] segment_samples): %.4g Hz resolution after decimation to %g Hz, band %g-%g Hz",
				p.DurationS, p.SampleRateHz, r.SegmentSamples, r.ResolutionHz, r.DecimatedRateHz, r.BandLowHz, r.BandHighHz),
			fmt.Sprintf("drive: random, independent front and rear, flat acceleration %g-%g Hz at %.3g m/s^2 RMS per axle "+
				"(peaks about %.3g m/s^2, pan travel ±%.0f mm at 4 sd)", r.DriveLowHz, r.DriveHighHz, r.DriveRMSMPerS2,
				r.PanPeakAccelMPerS2, 1000*r.PanTravelM))
	}
	if d := p.Drop; d != nil {
		how := "both axles at once"
		if d.RearDelayS > 0 {
			how = fmt.Sprintf("rolled off, the rear axle %g s after the front (wheelbase / rolling speed)", d.RearDelayS)
		}
		ls = append(ls, fmt.Sprintf("%d drops of %.0f mm, %s; log each for %g s at %g Hz, %g s of rest before the release; "+
			"analyse them together (ridemodes analyze DROP1.csv DROP2.csv ... --test drop)", *p.Drops, 1000*d.HeightM, how,
			p.DurationS, p.SampleRateHz, d.PreTriggerS))
	}
	return append(ls, fmt.Sprintf("noise assumed: %.3g m/s^2 sd on every channel at %g Hz", p.NoiseSDMPerS2, p.SampleRateHz))
}

// sensorLines returns one line per sensor: given and planned position,
// then the sensor's warnings.
func sensorLines(p *plan.Plan) []string {
	var ls []string
	for _, s := range p.Sensors {
		given := "not in the setup"
		if s.GivenXM != nil {
			given = fmt.Sprintf("given %+.2f m", *s.GivenXM)
		}
		ls = append(ls, fmt.Sprintf("%s: %s, planned %+.2f m", s.Channel, given, s.XM))
	}
	if p.SensorsNote != "" {
		ls = append(ls, p.SensorsNote)
	}
	return ls
}

// unitSuffix is " unit", or nothing for a ratio ("1").
func unitSuffix(unit string) string {
	if unit == "1" || unit == "" {
		return ""
	}
	return " " + unit
}

// planSentence says in one sentence whether the plan meets what is wanted.
func planSentence(p *plan.Plan) string {
	worst := 0.0
	for _, c := range p.Checks {
		if c.Ratio != nil {
			worst = math.Max(worst, *c.Ratio)
		}
	}
	if p.Meets {
		return fmt.Sprintf("The plan is predicted to meet every wanted sd (worst ratio %.2f, planned under %.2f for a margin of %g).",
			worst, 1/p.Prediction.Margin, p.Prediction.Margin)
	}
	return fmt.Sprintf("Within the limits the plan cannot meet every wanted sd (worst ratio %.2f).", worst)
}

// WritePlan writes the plan for a terminal: the conditions, the sensors,
// the predicted sd beside the wanted, what the prediction rests on, the
// verification when there is one, and the warnings.
func WritePlan(w io.Writer, p *plan.Plan) {
	fmt.Fprintf(w, "Plan: %s test\n", p.Test)
	for _, l := range planLines(p) {
		fmt.Fprintf(w, "  %s\n", l)
	}
	fmt.Fprintf(w, "\nSensors (allowed span %+.2f to %+.2f m)\n", p.SensorSpanM[0], p.SensorSpanM[1])
	for _, l := range sensorLines(p) {
		fmt.Fprintf(w, "  %s\n", l)
	}
	fmt.Fprintln(w, "\nPredicted uncertainty (one sd) beside the wanted")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "value\tpredicted sd\twanted sd\tratio")
	for _, c := range p.Checks {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", c.Name, pm("%.4g"+unitSuffix(c.Unit), c.PredictedSD, nil),
			fmt.Sprintf("%.4g%s", c.WantedSD, unitSuffix(c.Unit)), pm("%.2f", c.Ratio, nil))
	}
	tw.Flush()
	fmt.Fprintf(w, "%s\n\nPrediction: %s\n", planSentence(p), p.Prediction.Method)
	if v := p.Verification; v != nil {
		fmt.Fprintf(w, "\nVerification: %d simulated tests of the plan through the real analysis (%d failed), achieved spread about the truth\n",
			v.Runs, v.Failed)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "value\tpredicted sd\tachieved sd\tachieved/predicted\twanted met\tstated sd (mean)")
		for _, q := range v.Quantities {
			met := "-"
			if q.Met != nil {
				met = map[bool]string{true: "yes", false: "NO"}[*q.Met]
			}
			u := unitSuffix(q.Unit)
			fmt.Fprintf(tw, "%s\t%.4g%s\t%.4g%s\t%.2f\t%s\t%s\n", q.Name, q.PredictedSD, u, q.AchievedSD, u, q.Ratio, met,
				pm("%.4g"+u, q.StatedSD, nil))
		}
		tw.Flush()
		fmt.Fprintf(w, "  pooled: achieved/predicted %.2f (RMS of error/predicted sd over runs and values)\n", v.RatioRMS)
	}
	warnings := p.Warnings
	for _, s := range p.Sensors {
		warnings = append(warnings, s.Warnings...)
	}
	if len(warnings) > 0 {
		fmt.Fprintln(w, "\nWarnings")
		for _, s := range warnings {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
	fmt.Fprintln(w, "\nA plan from the design model, not a measurement; see the safety notes in --help.")
}

// PlanReportFile is the name of the plan page inside its directory.
const PlanReportFile = "plan.html"

//go:embed plan.tmpl
var planSource string

// planTemplate is the plan page; it shares the run report's style.
var planTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(parseReport().New("plan").Parse(planSource))
})

// planView is what the plan template renders.
type planView struct {
	Title, Test, Sentence, Method, Cautions string
	Conditions, Sensors, Warnings           []string
	Checks                                  [][]string
	Verified                                [][]string
	VerifiedNote                            string
	Figures                                 []figureView
}

// WritePlanReport writes the plan page into dir: PlanReportFile (the
// cautions, whether the plan meets the wanted sd, the conditions, the
// sensors, the predicted sd beside the wanted, the verification and the
// figure of the predicted sd against the record length or the number of
// drops) and the figure as plan-curve.png, as WriteReport writes its
// files. It returns the paths written, the page last.
func WritePlanReport(dir string, p *plan.Plan) ([]string, error) {
	if p == nil {
		return nil, errors.New("plots: plan report: no plan")
	}
	v := planView{Title: "Test plan", Test: p.Test, Sentence: planSentence(p), Method: p.Prediction.Method,
		Cautions: compare.Cautions, Conditions: planLines(p), Sensors: sensorLines(p), Warnings: p.Warnings}
	for _, s := range p.Sensors {
		v.Warnings = append(v.Warnings, s.Warnings...)
	}
	for _, c := range p.Checks {
		u := unitSuffix(c.Unit)
		v.Checks = append(v.Checks, []string{c.Name, pm("%.4g"+u, c.PredictedSD, nil), fmt.Sprintf("%.4g%s", c.WantedSD, u),
			pm("%.2f", c.Ratio, nil)})
	}
	if vr := p.Verification; vr != nil {
		v.VerifiedNote = fmt.Sprintf("%d simulated tests of the plan through the real analysis (%d failed); pooled achieved/predicted %.2f.",
			vr.Runs, vr.Failed, vr.RatioRMS)
		for _, q := range vr.Quantities {
			met := noValue
			if q.Met != nil {
				met = map[bool]string{true: "yes", false: "no"}[*q.Met]
			}
			u := unitSuffix(q.Unit)
			v.Verified = append(v.Verified, []string{q.Name, fmt.Sprintf("%.4g%s", q.PredictedSD, u),
				fmt.Sprintf("%.4g%s", q.AchievedSD, u), fmt.Sprintf("%.2f", q.Ratio), met})
		}
	}
	var specs []figureSpec
	if len(p.Curve.X) > 0 {
		d, against := planData(p), "the record length"
		if p.Drops != nil {
			against = "the number of drops pooled"
		}
		specs = append(specs, figureSpec{"plan-curve.png", "Predicted uncertainty",
			"Predicted sd over the wanted sd of each wanted value against " + against +
				", log axes; dashed level: the wanted sd; dotted line: the plan.",
			func() (*Figure, error) { return PlanFigure(d) }})
	}
	return writePage(dir, specs, planTemplate(), &v, &v.Figures, PlanReportFile, "plan report")
}
