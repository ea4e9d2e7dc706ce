package cli

import (
	"embed"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/batch"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
	"github.com/ridemodes/ridemodes/plots"
)

// demoFiles is the invented demo scenario: the car's design setup, which
// serves the rig and the drop test, and the car as built, from which the
// logs are simulated.
//
//go:embed demo/design.toml demo/built.toml
var demoFiles embed.FS

// Demo test conditions: a 5-minute rig run with 5 % noise on every channel
// and mixed units, and a drop with 2 % noise, both on an invented test date
// before the campaign's runs; fixed seeds, so the demo gives the same numbers
// on every machine.
const (
	demoRigDurationS = 300
	demoCampaignRunS = 180
	demoRigNoise     = 0.05
	demoDropNoise    = 0.02
	demoSeed         = 20261201
	demoCampaignRuns = 6
	demoTestDate     = "2026-02-27"
)

func newDemoCmd() *cobra.Command {
	var outDir string
	cmd := &cobra.Command{
		Use:   "demo [--out DIR]",
		Short: "Run the whole job on an invented example car, report included",
		Long: `demo writes an invented scenario into a folder and runs the whole job on it:
the design setup of a prototype hatchback, a rig log and a drop log simulated
from the car as it was built (stiffer rear springs and softer dampers than the
design says, with sensor noise), then analyze on both logs with the JSON results
and HTML reports, and a small campaign through batch. It prints every command
it runs (simulate, analyze, batch): rerun them to try the options. Open
report/report.html afterwards. Run again into the same folder, it replaces
its own files; a folder holding anything else is refused.

The scenario is made up; its logs are synthetic, not measurements. The demo
exits 0 when the whole job ran; the verdicts against the setup's targets are
in its output and results (analyze exits 3 or 4 on them).

` + compare.Cautions,
		Example: `  ridemodes demo
  ridemodes demo --out /tmp/ridemodes-demo`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runDemo(cmd, outDir)
		},
	}
	cmd.Flags().StringVar(&outDir, "out", "ridemodes-demo", "`DIR` for the demo: new, empty, or one an earlier demo wrote (its files are replaced)")
	cmd.MarkFlagDirname("out")
	return cmd
}

// demoOwnNames lists what the demo writes into its folder, so that a rerun
// replaces it and touches nothing else.
func demoOwnNames() []string {
	names := []string{"design.toml", "built.toml", "built-respring.toml", "rig.csv", "drop.csv", "result.json",
		"drop-result.json", "report", "drop-report", "campaign.csv", "campaign"}
	for i := range demoCampaignRuns {
		names = append(names, fmt.Sprintf("run-%d.csv", i+1))
	}
	return names
}

// prepareDemoDir creates dir, or accepts one that holds only what an
// earlier demo wrote (its campaign store is removed, so the rerun's store
// holds its own runs only): the demo never touches a user's files.
func prepareDemoDir(dir string) error {
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return os.MkdirAll(dir, 0o755)
	case err != nil:
		return err
	}
	for _, e := range entries {
		if !slices.Contains(demoOwnNames(), e.Name()) {
			return usageError{fmt.Errorf("%s holds %s, which the demo did not write; give --out a new or empty folder, "+
				"or one an earlier demo wrote", dir, e.Name())}
		}
	}
	for _, suffix := range []string{"", "-wal", "-shm"} {
		if err := os.Remove(filepath.Join(dir, "campaign", "campaign.sqlite"+suffix)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
	}
	return nil
}

// runCommand prints a command line and runs it as the user would type it,
// its output on cmd's; a verdict other than a pass (exit 3 or 4) is the
// demo's output, not its failure.
func runCommand(cmd *cobra.Command, args ...string) error {
	fmt.Fprintf(cmd.OutOrStdout(), "\n$ ridemodes %s\n", shellWords(args))
	root := NewRoot()
	root.SetArgs(args)
	root.SetOut(cmd.OutOrStdout())
	root.SetErr(cmd.ErrOrStderr())
	err := root.ExecuteContext(cmd.Context())
	switch {
	case errors.Is(err, errTargetsFailed):
		fmt.Fprintf(cmd.OutOrStdout(), "\nThe finding: the car as built is not the car as designed. Here %s exits %d (%v):\n"+
			"a script or CI job stops there. The demo itself exits 0: it ran as it should.\n", args[0], exitTargets, errTargetsFailed)
		return nil
	case errors.Is(err, errInconclusive):
		return nil
	}
	return err
}

// shellSafe matches a word a POSIX shell takes as it is.
var shellSafe = regexp.MustCompile(`^[\w./:=+-]+$`)

// shellWords joins args for a POSIX shell, quoting those that need it.
func shellWords(args []string) string {
	out := make([]string, len(args))
	for i, a := range args {
		out[i] = a
		if !shellSafe.MatchString(a) {
			out[i] = "'" + strings.ReplaceAll(a, "'", `'\''`) + "'"
		}
	}
	return strings.Join(out, " ")
}

