package cli

import (
	"fmt"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

func newSimulateCmd() *cobra.Command {
	var (
		setupPath, test, outPath string
		rig, drop                = simulate.Defaults("rig"), simulate.Defaults("drop")
		o                        = rig // rig and drop options in one, the duration by the test
	)
	cmd := &cobra.Command{
		Use:   "simulate --setup FILE --test rig|drop --out LOG.csv",
		Short: "Write a synthetic rig or drop test log from the design model",
		Long: `simulate writes the log that the setup file's design model would produce, in
the CSV dialect that analyze reads, for planning a test and for self-checks.

  rig:  every [[input]] channel logs its axle's pan acceleration, every [[sensor]]
        the body's vertical acceleration. Drives, over the drive band
        (--drive-band-low to --drive-band-high): random (independent noise front
        and rear), sweep (a logarithmic sine sweep, in phase for the first half
        of the log and in anti-phase for the second) or road (the rear is the
        front delayed by wheelbase/speed). The response is exact: computed
        in the frequency domain from the model's transmissibility.
  drop: the car rests on blocks, then both axles drop at once and the body
        decays freely; only the [[sensor]] channels are logged. With
        --rear-delay the front axle drops first and the rear one the given
        time later, as when the car is rolled forward off the blocks, which
        excites pitch far more.

Noise is white and Gaussian, its standard deviation the given fraction of each
channel's RMS (rig) or peak (drop). The same flags and seed give the same file,
byte for byte. Synthetic logs are not measurements. The setup must give both
axles' damping (an undamped body's response has no bound), and a log shorter
than analyze needs for the setup gets a warning.

` + compare.Cautions,
		Example: `  ridemodes simulate --setup car.toml --test rig --out rig.csv --duration 300 --noise 0.05
  ridemodes simulate --setup car.toml --test drop --out drop.csv --rate 500 --units g
  ridemodes simulate --setup car.toml --test drop --out rolled.csv --rear-delay 0.5`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runSimulate(cmd, setupPath, test, outPath, &o)
		},
	}
	o.DurationS, o.DropHeightM, o.PreTriggerS = 0, drop.DropHeightM, drop.PreTriggerS
	f := cmd.Flags()
	f.StringVar(&setupPath, "setup", "", "setup `FILE` (TOML) describing the vehicle, sensors and inputs")
	testFlag(cmd, &test, "kind of `TEST`: rig or drop")
	f.StringVar(&outPath, "out", "", "log `FILE` to write (CSV; - for standard output)")
	f.Float64Var(&o.DurationS, "duration", 0, fmt.Sprintf("log length in `SECONDS` (default %g for a rig test, %g for a drop)", rig.DurationS, drop.DurationS))
	f.Float64Var(&o.RateHz, "rate", o.RateHz, "sample rate in `HZ`")
	f.Uint64Var(&o.Seed, "seed", o.Seed, "seed `N` of the random numbers (drive and noise): the same seed, the same log")
	f.Float64Var(&o.NoiseFraction, "noise", 0, "sensor noise: its standard deviation as a `FRACTION` from 0 to 1 of each channel's RMS (rig) or peak (drop); 0.05 is 5 %")
	f.Float64Var(&o.OffsetMPerS2, "offset", 0, "DC offset added to every channel, in `M/S^2`")
	f.StringVar(&o.Units, "units", o.Units, "`UNITS` of the written channels: m/s^2, g, or mixed (alternating)")
	f.StringVar(&o.Drive, "drive", o.Drive, "rig drive `KIND`: random, sweep or road")
	f.Float64Var(&o.BandLowHz, "drive-band-low", o.BandLowHz, "rig drive band, lower edge in `HZ`")
	f.Float64Var(&o.BandHighHz, "drive-band-high", o.BandHighHz, "rig drive band, upper edge in `HZ`")
	f.Float64Var(&o.DriveRMSMPerS2, "drive-rms", o.DriveRMSMPerS2, "RMS pan acceleration per axle, in `M/S^2`")
	f.Float64Var(&o.RoadSpeedMPerS, "road-speed", o.RoadSpeedMPerS, "road drive: vehicle speed in `M/S`")
	f.Float64Var(&o.DropHeightM, "drop-height", o.DropHeightM, "drop: height of the blocks in `METRES`")
	f.Float64Var(&o.PreTriggerS, "pre-trigger", o.PreTriggerS, "drop: rest before the release in `SECONDS`")
	f.StringVar(&o.TestDate, "test-date", "", "write `YYYY-MM-DD` into the log's notes as its test date (the report shows it)")
	f.Float64Var(&o.RearDelayS, "rear-delay", 0, "drop: the rear axle drops this many `SECONDS` after the front, as when the car is rolled forward off blocks (wheelbase / rolling speed)")
	deprecatedAlias(cmd, "band-low", "drive-band-low", "the drive band has its own name, apart from analyze's analysis band")
	deprecatedAlias(cmd, "band-high", "drive-band-high", "the drive band has its own name, apart from analyze's analysis band")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagRequired("test")
	cmd.MarkFlagRequired("out")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("out", "csv")
	return cmd
}

// Flags that belong to one kind of test only (old spellings included).
var (
	rigOnlyFlags  = []string{"drive", "drive-band-low", "drive-band-high", "band-low", "band-high", "drive-rms", "road-speed"}
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

// runSimulate writes the log of a test simulated with the options o.
func runSimulate(cmd *cobra.Command, setupPath, test, outPath string, o *simulate.Options) error {
	setup, err := ingest.LoadSetup(setupPath)
	if err != nil {
		return err
	}
	if err := outputGuard("out", outPath, setupPath); err != nil {
		return err
	}
	if err := testOnlyFlags(cmd, test); err != nil {
		return err
	}
	log, err := simulate.Run(setup, test, *o)
	if err != nil {
		return libraryError(err)
	}
	if err := writeOutput(cmd, outPath, log.Write); err != nil {
		return err
	}
	n := len(log.Columns[0].Data)
	if w := job.ShortLogWarning(setup, test, float64(n)/log.RateHz, o.PreTriggerS, o.RearDelayS); w != "" {
		fmt.Fprintln(cmd.ErrOrStderr(), "warning:", w)
	}
	fmt.Fprintf(infoOut(cmd, outPath), "wrote %s: %s test, %d channels, %d samples at %g Hz (%.1f s)\n",
		outName(outPath), test, len(log.Columns), n, log.RateHz, float64(n)/log.RateHz)
	return nil
}
