package plots

import (
	"bytes"
	_ "embed"
	"encoding/base64"
	"errors"
	"fmt"
	"html/template"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// ReportFile is the name of the report inside the report directory.
const ReportFile = "report.html"

// ReportInput is what a report shows. Any figure input may be nil (a drop
// test has no FRF); the figures given are drawn, embedded in the report and
// also written as PNG files of their own.
type ReportInput struct {
	// Title heads the report; empty gives "Ride mode report".
	Title string
	// Vehicle names the car under test; may be empty.
	Vehicle string
	// Result is the analysis result; required.
	Result *compare.Result
	// The figure inputs; each may be nil.
	FRF           *FRFData
	Indicator     *IndicatorData
	Stabilisation *StabData
	Shapes        *ShapeData
	Decay         *DecayData
	// Choices are the analysis choices made (band, resolution, window,
	// model orders), one sentence each, shown under the method.
	Choices []string
}

//go:embed report.tmpl
var reportSource string

// reportTemplate is the report page: XHTML-compatible HTML, CSS inline.
var reportTemplate = template.Must(template.New("report").Parse(reportSource))

// figureSpec names one figure of the report and draws it when its input is
// present.
type figureSpec struct {
	file, title, caption string
	draw                 func() (*Figure, error)
}

// reportFigures lists the figures of in whose inputs are present, in the
// order of the report.
func reportFigures(in ReportInput) []figureSpec {
	var specs []figureSpec
	if in.FRF != nil {
		specs = append(specs, figureSpec{"frf.png", "Frequency response",
			"Magnitude and phase of each output/input pair; shaded band: error estimate; dashed: fitted model; dotted lines: identified natural frequencies.",
			func() (*Figure, error) { return FRFFigure(*in.FRF) }})
	}
	if in.Indicator != nil {
		specs = append(specs, figureSpec{"mode-indicator.png", "Mode indicator",
			"Singular values of the FRF matrix against frequency; rings: picked peaks.",
			func() (*Figure, error) { return IndicatorFigure(*in.Indicator) }})
	}
	if in.Stabilisation != nil {
		specs = append(specs, figureSpec{"stabilisation.png", "Stabilisation",
			"Poles found at each model order, by status, over the mode indicator scaled to the order span.",
			func() (*Figure, error) { return StabFigure(*in.Stabilisation) }})
	}
	if in.Shapes != nil {
		specs = append(specs, figureSpec{"mode-shapes.png", "Mode shapes",
			"Side view, front to the right: body line at rest from rear to front axle, and the deflected line w(s) = z - s*theta with z = 1, scaled to a largest |w| of 1 over the wheelbase.",
			func() (*Figure, error) { return ShapeFigure(*in.Shapes) }})
	}
	if in.Decay != nil {
		specs = append(specs, figureSpec{"time-history.png", "Time history",
			"Measured vertical accelerations against time; dashed: fitted free decay; shaded: fit window.",
			func() (*Figure, error) { return DecayFigure(*in.Decay) }})
	}
	return specs
}

// WriteReport draws the figures of in, writes each as a PNG file into dir
// (created when missing) and then writes ReportFile there with the figures
// embedded. It returns the paths written, figures first, the report last.
// Every file goes through a temporary file in dir and a rename; when any
// step fails, the files of this call are removed and nothing is left
// behind.
func WriteReport(dir string, in ReportInput) (written []string, err error) {
	if in.Result == nil {
		return nil, errors.New("plots: report: no result to report")
	}
	specs := reportFigures(in)
	view := newReportView(in)
	pngs, figures, err := drawFigures(specs)
	if err != nil {
		return nil, err
	}
	view.Figures = figures
	var page bytes.Buffer
	if err := reportTemplate.Execute(&page, view); err != nil {
		return nil, fmt.Errorf("plots: report: %w", err)
	}
	return writeReportFiles(dir, specs, pngs, ReportFile, page.Bytes())
}

// drawFigures draws specs and encodes each as PNG, with its view for a
// page (numbered from 1, embedded as a data URL).
func drawFigures(specs []figureSpec) (pngs [][]byte, views []figureView, err error) {
	pngs = make([][]byte, len(specs))
	for i, spec := range specs {
		fig, err := spec.draw()
		if err != nil {
			return nil, nil, fmt.Errorf("plots: report: %s figure: %w", strings.ToLower(spec.title), err)
		}
		if pngs[i], err = fig.Encode("png"); err != nil {
			return nil, nil, fmt.Errorf("plots: report: %s figure: %w", strings.ToLower(spec.title), err)
		}
		views = append(views, figureView{
			Number:  i + 1,
			Title:   spec.title,
			Caption: spec.caption,
			File:    spec.file,
			// The data URL is built here from our own PNG bytes, never
			// from user text.
			Source: template.URL("data:image/png;base64," + base64.StdEncoding.EncodeToString(pngs[i])),
		})
	}
	return pngs, views, nil
}

// writeReportFiles writes the figures' PNG files into dir (created when
// missing) and then the page as pageFile. It returns the paths written,
// figures first, the page last. Every file goes through a temporary file in
// dir and a rename; when any step fails, the files of this call are
// removed (and dir, when this call created it) and nothing is left behind.
func writeReportFiles(dir string, specs []figureSpec, pngs [][]byte, pageFile string, page []byte) (written []string, err error) {
	_, statErr := os.Stat(dir)
	created := errors.Is(statErr, os.ErrNotExist)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("plots: report: %w", err)
	}
	defer func() {
		if err == nil {
			return
		}
		for _, path := range written {
			os.Remove(path)
		}
		written = nil
		if created {
			os.Remove(dir)
		}
	}()
	for i, spec := range specs {
		path := filepath.Join(dir, spec.file)
		if err := ingest.WriteFileAtomic(path, pngs[i]); err != nil {
			return written, err
		}
		written = append(written, path)
	}
	path := filepath.Join(dir, pageFile)
	if err := ingest.WriteFileAtomic(path, page); err != nil {
		return written, err
	}
	return append(written, path), nil
}

