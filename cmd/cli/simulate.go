package cli

import (
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

func newSimulateCmd() *cobra.Command {
	var (
		setupPath, test, outPath string
		o                        = simulate.Defaults("rig")
		d                        = simulate.Defaults("drop")
	)
	cmd := &cobra.Command{
		Use:   "simulate --setup FILE --test rig|drop --out LOG.csv",
		Short: "Write a synthetic rig or drop test log from the design model",
		Long: `simulate writes the log that the setup file's design model would produce, in
the CSV dialect that analyze reads, for planning a test and for self-checks.

  rig:  every [[input]] channel logs its axle's pan acceleration, every [[sensor]]
        the body's vertical acceleration. Drives: random (independent band-limited
        noise front and rear), sweep (a logarithmic sine sweep, in phase for the
        first half of the log and in anti-phase for the second) or road (the rear
        is the front delayed by wheelbase/speed). The response is exact: computed
        in the frequency domain from the model's transmissibility.
  drop: the car rests on blocks, then both axles drop at once and the body
        decays freely; only the [[sensor]] channels are logged. With
        --rear-delay the front axle drops first and the rear one the given
        time later, as when the car is rolled forward off the blocks, which
        excites pitch far more.

Noise is white and Gaussian, its standard deviation the given fraction of each
channel's RMS (rig) or peak (drop). The same flags and seed give the same file,
byte for byte. Synthetic logs are not measurements.

` + compare.Cautions,
		Example: `  ridemodes simulate --setup car.toml --test rig --out rig.csv --duration 300 --noise 0.05
  ridemodes simulate --setup car.toml --test drop --out drop.csv --rate 500 --units g
  ridemodes simulate --setup car.toml --test drop --out rolled.csv --rear-delay 0.5`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runSimulate(cmd, setupPath, test, outPath, o, d)
		},
	}
	f := cmd.Flags()
	f.StringVar(&setupPath, "setup", "", "setup file (TOML) describing the vehicle, sensors and inputs")
	f.StringVar(&test, "test", "", "kind of test: rig or drop")
	f.StringVar(&outPath, "out", "", "log file to write (CSV)")
	f.Float64Var(&o.DurationS, "duration", o.DurationS, fmt.Sprintf("log length in s (drop default %g)", d.DurationS))
	f.Float64Var(&o.RateHz, "rate", o.RateHz, "sample rate in Hz")
	f.Uint64Var(&o.Seed, "seed", o.Seed, "seed of the random numbers (drive and noise)")
	f.Float64Var(&o.NoiseFraction, "noise", 0, "sensor noise: standard deviation as a fraction of each channel's RMS (rig) or peak (drop)")
	f.Float64Var(&o.OffsetMPerS2, "offset", 0, "DC offset added to every channel, m/s^2")
	f.StringVar(&o.Units, "units", o.Units, "units of the written channels: m/s^2, g, or mixed (alternating)")
	f.StringVar(&o.Drive, "drive", o.Drive, "rig drive: random, sweep or road")
	f.Float64Var(&o.BandLowHz, "band-low", o.BandLowHz, "rig drive band, lower edge in Hz")
	f.Float64Var(&o.BandHighHz, "band-high", o.BandHighHz, "rig drive band, upper edge in Hz")
	f.Float64Var(&o.DriveRMSMPerS2, "drive-rms", o.DriveRMSMPerS2, "RMS pan acceleration per axle, m/s^2")
	f.Float64Var(&o.RoadSpeedMPerS, "road-speed", o.RoadSpeedMPerS, "road drive: vehicle speed in m/s")
	f.Float64Var(&d.DropHeightM, "drop-height", d.DropHeightM, "drop: height of the blocks in m")
	f.Float64Var(&d.PreTriggerS, "pre-trigger", d.PreTriggerS, "drop: rest before the release in s")
	f.Float64Var(&d.RearDelayS, "rear-delay", d.RearDelayS, "drop: the rear axle drops this many seconds after the front, as when the car is rolled forward off blocks (wheelbase / rolling speed)")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagRequired("test")
	cmd.MarkFlagRequired("out")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("out", "csv")
	cmd.RegisterFlagCompletionFunc("test", cobra.FixedCompletions([]string{"rig", "drop"}, cobra.ShellCompDirectiveNoFileComp))
	return cmd
}

// Flags that belong to one kind of test only.
var (
	rigOnlyFlags  = []string{"drive", "band-low", "band-high", "drive-rms", "road-speed"}
	dropOnlyFlags = []string{"drop-height", "pre-trigger", "rear-delay"}
)

// testOnlyFlags refuses a flag given for the other kind of test, which would
// otherwise be ignored without a word.
func testOnlyFlags(cmd *cobra.Command, test string) error {
	other := dropOnlyFlags
	if test == "drop" {
		other = rigOnlyFlags
	}
	for _, name := range other {
		if cmd.Flags().Changed(name) {
			return usageError{fmt.Errorf("--%s does not apply to a %s test (see %s --help)", name, test, cmd.CommandPath())}
		}
	}
	return nil
}

// runSimulate writes the log of a test simulated with the rig options o or
// the drop options d (the shared flags land in o).
func runSimulate(cmd *cobra.Command, setupPath, test, outPath string, o, d simulate.Options) error {
	setup, err := ingest.LoadSetup(setupPath)
	if err != nil {
		return err
	}
	if err := setup.CheckForLog(); err != nil {
		return err
	}
	if err := outputGuard("out", outPath, setupPath); err != nil {
		return err
	}
	if err := testOnlyFlags(cmd, test); err != nil {
		return err
	}
	v := compare.DesignOf(setup.Vehicle)
	var log *simulate.Log
	switch test {
	case "rig":
		log, err = simulate.Rig(v, setup.Sensors, setup.Inputs, o)
	case "drop":
		// The shared flags apply to a drop too; its duration keeps the drop default unless given.
		dd := d
		dd.Seed, dd.NoiseFraction, dd.OffsetMPerS2, dd.Units, dd.RateHz = o.Seed, o.NoiseFraction, o.OffsetMPerS2, o.Units, o.RateHz
		if cmd.Flags().Changed("duration") {
			dd.DurationS = o.DurationS
		}
		log, err = simulate.Drop(v, setup.Sensors, dd)
	default:
		return usageError{fmt.Errorf(`--test must be "rig" or "drop" (got %q)`, test)}
	}
	if err != nil {
		return err
	}
	if err := ingest.WriteAtomic(outPath, func(w io.Writer) error {
		return ingest.WriteLog(w, log.Notes, log.RateHz, 0, log.Columns)
	}); err != nil {
		return err
	}
	n := len(log.Columns[0].Data)
	fmt.Fprintf(cmd.OutOrStdout(), "wrote %s: %s test, %d channels, %d samples at %g Hz (%.1f s)\n",
		outPath, test, len(log.Columns), n, log.RateHz, float64(n)/log.RateHz)
	return nil
}
