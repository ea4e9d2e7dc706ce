package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"syscall"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
)

// Version is the program version; release builds set it with
// -ldflags "-X github.com/ridemodes/ridemodes/cmd/cli.Version=v1.2.3".
var Version = ""

func version() string {
	if Version != "" {
		return Version
	}
	if bi, ok := debug.ReadBuildInfo(); ok && bi.Main.Version != "" && bi.Main.Version != "(devel)" {
		return bi.Main.Version
	}
	return "0.1.0-dev"
}

// Exit codes of the contract.
const (
	exitOK      = 0
	exitData    = 1
	exitUsage   = 2
	exitTargets = 3
	// exitInconclusive: done, nothing failed, but a check is inconclusive
	// (its expanded uncertainty reaches across a limit, or a mode it uses
	// is flagged).
	exitInconclusive = 4
	// exitInterrupted follows the shell's convention for a run stopped by
	// SIGINT (128 + 2); no output file is left behind.
	exitInterrupted = 130
)

// usageError marks a mistake in the command line (exit code 2).
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

// errTargetsFailed is returned after a complete run whose target check failed (exit code 3).
var errTargetsFailed = errors.New("a target check failed")

// errInconclusive is returned after a complete run with no failed check but
// an inconclusive one (exit code 4).
var errInconclusive = errors.New("a target check is inconclusive: the uncertainty reaches across a limit or a mode is flagged")

// verdictError turns a result's verdict into the error that sets its exit code.
func verdictError(status string) error {
	switch status {
	case compare.StatusFail:
		return errTargetsFailed
	case compare.StatusInconclusive:
		return errInconclusive
	}
	return nil
}

// usageArgs wraps a cobra positional-argument validator so its errors count as usage errors.
func usageArgs(v cobra.PositionalArgs) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if err := v(cmd, args); err != nil {
			return usageError{fmt.Errorf("%w (see %s --help)", err, cmd.CommandPath())}
		}
		return nil
	}
}

// NewRoot returns the ridemodes command tree.
func NewRoot() *cobra.Command {
	root := &cobra.Command{
		Use:   "ridemodes",
		Short: "Bounce and pitch modes of a car body from rig and drop test logs",
		Long: `ridemodes turns the vertical acceleration logs of a shaker rig test or a drop test
into the car body's bounce and pitch modes (natural frequency, damping ratio,
pitch per bounce, node), sets them beside the design model of a rigid body on
front and rear springs and dampers, and back-calculates the effective ride rates.

Start with "ridemodes demo" for the whole job on an invented example car, or
"ridemodes model --setup car.toml" to see your design model's modes.`,
		Example: `  ridemodes demo
  ridemodes model --setup car.toml
  ridemodes analyze rig.csv --setup car.toml --json result.json --report report/`,
		Version:          version(),
		SilenceUsage:     true,
		SilenceErrors:    true,
		Args:             usageArgs(cobra.NoArgs),
		PersistentPreRun: noteDeprecated,
		RunE: func(cmd *cobra.Command, args []string) error {
			return cmd.Help()
		},
	}
	root.SetVersionTemplate("ridemodes {{.Version}}\n")
	root.SetFlagErrorFunc(func(cmd *cobra.Command, err error) error {
		return usageError{fmt.Errorf("%w (see %s --help)", err, cmd.CommandPath())}
	})
	root.AddCommand(newModelCmd(), newSimulateCmd(), newSpectraCmd(), newAnalyzeCmd(), newCompareCmd(), newDemoCmd(), newBatchCmd(), newHistoryCmd(), newPlanCmd())
	return root
}

// Execute runs the command line with args and returns the exit code.
func Execute(args []string, stdout, stderr io.Writer) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	root := NewRoot()
	root.SetArgs(args)
	root.SetOut(stdout)
	root.SetErr(stderr)
	err := root.ExecuteContext(ctx)
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, context.Canceled):
		fmt.Fprintln(stderr, "ridemodes: interrupted; no file was left half-written")
		return exitInterrupted
	case errors.Is(err, errTargetsFailed):
		fmt.Fprintln(stderr, "ridemodes:", err)
		return exitTargets
	case errors.Is(err, errInconclusive):
		fmt.Fprintln(stderr, "ridemodes:", err)
		return exitInconclusive
	}
	fmt.Fprintln(stderr, "ridemodes:", err)
	var ue usageError
	if errors.As(err, &ue) || isCobraUsage(err) {
		return exitUsage
	}
	return exitData
}

// isCobraUsage recognises the errors cobra itself returns for an unknown
// command or a missing required flag, which do not pass through our hooks.
func isCobraUsage(err error) bool {
	for _, p := range []string{"unknown command", "required flag", "unknown flag", "unknown shorthand flag",
		"if any flags in the group", "none of the others can be"} {
		if strings.Contains(err.Error(), p) {
			return true
		}
	}
	return false
}