// reportView is what the template renders: every number already formatted.
type reportView struct {
	Title, Vehicle, Tool, Test string
	Log                        *compare.LogRef
	Setup                      *compare.FileRef
	Cautions                   string
	Modes                      []modeRow
	Comparison                 []comparisonRow
	Rates                      []rateRow
	RateNotes                  []string
	Checks                     []checkRow
	Warnings                   []string
	Method                     []string
	Quick                      []quickRow
	QuickNotes                 []string
	Figures                    []figureView
}

// quickRow is one single-mode first-look estimate.
type quickRow struct{ Source, FreqHz, Damping string }

// modeRow is one line of the summary table: a measured mode beside the
// model's mode of the same label.
type modeRow struct {
	Label, MeasuredHz, ModelHz, MeasuredDamping, ModelDamping  string
	MeasuredPitch, ModelPitch, MeasuredNode, ModelNode, Method string
}

// comparisonRow is one line of the comparison table.
type comparisonRow struct {
	Label, MeasuredHz, PredictedHz, DifferencePct, MAC             string
	MeasuredDamping, PredictedDamping, MeasuredNode, PredictedNode string
}

// rateRow is one back-calculated quantity.
type rateRow struct{ Name, Value string }

// checkRow is one check with the style and word of its status.
type checkRow struct {
	Name, Detail, Class, Word string
}

// figureView is one embedded figure.
type figureView struct {
	Number               int
	Title, Caption, File string
	Source               template.URL
}

// noValue stands where a value does not exist (a missing model mode, a node
// of a pure bounce shape).
const noValue = "—"

// num formats x with prec decimals; NaN and infinities give noValue.
func num(x float64, prec int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return noValue
	}
	return fmt.Sprintf("%.*f", prec, x)
}

// optNum is num for an optional value.
func optNum(x *float64, prec int) string {
	if x == nil {
		return noValue
	}
	return num(*x, prec)
}

// withSigma formats x ± sigma (1 standard deviation) when sigma is known.
func withSigma(x float64, sigma *float64, prec int) string {
	if sigma == nil || *sigma == 0 {
		return num(x, prec)
	}
	return num(x, prec) + " ± " + num(*sigma, prec)
}

