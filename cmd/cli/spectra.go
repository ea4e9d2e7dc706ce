package cli

import (
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/identify/spectral"
)

func newSpectraCmd() *cobra.Command {
	var (
		o       job.Options
		csvPath string
	)
	cmd := &cobra.Command{
		Use:   "spectra LOG --setup FILE --csv OUT",
		Short: "Write FRFs and coherence (or auto and cross spectra) of a log as a table",
		Long: `spectra reads a log in constant memory, low-passes and decimates it when it is
sampled far above the band, and estimates Welch-averaged spectra with the
segment length chosen from the damping (or given with --segment-samples).

With [[input]] channels in the setup (a rig test) it writes, per body sensor and
pan, the FRF (two-input H1: front and rear pans together), magnitude, phase,
real and imaginary parts, coherence and one-standard-deviation error bands.
Two pans on one axle are averaged into that axle's input. Without inputs it
writes the auto spectra (PSD) of the sensors and their cross spectra.

The choices made (decimation, segment length, resolution, averages, expected
resolution bias) are printed.

` + compare.Cautions,
		Example: `  ridemodes spectra rig.csv --setup car.toml --csv frf.csv
  ridemodes spectra rig.csv --setup car.toml --csv frf.csv --start 30 --band-high 3`,
		Args: usageArgs(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.LogPath = args[0]
			if err := outputGuard("csv", csvPath, o.LogPath, o.SetupPath); err != nil {
				return err
			}
			res, sum, err := job.Spectra(cmd.Context(), o)
			if err != nil {
				return libraryError(err)
			}
			if err := writeOutput(cmd, csvPath, func(w io.Writer) error {
				if res.FRF != nil {
					return spectral.WriteFRFTable(w, res.FRF)
				}
				return spectral.WriteSpectraTable(w, res.Spectra)
			}); err != nil {
				return err
			}
			out := infoOut(cmd, csvPath)
			fmt.Fprintf(out, "read %s: %d samples at %.6g Hz (%.1f s)\n", o.LogPath, sum.Samples, sum.SampleRateHz, sum.DurationS)
			for _, w := range sum.Warnings {
				fmt.Fprintf(out, "warning: %s\n", w)
			}
			for _, s := range res.Reasons {
				fmt.Fprintf(out, "choice: %s\n", s)
			}
			for _, s := range res.Warnings {
				fmt.Fprintf(out, "warning: %s\n", s)
			}
			what := "auto and cross spectra"
			if res.FRF != nil {
				what = "FRFs with coherence and error bands"
			}
			fmt.Fprintf(out, "wrote %s: %s, %d frequencies at %.4g Hz spacing\n", outName(csvPath), what,
				len(res.Spectra.FreqsHz), res.Spectra.ResolutionHz())
			return nil
		},
	}
	registerLogFlags(cmd, &o)
	cmd.Flags().StringVar(&csvPath, "csv", "", "table `FILE` to write (CSV; - for standard output)")
	cmd.MarkFlagRequired("csv")
	cmd.MarkFlagFilename("csv", "csv")
	return cmd
}
