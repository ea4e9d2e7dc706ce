package job

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/spectral"
	"github.com/ridemodes/ridemodes/ingest"
)

// Options say which log to analyse with which setup, and how. Zero values
// take the setup's [analysis] table, then the defaults; flags of the command
// line map onto them one to one.
type Options struct {
	LogPath string
	// Setup is the car's setup; SetupPath is read when Setup is nil.
	Setup     *ingest.Setup
	SetupPath string
	// Test is "rig", "drop" or "" (from the setup: rig when it has
	// [[input]] tables). With "drop" the setup's inputs are ignored.
	Test string
	// StartS and EndS bound the analysed window in s from the log's first
	// sample (0: the whole log; an EndS past the log's end is clamped with
	// a warning); Resample accepts jittery time steps.
	StartS, EndS float64
	Resample     bool
	// SampleRateHz is the sample rate of a log without a time column, in Hz
	// (0: the setup's [analysis] sample_rate_hz); with a time column it is
	// checked against the stamps.
	SampleRateHz float64
	// BandLowHz and BandHighHz are the analysis band in Hz.
	BandLowHz, BandHighHz float64
	// SegmentSamples is the rig route's Welch segment length after
	// decimation (a power of two; 0: chosen from the damping).
	SegmentSamples int
	// Window names the rig route's spectral window (one of ingest.Windows).
	Window string
	// MaxModelOrder is the highest model order of the fit's sweep (even, at
	// least 4; 0: the method's own).
	MaxModelOrder int
	// Event chooses the release of a drop test, counted from 0.
	Event int
	// ToolVersion is written into the result.
	ToolVersion string
	// Progress, when not nil, is called before the log is read with its
	// size; it returns the reader's progress hook and a function called
	// when reading ends. Drawing is the caller's business.
	Progress func(path string, sizeBytes int64) (hook func(readBytes, totalBytes int64), done func())
}

// Outcome is everything one analysed log gives: the contract's result and
// what the summary, the report and the figures need besides.
type Outcome struct {
	Result *compare.Result
	Setup  *ingest.Setup
	// Identified holds the route's own data (FRFs and fit, or the drop log
	// and its fit), for the figures; nil for a pooled analysis, whose runs'
	// data are in Runs (in the order of the logs).
	Identified *identify.Identified
	Runs       []*identify.Identified
	// Verdict is the result's verdict on the setup's [targets]: one of
	// compare.StatusPass, StatusFail, StatusInconclusive, StatusNone.
	Verdict string
}

// plan is what the options resolve to against a setup.
type plan struct {
	setup          *ingest.Setup
	test           string
	loHz, hiHz     float64
	window         spectral.Window
	segment, order int
	rateHz         float64
	// notes say how an option was read (a window's other spelling); they
	// join the result's warnings.
	notes []string
}

// resolve loads the setup and checks the options against it and the test.
func (o *Options) resolve() (*plan, error) {
	setup := o.Setup
	if setup == nil {
		var err error
		if setup, err = ingest.LoadSetup(o.SetupPath); err != nil {
			return nil, err
		}
	}
	if err := setup.CheckForLog(); err != nil {
		return nil, err
	}
	test, err := identify.TestOf(setup, o.Test)
	if err != nil {
		return nil, &compare.OptionError{Err: err}
	}
	p := &plan{setup: setup, test: test, loHz: ingest.DefaultBandLowHz, hiHz: ingest.DefaultBandHighHz,
		segment: setup.Analysis.SegmentSamples, order: setup.Analysis.MaxModelOrder}
	for _, x := range []float64{setup.Analysis.BandLowHz, o.BandLowHz} {
		if x > 0 {
			p.loHz = x
		}
	}
	for _, x := range []float64{setup.Analysis.BandHighHz, o.BandHighHz} {
		if x > 0 {
			p.hiHz = x
		}
	}
	if !(p.loHz > 0 && p.hiHz > p.loHz) || math.IsInf(p.hiHz, 0) {
		return nil, compare.OptionErrorf("the analysis band %g-%g Hz needs 0 < low < high (--band-low, --band-high or [analysis])", p.loHz, p.hiHz)
	}
	if err := o.checkWindow(); err != nil {
		return nil, err
	}
	if o.SegmentSamples != 0 {
		if n := o.SegmentSamples; n < 16 || n&(n-1) != 0 {
			return nil, compare.OptionErrorf("--segment-samples takes a power of two of at least 16 (got %d; e.g. %d), "+
				"or leave it out to choose the length from the damping", n, nearestPowerOfTwo(n))
		}
		p.segment = o.SegmentSamples
	}
	if o.MaxModelOrder != 0 {
		p.order = o.MaxModelOrder
	}
	if p.order != 0 && (p.order < 4 || p.order%2 == 1) {
		return nil, compare.OptionErrorf("--max-model-order takes an even number of at least 4, room for two modes (got %d), "+
			"or leave it out for the method's own", p.order)
	}
	p.rateHz = setup.Analysis.SampleRateHz
	if o.SampleRateHz != 0 {
		if !(o.SampleRateHz > 0) || math.IsInf(o.SampleRateHz, 0) {
			return nil, compare.OptionErrorf("--rate takes the log's sample rate in Hz, a positive number (got %g)", o.SampleRateHz)
		}
		p.rateHz = o.SampleRateHz
	}
	if o.Event < 0 {
		return nil, compare.OptionErrorf("--event counts releases from 0")
	}
	if o.Event != 0 && test == identify.TestRig {
		return nil, compare.OptionErrorf("--event chooses a release in a drop test; this is a rig test (use --test drop for a drop log)")
	}
	name := setup.Analysis.Window
	if o.Window != "" {
		name = o.Window
	}
	var note string
	if p.window, note, err = identify.WindowNamed(name); err != nil {
		return nil, &compare.OptionError{Err: fmt.Errorf("--window: %w", err)}
	}
	if note != "" {
		p.notes = append(p.notes, note)
	}
	return p, nil
}

