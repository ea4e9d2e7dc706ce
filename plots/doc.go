// Package plots draws the figures of a ridemodes analysis and writes the
// report that an engineer files.
//
// # Inputs
//
// The figures take small input types of their own (FRFData, IndicatorData,
// StabData, ShapeData, DecayData) made of plain slices and strings, so that
// this package does not depend on the identification packages; the caller
// converts. The report renders a compare.Result beside them.
//
// # Conventions
//
// Axes and signs are those of package compare (ISO 8855): s is a position
// along the body from the centre of gravity (CG), positive forward, in m;
// the front axle is at s = +a and the rear axle at s = -b; the vertical motion
// of the body at s is w(s) = z - s*theta with theta positive nose-down. Mode
// shapes are drawn with z = 1 and then scaled so that the largest |w| over the
// wheelbase is 1. Frequencies are in Hz, phases in degrees, times in s.
//
// # Data problems
//
// Every figure checks its data before drawing: an empty series, a NaN or an
// infinity, a length mismatch or a value that a log axis cannot show is
// returned as a *SeriesError naming the series and the index; nothing
// panics on bad data.
//
// # Figures
//
// Figures use the colours of Okabe and Ito's palette (2008), each series
// with a glyph of its own so that a print in grey still reads; a fitted or
// model curve is dashed in the colour of its data; legends sit in a column
// beside the data; labels of marked frequencies sit in a band above the
// curves. Log axes are ticked at every whole multiple of a power of ten and
// labelled 1-2-3-4-5 over up to 1.3 decades (0.5, 1, 2, 3, 4 Hz), phase
// axes every 90 degrees.
//
// # Files
//
// Figure.Save writes a figure as PNG or SVG, chosen by the file extension.
// WriteReport writes report.html, one self-contained file (figures inline as
// SVG, CSS inline, no script, no external URL), and each figure as its own
// PNG file for slides into a report directory: frf.png, mode-indicator.png,
// stabilisation.png, mode-shapes.png and time-history.png, for the figures
// whose inputs are given. The page opens with the verdict (an element with
// id "verdict" and data-verdict pass, fail, inconclusive or none) and the
// deviations that decided it, then one table per question (modes, rates,
// checks); its tables reflow on a phone-width screen, and its print style
// sheet gives A4 pages with the verdict on the first. WriteTrendReport
// writes a campaign's trend report the same way: index.html and a figure
// per followed quantity, trend-QUANTITY.png (TrendFigure: values with ± 2 sd
// bars, design values, individuals and moving-range control charts).
// WritePlanReport writes a test plan's page, plan.html, and its figure,
// plan-curve.png (PlanFigure: predicted over wanted sd against the record
// length or the number of drops); WritePlan prints the plan for a terminal.
// Every file is written to a temporary file in the same folder and then renamed,
// so a failure leaves nothing behind.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the plots
// layer. It may import ingest (the atomic file write, sensors), identify
// (the route data behind the figures), compare and compare/job (the
// outcome of one analysed log), compare/trend and compare/store (a
// campaign's runs), compare/plan (a test plan), never cmd.
package plots