// newReportView formats the result of in for the template.
func newReportView(in ReportInput) reportView {
	r := in.Result
	v := reportView{
		Title:    in.Title,
		Vehicle:  in.Vehicle,
		Tool:     strings.TrimSpace(r.Tool.Name + " " + r.Tool.Version),
		Test:     r.Test,
		Log:      r.Log,
		Setup:    r.Setup,
		Cautions: compare.Cautions,
		Warnings: r.Warnings,
	}
	if v.Title == "" {
		v.Title = "Ride mode report"
	}
	v.Modes = modeRows(r)
	for _, c := range r.Comparison {
		mac := "no measured shape"
		if c.ShapeMeasured {
			mac = num(c.MAC, 3)
		}
		v.Comparison = append(v.Comparison, comparisonRow{
			Label: c.Label, MeasuredHz: num(c.MeasuredHz, 3), PredictedHz: num(c.PredictedHz, 3),
			DifferencePct: fmt.Sprintf("%+.1f", c.DifferencePct), MAC: mac,
			MeasuredDamping: optNum(c.MeasuredDampingRatio, 3), PredictedDamping: num(c.PredictedDampingRatio, 3),
			MeasuredNode: optNum(c.MeasuredNodeM, 3), PredictedNode: optNum(c.PredictedNodeM, 3),
		})
	}
	v.Rates, v.RateNotes = rateRows(r.Updated)
	for _, c := range r.Checks {
		row := checkRow{Name: c.Name, Detail: c.Detail, Class: "verdict-other", Word: strings.ToUpper(c.Status)}
		switch c.Status {
		case "pass":
			row.Class, row.Word = "verdict-pass", "PASS"
		case "warn":
			row.Class, row.Word = "verdict-warn", "WARN"
		case "fail":
			row.Class, row.Word = "verdict-fail", "FAIL"
		}
		v.Checks = append(v.Checks, row)
	}
	for _, m := range r.Modes {
		if m.Method != "" {
			v.Method = append(v.Method, fmt.Sprintf("%s mode: %s.", m.Label, m.Method))
		}
	}
	if u := r.Updated; u != nil && u.Method != "" {
		v.Method = append(v.Method, fmt.Sprintf("Effective rates: %s.", u.Method))
	}
	if a := r.Analysis; a != nil {
		v.Method = append(v.Method,
			fmt.Sprintf("Band %s-%s Hz.", num(a.BandLowHz, 2), num(a.BandHighHz, 2)),
			fmt.Sprintf("Fit residual (normalised, 0 for a perfect fit): %s.", num(a.FitResidual, 3)),
			fmt.Sprintf("MAC between the two measured shapes (near 0: well separated): %s.", num(a.ModeShapeMAC, 3)))
		v.Method = append(v.Method, a.Choices...)
		for _, q := range a.QuickEstimate {
			v.Quick = append(v.Quick, quickRow{Source: q.Source, FreqHz: num(q.NaturalFrequencyHz, 3), Damping: optNum(q.DampingRatio, 3)})
		}
		v.QuickNotes = a.QuickEstimateNotes
	}
	v.Method = append(v.Method, in.Choices...)
	return v
}