// checkWindow refuses a --start/--end window that cannot hold a sample,
// whatever the log.
func (o *Options) checkWindow() error {
	switch {
	case math.IsNaN(o.StartS) || math.IsInf(o.StartS, 0) || o.StartS < 0:
		return compare.OptionErrorf("--start takes a time in s from the log's first sample, zero or positive (got %g)", o.StartS)
	case math.IsNaN(o.EndS) || math.IsInf(o.EndS, 0) || o.EndS < 0:
		return compare.OptionErrorf("--end takes a time in s from the log's first sample, positive, or 0 for the end of the log (got %g)", o.EndS)
	case o.EndS != 0 && o.EndS <= o.StartS:
		return compare.OptionErrorf("--end %g s is not after --start %g s: the window to analyse runs from --start to --end", o.EndS, o.StartS)
	}
	return nil
}

// nearestPowerOfTwo returns the power of two nearest to n (at least 16).
func nearestPowerOfTwo(n int) int {
	p := 16
	for p < n && p*2-n < n-p {
		p *= 2
	}
	return p
}

// open opens a log for the plan's test, with the progress hook.
func (o *Options) open(p *plan, path string) (r *ingest.Reader, done func(), err error) {
	ro := ingest.Options{
		Channels:     identify.Channels(p.setup, p.test),
		SampleRateHz: p.rateHz,
		StartS:       o.StartS,
		EndS:         o.EndS,
		Resample:     o.Resample,
		BandHighHz:   p.hiHz,
	}
	if p.test == identify.TestRig {
		ro.MinDurationS = identify.MinRigRecordS(p.loHz)
	}
	done = func() {}
	if o.Progress != nil {
		if st, err := os.Stat(path); err == nil {
			ro.Progress, done = o.Progress(path, st.Size())
		}
	}
	r, err = ingest.Open(path, ro)
	if err != nil {
		done()
		return nil, nil, o.explainMissing(p, err)
	}
	return r, done, nil
}

// explainMissing turns a missing pan channel of a rig test whose kind came
// from the setup into advice: most often the log is a drop log read with
// the car's rig setup.
func (o *Options) explainMissing(p *plan, err error) error {
	var pe *ingest.ParseError
	if o.Test != "" || p.test != identify.TestRig || !errors.As(err, &pe) || !errors.Is(err, ingest.ErrMissingChannel) {
		return err
	}
	for _, in := range p.setup.Inputs {
		if in.Channel == pe.Column {
			return fmt.Errorf("%w; the setup's [[input]] tables make this a rig test: for a drop log, run with --test drop", err)
		}
	}
	return err
}

func (p *plan) identifyOptions(event int) identify.Options {
	return identify.Options{BandLowHz: p.loHz, BandHighHz: p.hiHz, MaxOrder: p.order, Event: event,
		FRF: identify.FRFOptions{SegmentLen: p.segment, Window: p.window}}
}

// Analyze does the whole job on one log: read and check it, identify the
// body modes by the test's route, set them beside the design model,
// back-calculate the rates and judge the targets. Option mistakes are
// *compare.OptionError; a cancelled ctx returns ctx.Err(). Nothing is written: the
// caller writes the outcome (JSON, report).
func Analyze(ctx context.Context, o Options) (*Outcome, error) {
	p, err := o.resolve()
	if err != nil {
		return nil, err
	}
	id, info, err := o.identifyLog(ctx, p, o.LogPath)
	if err != nil {
		return nil, err
	}
	res := o.result(p, o.LogPath, info, id)
	res.Warnings = append(res.Warnings, repeatAdvice(id, o.LogPath, p)...)
	if err := res.AssessAgainst(p.setup); err != nil {
		return nil, err
	}
	return &Outcome{Result: res, Setup: p.setup, Identified: id, Verdict: res.Verdict.Status}, nil
}

