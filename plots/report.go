package plots

import (
	"bytes"
	_ "embed"
	"errors"
	"fmt"
	"html"
	"html/template"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// ReportFile is the name of the report inside the report directory.
const ReportFile = "report.html"

// ReportInput is what a report shows. Any figure input may be nil (a drop
// test has no FRF); the figures given are drawn, inlined in the report as
// SVG and also written as PNG files of their own.
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

// reportTemplate is the report page: XHTML-compatible HTML, CSS inline;
// it defines the "style", "verdict" and "figures" templates that the trend
// page shares.
//
// The pages' templates are parsed on first use, not at start-up: every
// command links this package, and parsing them took about 1 ms of each
// run's start (a perf profile of `ridemodes --version`, this machine).
var reportTemplate = sync.OnceValue(parseReport)

// parseReport parses the report page's template set afresh: the trend and
// plan pages add their own page to a set of their own (a template that has
// run can no longer be cloned).
func parseReport() *template.Template {
	return template.Must(template.New("report").Parse(reportSource))
}

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
// inline (SVG). It returns the paths written, figures first, the report last.
// Every file goes through a temporary file in dir and a rename; when any
// step fails, the files of this call are removed and nothing is left
// behind.
func WriteReport(dir string, in ReportInput) (written []string, err error) {
	if in.Result == nil {
		return nil, errors.New("plots: report: no result to report")
	}
	view := newReportView(in)
	return writePage(dir, reportFigures(in), reportTemplate(), &view, &view.Figures, ReportFile, "report")
}

// writePage draws the figures of specs into *figures (a field of view),
// renders the page with tmpl over view and writes it with the figures'
// PNG files (writeReportFiles); what names the page in errors.
func writePage(dir string, specs []figureSpec, tmpl *template.Template, view any, figures *[]figureView,
	pageFile, what string) ([]string, error) {
	pngs, views, err := drawFigures(specs)
	if err != nil {
		return nil, err
	}
	*figures = views
	var page bytes.Buffer
	if err := tmpl.Execute(&page, view); err != nil {
		return nil, fmt.Errorf("plots: %s: %w", what, err)
	}
	return writeReportFiles(dir, specs, pngs, pageFile, page.Bytes())
}

// drawFigures draws specs and encodes each as PNG (the file filed beside
// the page) and as SVG, with its view for a page (numbered from 1, the SVG
// inline).
func drawFigures(specs []figureSpec) (pngs [][]byte, views []figureView, err error) {
	pngs = make([][]byte, len(specs))
	for i, spec := range specs {
		fail := func(err error) error {
			return fmt.Errorf("plots: report: %s figure: %w", strings.ToLower(spec.title), err)
		}
		fig, err := spec.draw()
		if err != nil {
			return nil, nil, fail(err)
		}
		if pngs[i], err = fig.Encode("png"); err != nil {
			return nil, nil, fail(err)
		}
		svg, err := fig.Encode("svg")
		if err != nil {
			return nil, nil, fail(err)
		}
		views = append(views, figureView{
			Number:  i + 1,
			Title:   spec.title,
			Caption: spec.caption,
			File:    spec.file,
			SVG:     inlineSVG(svg, fmt.Sprintf("Figure %d: %s", i+1, spec.title)),
		})
	}
	return pngs, views, nil
}

// inlineSVG makes an SVG document of gonum/plot's vgsvg an element of an
// HTML page: the XML prolog and comment before the <svg> tag go, and the
// tag gains a class for the style sheet, the image role and label. The
// markup is our own drawing, its text escaped by vgsvg, so the page may
// take it as it is.
func inlineSVG(doc []byte, label string) template.HTML {
	s := string(doc)
	if i := strings.Index(s, "<svg"); i >= 0 {
		s = s[i:]
	}
	s = strings.Replace(s, "<svg", `<svg class="figure" role="img" aria-label="`+html.EscapeString(label)+`"`, 1)
	return template.HTML(s)
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
