package identify

import (
	"context"
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/decay"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// The two kinds of test, as the result's "test" key names them.
const (
	TestRig  = "rig"  // wheel pans driven and logged: FRFs, then a modal fit
	TestDrop = "drop" // a free decay after a release: a time-domain fit
)

// TestOf returns the test a log is analysed as: test when given ("rig" or
// "drop"), else "rig" when the setup has [[input]] channels and "drop"
// when it has none. A rig test asked of a setup without inputs is an error
// that says what is missing.
func TestOf(setup *ingest.Setup, test string) (string, error) {
	switch test {
	case "":
		if len(setup.Inputs) > 0 {
			return TestRig, nil
		}
		return TestDrop, nil
	case TestRig:
		if len(setup.Inputs) == 0 {
			return "", fmt.Errorf("%s: a rig test needs the wheel pans' channels as [[input]] tables (channel, axle); this setup has none",
				setup.Path)
		}
		return TestRig, nil
	case TestDrop:
		return TestDrop, nil
	}
	return "", fmt.Errorf("unknown test %q: use %q or %q", test, TestRig, TestDrop)
}

// Channels lists the log channels a test reads: for a rig test the inputs
// first, then the sensors; for a drop test the sensors only (the setup's
// [[input]] tables are ignored, so one setup serves both tests of a car).
func Channels(setup *ingest.Setup, test string) []string {
	var ch []string
	if test == TestRig {
		for _, in := range setup.Inputs {
			ch = append(ch, in.Channel)
		}
	}
	for _, s := range setup.Sensors {
		ch = append(ch, s.Channel)
	}
	return ch
}

// Options are the analysis choices of both routes; zero values choose from
// the data or the defaults.
type Options struct {
	BandLowHz, BandHighHz float64 // analysis band (both routes)
	FRF                   FRFOptions
	MaxOrder              int // highest model order of the fit's sweep (both routes)
	Event                 int // drop: which release, counted from 0
}

// QuickEstimate is a one-mode estimate set beside the fit: the peak of a
// mode indicator curve with its half-power points (rig), or the
// logarithmic decrement of one channel (drop).
type QuickEstimate struct {
	Source             string
	NaturalFrequencyHz float64
	DampingRatio       float64 // NaN when the estimate has none
}

// Identified is what either route found in one log: the two body modes and
// everything a result, a summary and a report need to say how.
type Identified struct {
	Test  string
	Modes []body.Mode // bounce and pitch, sorted by natural frequency
	// Correlation relates the modes' figures (drop route; nil from the rig
	// route, whose figures are taken as independent).
	Correlation *body.Correlation
	Method      string // one sentence naming the route's estimator
	Summary     ingest.Summary
	// Choices say what was chosen and why; Warnings what the user should
	// know, the reasons of flagged modes among them (FlagWarnings).
	Choices, Warnings []string
	// FitResidual is the fit's normalised residual; ModeShapeMAC the MAC of
	// the two modes' sensor shapes; CoherenceInBand (rig) the mean multiple
	// coherence of each sensor over the band (nil when unknown).
	FitResidual, ModeShapeMAC float64
	CoherenceInBand           []float64
	Quick                     []QuickEstimate
	QuickNotes                []string // caveats of the quick estimate
	// Route details, for the figures: one of the two is set.
	Rig  *RigDetail
	Drop *DropDetail
}

// RigDetail holds what the rig route computed on the way.
type RigDetail struct {
	FRF *FRFResult
	Set *modal.FRFSet
	Fit *modal.Result
}

// DropDetail holds what the drop route computed on the way.
type DropDetail struct {
	Log *ingest.Log
	Fit *decay.Result
}

// Identify reads the log of r as the given test ("rig" or "drop", see
// TestOf) and identifies the body modes of the setup's sensors. It stops
// with ctx.Err() when ctx is cancelled while the log is read. The caller
// opened r with Channels(setup, test) and closes it.
func Identify(ctx context.Context, r *ingest.Reader, setup *ingest.Setup, test string, opt Options) (*Identified, error) {
	if test == TestRig {
		return identifyRig(ctx, r, setup, opt)
	}
	return identifyDrop(ctx, r, setup, opt)
}

// cancellable wraps a block consumer so that a cancelled ctx stops the stream.
func cancellable(ctx context.Context, consume func(ingest.Block) error) func(ingest.Block) error {
	return func(b ingest.Block) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		return consume(b)
	}
}

// Spectra streams the log of r through an FRF stage: the spectra of the
// setup's channels for the test and, for a rig test, the FRFs from the
// front and rear pans to every sensor.
func Spectra(ctx context.Context, r *ingest.Reader, setup *ingest.Setup, test string, opt Options) (*FRFResult, ingest.Summary, error) {
	fo := opt.FRF
	fo.BandLowHz, fo.BandHighHz = opt.BandLowHz, opt.BandHighHz
	var inputs []ingest.Input
	if test == TestRig {
		inputs = setup.Inputs
	}
	stage, err := NewFRFStage(r.Info().Channels, setup.Sensors, inputs, fo)
	if err != nil {
		return nil, ingest.Summary{}, err
	}
	defer stage.Close()
	sum, err := r.Stream(cancellable(ctx, stage.Consume))
	if err != nil {
		return nil, sum, err
	}
	frf, err := stage.Result(sum.SampleRateHz)
	return frf, sum, err
}