// modeRows pairs each measured mode with the model mode of the same label;
// model modes with no measured partner follow.
func modeRows(r *compare.Result) []modeRow {
	var model []compare.ModeJSON
	if r.Model != nil {
		model = r.Model.Modes
	}
	used := make([]bool, len(model))
	var rows []modeRow
	for _, m := range r.Modes {
		row := modeRow{Label: m.Label, Method: m.Method, ModelHz: noValue, ModelDamping: noValue, ModelPitch: noValue, ModelNode: noValue}
		var sHz, sZeta *float64
		if u := m.Uncertainty; u != nil {
			sHz, sZeta = &u.NaturalFrequencyHz, &u.DampingRatio
			row.MeasuredPitch = withOptSigma(m.PitchPerBounceRadPerM, u.PitchPerBounceRadPerM)
			row.MeasuredNode = withOptSigma(m.NodeM, u.NodeM)
		} else {
			row.MeasuredPitch = optNum(m.PitchPerBounceRadPerM, 3)
			row.MeasuredNode = optNum(m.NodeM, 3)
		}
		row.MeasuredHz = withSigma(m.NaturalFrequencyHz, sHz, 3)
		row.MeasuredDamping = withSigma(m.DampingRatio, sZeta, 3)
		for i, mm := range model {
			if !used[i] && mm.Label == m.Label {
				used[i] = true
				fillModel(&row, mm)
				break
			}
		}
		rows = append(rows, row)
	}
	for i, mm := range model {
		if !used[i] {
			row := modeRow{Label: mm.Label, MeasuredHz: noValue, MeasuredDamping: noValue, MeasuredPitch: noValue, MeasuredNode: noValue, Method: mm.Method}
			fillModel(&row, mm)
			rows = append(rows, row)
		}
	}
	return rows
}

// withOptSigma is withSigma for an optional value.
func withOptSigma(x, sigma *float64) string {
	if x == nil {
		return noValue
	}
	return withSigma(*x, sigma, 3)
}

// fillModel puts the model mode mm into row.
func fillModel(row *modeRow, mm compare.ModeJSON) {
	row.ModelHz = num(mm.NaturalFrequencyHz, 3)
	row.ModelDamping = num(mm.DampingRatio, 3)
	row.ModelPitch = optNum(mm.PitchPerBounceRadPerM, 3)
	row.ModelNode = optNum(mm.NodeM, 3)
}

// rateRows formats the back-calculated rates, with their notes.
func rateRows(u *compare.Updated) (rows []rateRow, notes []string) {
	if u == nil {
		return nil, nil
	}
	var sFront, sRear, sFrontC, sRearC, sInertia *float64
	if s := u.Uncertainty; s != nil {
		sFront, sRear = &s.FrontRateNPerM, &s.RearRateNPerM
		sFrontC, sRearC, sInertia = s.FrontDampingNsPerM, s.RearDampingNsPerM, s.PitchInertiaKgm2
	}
	rows = append(rows,
		rateRow{"front ride rate [N/m]", withSigma(u.FrontRateNPerM, sFront, 0)},
		rateRow{"rear ride rate [N/m]", withSigma(u.RearRateNPerM, sRear, 0)},
	)
	if u.DampingEstimated {
		rows = append(rows,
			rateRow{"front damping [N s/m]", withSigma(u.FrontDampingNsPerM, sFrontC, 0)},
			rateRow{"rear damping [N s/m]", withSigma(u.RearDampingNsPerM, sRearC, 0)},
		)
	} else {
		notes = append(notes, "Damping was not estimated from these data.")
	}
	if u.PitchInertiaKgm2 != nil {
		rows = append(rows, rateRow{"pitch inertia [kg m²]", withSigma(*u.PitchInertiaKgm2, sInertia, 0)})
	}
	if u.FrontSpringRateNPerM != nil {
		rows = append(rows, rateRow{"front spring rate for that ride rate [N/m]", num(*u.FrontSpringRateNPerM, 0)})
	}
	if u.RearSpringRateNPerM != nil {
		rows = append(rows, rateRow{"rear spring rate for that ride rate [N/m]", num(*u.RearSpringRateNPerM, 0)})
	}
	if u.RootChoice != "" {
		notes = append(notes, "Root: "+u.RootChoice+".")
	}
	for _, o := range u.OtherRoots {
		notes = append(notes, fmt.Sprintf("Other root, not chosen: front %s N/m, rear %s N/m.", num(o.FrontRateNPerM, 0), num(o.RearRateNPerM, 0)))
	}
	if s := u.Uncertainty; s != nil && s.NominalWeights {
		notes = append(notes, "Some measured values had no standard deviation: nominal ones were used, so the uncertainties are indicative only.")
	}
	if res := u.Residual; res != nil {
		notes = append(notes, fmt.Sprintf("Least-squares misfit: chi-square %s with %d degrees of freedom.", num(res.ChiSquare, 2), res.DegreesOfFreedom))
	}
	return rows, notes
}