func runDemo(cmd *cobra.Command, dir string) error {
	out := cmd.OutOrStdout()
	if err := prepareDemoDir(dir); err != nil {
		return err
	}
	for _, name := range []string{"design.toml", "built.toml"} {
		data, err := demoFiles.ReadFile("demo/" + name)
		if err != nil {
			return err
		}
		if err := ingest.WriteFileAtomic(filepath.Join(dir, name), data); err != nil {
			return err
		}
	}
	if err := writeRespring(dir); err != nil {
		return err
	}
	at := func(name string) string { return filepath.Join(dir, name) }
	fmt.Fprintf(out, "ridemodes demo: an invented prototype, HX-2 mule 3, in %s\n", dir)
	fmt.Fprintf(out, "  design.toml        the design model, sensors, rig inputs and targets: one setup for both tests\n")
	fmt.Fprintf(out, "  rig.csv, drop.csv  logs simulated from the car as built (built.toml): rear rate +10 %%, dampers -20 %%\n")
	fmt.Fprintf(out, "\n=== The logs, simulated from the car as built\n")
	seed := strconv.Itoa(demoSeed)
	for _, args := range [][]string{
		{"simulate", "--setup", at("built.toml"), "--test", "rig", "--out", at("rig.csv"), "--duration", strconv.Itoa(demoRigDurationS),
			"--noise", fmt.Sprint(demoRigNoise), "--units", simulate.UnitsMixed, "--seed", seed, "--test-date", demoTestDate},
		{"simulate", "--setup", at("built.toml"), "--test", "drop", "--out", at("drop.csv"), "--rate", "500",
			"--noise", fmt.Sprint(demoDropNoise), "--seed", seed, "--test-date", demoTestDate},
	} {
		if err := runCommand(cmd, args...); err != nil {
			return err
		}
	}
	for _, run := range []struct{ title, log, test, json, report string }{
		{"Rig test", "rig.csv", "rig", "result.json", "report"},
		{"Drop test", "drop.csv", "drop", "drop-result.json", "drop-report"},
	} {
		fmt.Fprintf(out, "\n=== %s\n", run.title)
		if err := runCommand(cmd, "analyze", at(run.log), "--setup", at("design.toml"), "--test", run.test,
			"--json", at(run.json), "--report", at(run.report)); err != nil {
			return err
		}
	}
	if err := demoCampaign(cmd, dir); err != nil {
		return err
	}
	fmt.Fprintf(out, "\nReports: %s, %s and the campaign's trend report %s\n", filepath.Join(dir, "report", "report.html"),
		filepath.Join(dir, "drop-report", "report.html"), filepath.Join(dir, "campaign", batch.ReportDir, plots.TrendReportFile))
	return nil
}

// rearRateLine is the built setup's rear ride rate line; leadingComments
// its opening comment, which describes the car before the change.
var (
	rearRateLine    = regexp.MustCompile(`(?m)^rear_rate_n_per_m\s*=.*$`)
	leadingComments = regexp.MustCompile(`^(#[^\n]*\n)+`)
)

// writeRespring writes built-respring.toml: the car as built with its rear
// springs changed back to the design rate, the car of the campaign's last
// runs, and checks that it reads as that.
func writeRespring(dir string) error {
	design, err := ingest.LoadSetup(filepath.Join(dir, "design.toml"))
	if err != nil {
		return err
	}
	built, err := os.ReadFile(filepath.Join(dir, "built.toml"))
	if err != nil {
		return err
	}
	if !rearRateLine.Match(built) {
		return errors.New("demo: built.toml gives no rear_rate_n_per_m line to change")
	}
	rate := design.Vehicle.RearRateNPerM
	text := rearRateLine.ReplaceAll(built, []byte(fmt.Sprintf("rear_rate_n_per_m = %g  # back to the design rate after the spring change", rate)))
	text = append([]byte("# ridemodes demo: the HX-2 mule 3 as built, after its rear springs were changed back to the\n"+
		"# design rate: the car of the campaign's last three runs. Invented.\n"), leadingComments.ReplaceAll(text, nil)...)
	path := filepath.Join(dir, "built-respring.toml")
	if s, err := ingest.ParseSetup(path, text); err != nil || s.Vehicle.RearRateNPerM != rate {
		return fmt.Errorf("demo: the changed setup does not read back with the design rear rate: %v", err)
	}
	return ingest.WriteFileAtomic(path, text)
}

// demoCampaign simulates six shorter rig runs of the car over two weeks,
// the last three after its rear springs were changed back to the design
// rate, writes their manifest and runs batch on it: the store and the trend
// report then show the step.
func demoCampaign(cmd *cobra.Command, dir string) error {
	fmt.Fprintf(cmd.OutOrStdout(), "\n=== Campaign: six rig runs, the last three after a rear spring change\n")
	manifest := "log,setup,car,run,test,date,notes\n"
	for i := range demoCampaignRuns {
		setup, note := "built.toml", "as built"
		if i >= demoCampaignRuns/2 {
			setup, note = "built-respring.toml", "after the rear spring change"
		}
		name, date := fmt.Sprintf("run-%d.csv", i+1), fmt.Sprintf("2026-03-%02d", 2+2*i)
		if err := runCommand(cmd, "simulate", "--setup", filepath.Join(dir, setup), "--test", "rig", "--out", filepath.Join(dir, name),
			"--duration", strconv.Itoa(demoCampaignRunS), "--noise", fmt.Sprint(demoRigNoise), "--seed", strconv.Itoa(demoSeed+i+1),
			"--test-date", date); err != nil {
			return err
		}
		manifest += fmt.Sprintf("%s,design.toml,HX-2 mule 3,%d,rig,%s,%s\n", name, i+1, date, note)
	}
	path := filepath.Join(dir, "campaign.csv")
	if err := ingest.WriteFileAtomic(path, []byte(manifest)); err != nil {
		return err
	}
	return runCommand(cmd, "batch", "--manifest", path, "--out", filepath.Join(dir, "campaign"))
}
