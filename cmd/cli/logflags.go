package cli

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/ingest"
)

// registerLogFlags adds the flags of every command that reads a log, bound
// to the library's options, and a progress bar on the command's stderr.
func registerLogFlags(cmd *cobra.Command, o *job.Options) {
	fl := cmd.Flags()
	fl.StringVar(&o.SetupPath, "setup", "", "setup `FILE` (TOML): vehicle, sensors, inputs, targets")
	testFlag(cmd, &o.Test, "the `TEST`: rig or drop (default: rig when the setup has [[input]] tables); with drop the inputs are ignored, so one setup serves both tests")
	fl.Float64Var(&o.StartS, "start", 0, "analyse from this time in `SECONDS`, counted from the log's first sample")
	fl.Float64Var(&o.EndS, "end", 0, "analyse up to this time in `SECONDS` (default: to the end of the log)")
	fl.Float64Var(&o.SampleRateHz, "rate", 0, "sample rate in `HZ` of a log without a time column (default from [analysis] sample_rate_hz)")
	fl.BoolVar(&o.Resample, "resample", false, "accept jittery time steps and resample onto a uniform grid (warns)")
	fl.Float64Var(&o.BandLowHz, "band-low", 0, fmt.Sprintf("analysis band, lower edge in `HZ` (default from [analysis] band_low_hz, else %g)", ingest.DefaultBandLowHz))
	fl.Float64Var(&o.BandHighHz, "band-high", 0, fmt.Sprintf("analysis band, upper edge in `HZ` (default from [analysis] band_high_hz, else %g)", ingest.DefaultBandHighHz))
	fl.IntVar(&o.SegmentSamples, "segment-samples", 0, "Welch segment length in samples after decimation, a power of two `N` (default from [analysis] segment_samples, else chosen from the damping)")
	fl.StringVar(&o.Window, "window", "", fmt.Sprintf("spectral `WINDOW`: %s (default from [analysis] window, else %s)", strings.Join(ingest.Windows, ", "), ingest.DefaultWindow))
	deprecatedAlias(cmd, "segment", "segment-samples", "named like the setup key segment_samples")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.RegisterFlagCompletionFunc("window", cobra.FixedCompletions(ingest.Windows, cobra.ShellCompDirectiveNoFileComp))
	o.ToolVersion = version()
	o.Progress = func(path string, size int64) (func(int64, int64), func()) {
		return terminalProgress(cmd.ErrOrStderr(), size, "reading "+path)
	}
}

// outputGuard refuses an output path that names one of the inputs.
func outputGuard(flag, out string, inputs ...string) error {
	for _, in := range inputs {
		if out != "" && ingest.SameFile(out, in) {
			return usageError{fmt.Errorf("--%s %s would overwrite an input file", flag, out)}
		}
	}
	return nil
}

// testFlag adds the --test flag (rig or drop) bound to dst, with shell
// completion of its two values.
func testFlag(cmd *cobra.Command, dst *string, usage string) {
	cmd.Flags().StringVar(dst, "test", "", usage)
	cmd.RegisterFlagCompletionFunc("test", cobra.FixedCompletions([]string{"rig", "drop"}, cobra.ShellCompDirectiveNoFileComp))
}