// identifyLog reads one log and identifies its modes by the plan's route.
func (o *Options) identifyLog(ctx context.Context, p *plan, path string) (*identify.Identified, ingest.Info, error) {
	r, done, err := o.open(p, path)
	if err != nil {
		return nil, ingest.Info{}, err
	}
	defer r.Close()
	id, err := identify.Identify(ctx, r, p.setup, p.test, p.identifyOptions(o.Event))
	done()
	if err != nil {
		if ctx.Err() != nil {
			return nil, ingest.Info{}, ctx.Err()
		}
		if id != nil && len(id.Warnings) > 0 {
			// What the stages noticed before the failure often explains it.
			err = fmt.Errorf("%w (noticed before the failure: %s)", err, strings.Join(id.Warnings, "; "))
		}
		return nil, ingest.Info{}, withPath(path, err)
	}
	return id, r.Info(), nil
}

// Spectra reads the log and estimates its spectra (every test) and, for a
// rig test, the FRFs with coherence and error bands: the rig route's first
// stage on its own, with the same options as Analyze.
func Spectra(ctx context.Context, o Options) (*identify.FRFResult, ingest.Summary, error) {
	p, err := o.resolve()
	if err != nil {
		return nil, ingest.Summary{}, err
	}
	r, done, err := o.open(p, o.LogPath)
	if err != nil {
		return nil, ingest.Summary{}, err
	}
	defer r.Close()
	res, sum, err := identify.Spectra(ctx, r, p.setup, p.test, p.identifyOptions(0))
	done()
	if err != nil {
		if ctx.Err() != nil {
			return nil, sum, ctx.Err()
		}
		return nil, sum, withPath(o.LogPath, err)
	}
	var note string
	if sum.Warnings, note = p.quality(sum.Warnings); note != "" {
		res.Reasons = append(res.Reasons, note)
	}
	res.Warnings = append(slices.Clip(p.notes), res.Warnings...)
	return res, sum, nil
}

// quality returns the reader's data-quality warnings as the test reads
// them, and a note when some were dropped: analyze and spectra give the same
// warnings on the same log.
func (p *plan) quality(ws []ingest.Warning) ([]ingest.Warning, string) {
	if p.test != identify.TestRig {
		return ws, ""
	}
	return identify.RigLogWarnings(ws, p.setup.Inputs)
}

// result writes what the route identified in the contract's form.
func (o *Options) result(p *plan, path string, info ingest.Info, id *identify.Identified) *compare.Result {
	res := &compare.Result{Tool: compare.Tool{Name: "ridemodes", Version: o.ToolVersion}, Test: id.Test}
	if sum, err := ingest.FileSHA256(p.setup.Path); err == nil {
		res.Setup = &compare.FileRef{Path: p.setup.Path, SHA256: sum}
	}
	sum := id.Summary
	res.Log = &compare.LogRef{Path: path, SHA256: sum.SHA256, Samples: sum.Samples,
		SampleRateHz: sum.SampleRateHz, DurationS: sum.DurationS, Notes: slices.Clip(info.Notes)}
	if res.Log.Notes == nil {
		res.Log.Notes = []string{}
	}
	a := &compare.Analysis{BandLowHz: p.loHz, BandHighHz: p.hiHz, Choices: id.Choices,
		FitResidual: id.FitResidual, ModeShapeMAC: id.ModeShapeMAC, CoherenceInBand: id.CoherenceInBand,
		QuickEstimateNotes: id.QuickNotes}
	for _, q := range id.Quick {
		a.QuickEstimate = append(a.QuickEstimate, compare.QuickEstimate{Source: q.Source,
			NaturalFrequencyHz: q.NaturalFrequencyHz, DampingRatio: compare.Finite(q.DampingRatio)})
	}
	quality, note := p.quality(sum.Warnings)
	if note != "" {
		a.Choices = append(a.Choices, note)
	}
	res.Log.Quality = quality
	res.Analysis = a
	res.Warnings = append(res.Warnings, p.notes...)
	for _, w := range quality {
		res.Warnings = append(res.Warnings, w.String())
	}
	res.Warnings = append(res.Warnings, id.Warnings...)
	pos := ingest.SensorPositionsM(p.setup.Sensors)
	for _, m := range id.Modes {
		res.Modes = append(res.Modes, compare.MeasuredJSON(m, pos, id.Method))
	}
	res.ModeCorrelation = compare.CorrelationJSON(id.Correlation)
	return res
}

// withPath prefixes an error with the file it concerns, unless its message
// names the file already.
func withPath(path string, err error) error {
	if strings.HasPrefix(err.Error(), path) {
		return err
	}
	return fmt.Errorf("%s: %w", path, err)
}
