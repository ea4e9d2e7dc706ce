package cli

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/decay"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// analyzeFlags are the options of analyze beyond the shared log flags.
type analyzeFlags struct {
	setupPath, jsonPath, reportDir string
	maxOrder                       int
	event                          int
	lf                             logFlags
}

func newAnalyzeCmd() *cobra.Command {
	var af analyzeFlags
	cmd := &cobra.Command{
		Use:   "analyze LOG --setup FILE [--json OUT] [--report DIR]",
		Short: "Identify bounce and pitch from a rig or drop log and set them beside the model",
		Long: `analyze does the whole job on one log. The route follows the setup: with
[[input]] channels (a rig test) it estimates the FRFs from the front and rear
pans to every body sensor and fits both body modes to all FRFs together with
common poles; without inputs (a drop test) it finds the release and fits the
free decay of all sensors together. Then it solves the design model, compares,
back-calculates the effective ride rates (and damping), judges the [targets]
and reports the trade's ride guidance.

It prints a summary; --json writes the result (the contract's keys), --report
writes an HTML report with figures into a folder. Choices (band, resolution,
model order) are made from the data, with their reasons in the result; each
can be overridden by a flag or the setup's [analysis] table.

Exit codes: 0 done; 1 bad data or a failed analysis; 2 bad usage; 3 done, but
a check in [targets] failed.

` + compare.Cautions,
		Example: `  ridemodes analyze rig.csv --setup car.toml
  ridemodes analyze rig.csv --setup car.toml --json result.json --report report/
  ridemodes analyze drop.csv --setup car-drop.toml --start 2 --end 30`,
		Args: usageArgs(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			res, failed, err := runAnalyze(args[0], &af, cmd.OutOrStdout())
			if err != nil {
				return err
			}
			if err := writeOutputs(res, af.jsonPath, af.reportDir); err != nil {
				return err
			}
			if failed {
				return errTargetsFailed
			}
			return nil
		},
	}
	f := cmd.Flags()
	f.StringVar(&af.setupPath, "setup", "", "setup file (TOML): vehicle, sensors, inputs, targets")
	f.StringVar(&af.jsonPath, "json", "", "write the result as JSON to this file")
	f.StringVar(&af.reportDir, "report", "", "write an HTML report with figures into this folder")
	f.IntVar(&af.maxOrder, "max-order", 0, "highest model order of the fit's sweep, even, at least 4 (default from [analysis], else the method's own)")
	f.IntVar(&af.event, "event", 0, "drop test: which release to analyse, counted from 0")
	af.lf.register(cmd)
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("json", "json")
	cmd.MarkFlagDirname("report")
	return cmd
}

// analysis is what runAnalyze produced, for the outputs.
type analysis struct {
	result *compare.Result
	setup  *ingest.Setup
	// Rig route.
	frf    *identify.FRFResult
	frfSet *modal.FRFSet
	fit    *modal.Result
	// Drop route.
	decay   *decay.Result
	dropLog *ingest.Log
}

// runAnalyze runs the route the setup calls for and prints the summary.
func runAnalyze(logPath string, af *analyzeFlags, out io.Writer) (*analysis, bool, error) {
	setup, err := ingest.LoadSetup(af.setupPath)
	if err != nil {
		return nil, false, err
	}
	if o := af.jsonPath; o != "" && (sameFile(o, logPath) || sameFile(o, af.setupPath)) {
		return nil, false, usageError{fmt.Errorf("--json %s would overwrite an input file", o)}
	}
	if af.maxOrder != 0 && (af.maxOrder < 4 || af.maxOrder%2 == 1) {
		return nil, false, usageError{errors.New("--max-order takes 0 (automatic) or an even number of at least 4 (two modes)")}
	}
	if af.event < 0 {
		return nil, false, usageError{errors.New("--event counts releases from 0")}
	}
	if af.event != 0 && len(setup.Inputs) > 0 {
		return nil, false, usageError{errors.New("--event chooses a release in a drop test; this setup has rig inputs")}
	}
	if af.maxOrder == 0 {
		af.maxOrder = setup.Analysis.MaxModelOrder
	}
	res := &compare.Result{Tool: compare.Tool{Name: "ridemodes", Version: version()}}
	if sum, err := fileSHA256(af.setupPath); err == nil {
		res.Setup = &compare.FileRef{Path: af.setupPath, SHA256: sum}
	}
	r, done, err := af.lf.openLog(logPath, setup)
	if err != nil {
		return nil, false, err
	}
	defer r.Close()
	lo, hi := af.lf.band(setup)
	res.Analysis = &compare.Analysis{BandLowHz: lo, BandHighHz: hi}
	a := &analysis{result: res, setup: setup}
	var sum ingest.Summary
	if len(setup.Inputs) > 0 {
		res.Test = "rig"
		sum, err = analyzeRig(r, done, af, a)
	} else {
		res.Test = "drop"
		sum, err = analyzeDrop(r, done, af, a)
	}
	if err != nil {
		if len(res.Warnings) > 0 {
			// What the stages noticed before the failure often explains it.
			err = fmt.Errorf("%w (noticed before the failure: %s)", err, strings.Join(res.Warnings, "; "))
		}
		return nil, false, withPath(logPath, err)
	}
	info := r.Info()
	res.Log = &compare.LogRef{Path: logPath, SHA256: sum.SHA256, Samples: sum.Samples,
		SampleRateHz: sum.SampleRateHz, DurationS: sum.DurationS, Notes: info.Notes}
	if res.Log.Notes == nil {
		res.Log.Notes = []string{}
	}
	quality := sum.Warnings
	if res.Test == "rig" {
		var note string
		quality, note = identify.RigLogWarnings(quality, setup.Inputs)
		if note != "" {
			res.Analysis.Choices = append(res.Analysis.Choices, note)
		}
	}
	res.Log.Quality = quality
	logWarnings := make([]string, 0, len(quality))
	for _, w := range quality {
		logWarnings = append(logWarnings, w.String())
	}
	res.Warnings = append(logWarnings, res.Warnings...)

	failed, err := assess(res, setup)
	if err != nil {
		return nil, false, err
	}
	printSummary(out, res)
	return a, failed, nil
}

