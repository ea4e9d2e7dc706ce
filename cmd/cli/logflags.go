package cli

import (
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/ingest"
)

// logFlags are the options shared by every command that reads a log.
type logFlags struct {
	startS, endS float64
	resample     bool
	bandLowHz    float64
	bandHighHz   float64
	segment      int
	window       string
	errOut       func() io.Writer // the command's ErrOrStderr, for the progress bar (nil: no bar)
}

func (f *logFlags) register(cmd *cobra.Command) {
	f.errOut = cmd.ErrOrStderr
	fl := cmd.Flags()
	fl.Float64Var(&f.startS, "start", 0, "analyse from this time in s, counted from the log's first sample")
	fl.Float64Var(&f.endS, "end", 0, "analyse up to this time in s (0: to the end of the log)")
	fl.BoolVar(&f.resample, "resample", false, "accept jittery time steps and resample onto a uniform grid (warns)")
	fl.Float64Var(&f.bandLowHz, "band-low", 0, fmt.Sprintf("analysis band, lower edge in Hz (default from [analysis], else %g)", ingest.DefaultBandLowHz))
	fl.Float64Var(&f.bandHighHz, "band-high", 0, fmt.Sprintf("analysis band, upper edge in Hz (default from [analysis], else %g)", ingest.DefaultBandHighHz))
	fl.IntVar(&f.segment, "segment", 0, "Welch segment length in samples after decimation, a power of two (default from [analysis], else chosen from the damping)")
	fl.StringVar(&f.window, "window", "", "spectral window: "+strings.Join(ingest.Windows, ", ")+" (default from [analysis], else "+ingest.DefaultWindow+")")
	cmd.RegisterFlagCompletionFunc("window", cobra.FixedCompletions(ingest.Windows, cobra.ShellCompDirectiveNoFileComp))
}

// band returns the analysis band: flags over [analysis] over the defaults.
func (f *logFlags) band(setup *ingest.Setup) (lo, hi float64) {
	lo, hi = ingest.DefaultBandLowHz, ingest.DefaultBandHighHz
	if setup.Analysis.BandLowHz > 0 {
		lo = setup.Analysis.BandLowHz
	}
	if setup.Analysis.BandHighHz > 0 {
		hi = setup.Analysis.BandHighHz
	}
	if f.bandLowHz > 0 {
		lo = f.bandLowHz
	}
	if f.bandHighHz > 0 {
		hi = f.bandHighHz
	}
	return lo, hi
}

// frfOptions returns the spectral options of the command line and setup.
func (f *logFlags) frfOptions(setup *ingest.Setup) (identify.FRFOptions, error) {
	lo, hi := f.band(setup)
	name := setup.Analysis.Window
	if f.window != "" {
		name = f.window
	}
	w, err := identify.WindowNamed(name)
	if err != nil {
		return identify.FRFOptions{}, usageError{err}
	}
	seg := setup.Analysis.SegmentSamples
	if f.segment != 0 {
		seg = f.segment
	}
	return identify.FRFOptions{BandLowHz: lo, BandHighHz: hi, SegmentLen: seg, Window: w}, nil
}

// channelsOf lists the log channels a setup reads: inputs first, then sensors.
func channelsOf(setup *ingest.Setup) []string {
	var ch []string
	for _, in := range setup.Inputs {
		ch = append(ch, in.Channel)
	}
	for _, s := range setup.Sensors {
		ch = append(ch, s.Channel)
	}
	return ch
}

// openLog opens a log for the setup's channels with the shared options and a
// progress bar when the command's stderr is a terminal. The caller closes the
// reader and calls done. It refuses a setup without sensors and a band that
// is upside down, so every later stage gets a valid one.
func (f *logFlags) openLog(path string, setup *ingest.Setup) (*ingest.Reader, func(), error) {
	if err := setup.CheckForLog(); err != nil {
		return nil, nil, err
	}
	lo, hi := f.band(setup)
	if !(lo > 0 && hi > lo) || math.IsInf(hi, 0) {
		return nil, nil, usageError{fmt.Errorf("the analysis band %g-%g Hz needs 0 < low < high (--band-low, --band-high or [analysis])", lo, hi)}
	}
	opt := ingest.Options{
		Channels:     channelsOf(setup),
		SampleRateHz: setup.Analysis.SampleRateHz,
		StartS:       f.startS,
		EndS:         f.endS,
		Resample:     f.resample,
		BandHighHz:   hi,
	}
	if len(setup.Inputs) > 0 {
		opt.MinDurationS = identify.MinRigRecordS(lo)
	}
	done := func() {}
	if st, err := os.Stat(path); err == nil && f.errOut != nil {
		opt.Progress, done = terminalProgress(f.errOut(), st.Size(), "reading "+path)
	}
	r, err := ingest.Open(path, opt)
	if err != nil {
		done()
		return nil, nil, err
	}
	return r, done, nil
}