func identifyRig(ctx context.Context, r *ingest.Reader, setup *ingest.Setup, opt Options) (*Identified, error) {
	frf, sum, err := Spectra(ctx, r, setup, TestRig, opt)
	if err != nil {
		return nil, err
	}
	id := &Identified{Test: TestRig, Summary: sum}
	set, fit, err := FitRig(frf, setup.Sensors, modal.Options{MaxOrder: opt.MaxOrder})
	id.Choices = append(id.Choices, frf.Reasons...)
	id.Warnings = append(id.Warnings, frf.Warnings...)
	if err != nil {
		return id, err
	}
	id.Rig = &RigDetail{FRF: frf, Set: set, Fit: fit}
	id.Modes = fit.Modes
	id.Choices = append(id.Choices, fit.OrderReason)
	id.FitResidual, id.ModeShapeMAC = fit.NormalisedResidual, fit.MAC
	if allFinite(fit.CoherenceInBand) {
		id.CoherenceInBand = fit.CoherenceInBand
	}
	for _, q := range fit.Quick {
		id.Quick = append(id.Quick, QuickEstimate{
			Source:             fmt.Sprintf("peak at %.3f Hz of mode indicator curve %d, with half-power points", q.PeakHz, q.Curve+1),
			NaturalFrequencyHz: q.NaturalFrequencyHz, DampingRatio: q.DampingRatio})
	}
	for _, w := range fit.Warnings {
		switch w.Code {
		case modal.WarnOverlap, modal.WarnHeavyDamping, modal.WarnNoHalfPower, modal.WarnNoPeak:
			id.QuickNotes = append(id.QuickNotes, w.Message)
		default:
			id.Warnings = append(id.Warnings, w.Message)
		}
	}
	id.Warnings = append(id.Warnings, FlagWarnings(id.Modes)...)
	frfs := frf.FRF.Method.String()
	if frf.Local != nil {
		frfs = "local polynomial two-input"
	}
	id.Method = fmt.Sprintf("rig: %s FRFs, common-pole LSCF fit of order %d (least-squares complex frequency-domain, a rational fraction polynomial model) refined by weighted least squares",
		frfs, fit.Order)
	return id, nil
}

func identifyDrop(ctx context.Context, r *ingest.Reader, setup *ingest.Setup, opt Options) (*Identified, error) {
	// A drop log is short (seconds to minutes): it is read whole, and a
	// cancellation is noticed once it is in memory.
	log, err := r.ReadAll()
	if err == nil {
		err = ctx.Err()
	}
	if err != nil {
		return nil, err
	}
	sum := log.Summary
	id := &Identified{Test: TestDrop, Summary: sum}
	channels := make([][]float64, len(setup.Sensors))
	for i, s := range setup.Sensors {
		channels[i] = log.Channel(s.Channel)
	}
	fit, err := decay.Fit(sum.SampleRateHz, channels, ingest.SensorPositionsM(setup.Sensors), decay.Options{
		BandLowHz: opt.BandLowHz, BandHighHz: opt.BandHighHz, Event: opt.Event, MaxOrder: opt.MaxOrder})
	if err != nil {
		return id, err
	}
	id.Drop = &DropDetail{Log: log, Fit: fit}
	id.Modes, id.Correlation = fit.Modes, fit.Correlation
	id.Choices = append(id.Choices, fit.Reasons...)
	id.FitResidual, id.ModeShapeMAC = fit.NormalisedResidual, fit.MAC
	for _, q := range fit.LogDecrement {
		if math.IsNaN(q.NaturalFrequencyHz) {
			continue // too few half-cycles for an estimate
		}
		id.Quick = append(id.Quick, QuickEstimate{
			Source:             "logarithmic decrement of " + setup.Sensors[q.Channel].Channel,
			NaturalFrequencyHz: q.NaturalFrequencyHz, DampingRatio: q.DampingRatio})
	}
	for _, w := range fit.Warnings {
		id.Warnings = append(id.Warnings, w.Message)
	}
	id.Warnings = append(id.Warnings, FlagWarnings(id.Modes)...)
	id.Method = fmt.Sprintf("drop: free decay from %.2f s to %.2f s, eigensystem realization (order %d) refined by least squares",
		fit.WindowStartS, fit.WindowEndS, fit.Order)
	return id, nil
}

// FlagWarnings returns the reasons why modes of ms are flagged (body.Mode
// FlagReasons), each once in the order of the modes, as warnings for the
// summary: "flagged: " and the reason.
func FlagWarnings(ms []body.Mode) []string {
	var ws []string
	seen := map[string]bool{}
	for _, m := range ms {
		for _, r := range m.FlagReasons {
			if !seen[r] {
				seen[r] = true
				ws = append(ws, "flagged: "+r)
			}
		}
	}
	return ws
}

func allFinite(xs []float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