// assess adds the model, the comparison, the back-calculation and the
// checks to a result that holds measured modes; it reports whether a target
// failed.
func assess(res *compare.Result, setup *ingest.Setup) (bool, error) {
	design := compare.DesignOf(setup.Vehicle)
	model, err := design.Modes()
	if err != nil {
		return false, fmt.Errorf("%s: %w", setup.Path, err)
	}
	res.Model = modelPart(model, design.Damped())
	measured, err := compare.MeasuredFromJSON(res.Modes)
	if err != nil {
		return false, err
	}
	a, err := compare.Assess(measured, setup)
	if err != nil {
		return false, err
	}
	a.Fill(res)
	return a.AnyFailed, nil
}

func analyzeRig(r *ingest.Reader, done func(), af *analyzeFlags, a *analysis) (ingest.Summary, error) {
	setup, res := a.setup, a.result
	opt, err := af.lf.frfOptions(setup)
	if err != nil {
		done()
		return ingest.Summary{}, err
	}
	stage, err := identify.NewFRFStage(r.Info().Channels, setup.Sensors, setup.Inputs, opt)
	if err != nil {
		done()
		return ingest.Summary{}, err
	}
	sum, err := r.Stream(stage.Consume)
	done()
	if err != nil {
		return sum, err
	}
	frf, err := stage.Result(sum.SampleRateHz)
	if err != nil {
		return sum, err
	}
	res.Analysis.Choices = append(res.Analysis.Choices, frf.Reasons...)
	res.Warnings = append(res.Warnings, frf.Warnings...)
	pos := ingest.SensorPositionsM(setup.Sensors)
	set, fit, err := identify.FitRig(frf, setup.Sensors, modal.Options{MaxOrder: af.maxOrder})
	if err != nil {
		return sum, err
	}
	a.frf, a.frfSet, a.fit = frf, set, fit
	res.Analysis.Choices = append(res.Analysis.Choices, fit.OrderReason)
	res.Analysis.FitResidual = fit.NormalisedResidual
	res.Analysis.ModeShapeMAC = fit.MAC
	if allFinite(fit.CoherenceInBand) {
		res.Analysis.CoherenceInBand = fit.CoherenceInBand
	}
	for _, q := range fit.Quick {
		res.Analysis.QuickEstimate = append(res.Analysis.QuickEstimate, compare.QuickEstimate{
			Source:             fmt.Sprintf("peak of mode indicator curve %d with half-power points", q.Curve+1),
			NaturalFrequencyHz: q.NaturalFrequencyHz, DampingRatio: compare.Finite(q.DampingRatio)})
	}
	for _, w := range fit.Warnings {
		switch w.Code {
		case modal.WarnOverlap, modal.WarnHeavyDamping, modal.WarnNoHalfPower, modal.WarnNoPeak:
			res.Analysis.QuickEstimateNotes = append(res.Analysis.QuickEstimateNotes, w.Message)
		default:
			res.Warnings = append(res.Warnings, w.Message)
		}
	}
	method := fmt.Sprintf("rig: %s FRFs, common-pole rational fraction polynomial fit (order %d) refined by weighted least squares",
		frf.FRF.Method, fit.Order)
	for _, m := range fit.Modes {
		res.Modes = append(res.Modes, measuredJSON(m.Label, m.NaturalFrequencyHz, m.DampedFrequencyHz, m.DampingRatio,
			m.PitchPerBounceRadPerM, m.NodeM, [4]float64{m.SD.NaturalFrequencyHz, m.SD.DampingRatio,
				m.SD.PitchPerBounceRadPerM, m.SD.NodeM}, m.Shape, pos, method))
	}
	return sum, nil
}

func analyzeDrop(r *ingest.Reader, done func(), af *analyzeFlags, a *analysis) (ingest.Summary, error) {
	setup, res := a.setup, a.result
	log, err := r.ReadAll()
	done()
	if err != nil {
		return ingest.Summary{}, err
	}
	pos := ingest.SensorPositionsM(setup.Sensors)
	data := make([][]float64, len(setup.Sensors))
	for i, s := range setup.Sensors {
		data[i] = log.Channel(s.Channel)
	}
	lo, hi := af.lf.band(setup)
	fit, err := decay.Fit(log.Summary.SampleRateHz, data, pos, decay.Options{BandLowHz: lo, BandHighHz: hi,
		Event: af.event, MaxOrder: af.maxOrder})
	if err != nil {
		return log.Summary, err
	}
	a.decay, a.dropLog = fit, log
	res.Analysis.Choices = append(res.Analysis.Choices, fit.Reasons...)
	res.Analysis.FitResidual = fit.NormalisedResidual
	res.Analysis.ModeShapeMAC = fit.MAC
	for _, q := range fit.LogDecrement {
		if math.IsNaN(q.NaturalFrequencyHz) {
			continue // too few half-cycles for an estimate
		}
		res.Analysis.QuickEstimate = append(res.Analysis.QuickEstimate, compare.QuickEstimate{
			Source:             "logarithmic decrement of " + setup.Sensors[q.Channel].Channel,
			NaturalFrequencyHz: q.NaturalFrequencyHz, DampingRatio: compare.Finite(q.DampingRatio)})
	}
	for _, w := range fit.Warnings {
		res.Warnings = append(res.Warnings, w.Message)
	}
	method := fmt.Sprintf("drop: free decay from %.2f s to %.2f s, eigensystem realization (order %d) refined by least squares",
		fit.WindowStartS, fit.WindowEndS, fit.Order)
	for _, m := range fit.Modes {
		res.Modes = append(res.Modes, measuredJSON(m.Label, m.NaturalFrequencyHz, m.DampedFrequencyHz, m.DampingRatio,
			m.PitchPerBounceRadPerM, m.NodeM, [4]float64{m.Sigma.NaturalFrequencyHz, m.Sigma.DampingRatio,
				m.Sigma.PitchPerBounceRadPerM, m.Sigma.NodeM}, m.ShapeAtSensors, pos, method))
	}
	return log.Summary, nil
}

// measuredJSON writes one identified mode in the contract's form; sd holds
// the standard deviations of fn, zeta, pitch per bounce and node.
func measuredJSON(label string, fnHz, fdHz, zeta, ppb, nodeM float64, sd [4]float64, shape []complex128,
	posM []float64, method string) compare.ModeJSON {
	m := compare.ModeJSON{Label: label, NaturalFrequencyHz: fnHz, NaturalFrequencyRadPerS: 2 * math.Pi * fnHz,
		DampedFrequencyHz: fdHz, DampingRatio: zeta, PitchPerBounceRadPerM: compare.Finite(ppb), NodeM: compare.Finite(nodeM),
		Method: method,
		Uncertainty: &compare.Uncertainty{NaturalFrequencyHz: sd[0], DampingRatio: sd[1],
			PitchPerBounceRadPerM: compare.Finite(sd[2]), NodeM: compare.Finite(sd[3])}}
	for i, w := range shape {
		m.SensorShape = append(m.SensorShape, compare.SensorShapeJSON{XM: posM[i], Re: real(w), Im: imag(w)})
	}
	return m
}

// writeOutputs writes the JSON result and the report, each atomically.
func writeOutputs(a *analysis, jsonPath, reportDir string) error {
	if jsonPath != "" {
		data, err := a.result.Marshal()
		if err != nil {
			return err
		}
		if err := writeFileAtomic(jsonPath, data); err != nil {
			return err
		}
	}
	if reportDir != "" {
		return writeReport(reportDir, a)
	}
	return nil
}

func allFinite(xs []float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
