package cli

import (
	"fmt"
	"io"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/ridemodes/ridemodes/ingest"
)

// stdoutName is the output path that means standard output.
const stdoutName = "-"

// writeOutput writes an output file atomically (its folder created when
// missing), or to standard output when path is "-".
func writeOutput(cmd *cobra.Command, path string, write func(io.Writer) error) error {
	if path == stdoutName {
		return write(cmd.OutOrStdout())
	}
	return ingest.WriteAtomic(path, write)
}

// writeData writes data as writeOutput does.
func writeData(cmd *cobra.Command, path string, data []byte) error {
	return writeOutput(cmd, path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// infoOut is where a command prints its summary: standard output, or
// standard error when one of the outputs goes to standard output, so that
// a pipe gets the data alone.
func infoOut(cmd *cobra.Command, outputs ...string) io.Writer {
	for _, p := range outputs {
		if p == stdoutName {
			return cmd.ErrOrStderr()
		}
	}
	return cmd.OutOrStdout()
}

// outName names an output path in messages.
func outName(path string) string {
	if path == stdoutName {
		return "standard output"
	}
	return path
}

// deprecatedNote is the flag annotation that holds an old spelling's note.
const deprecatedNote = "ridemodes-deprecated"

// deprecatedAlias adds old as another name of the flag current, bound to the
// same variable and hidden from the help; using it prints a note on
// standard error (noteDeprecated; cobra's own deprecation note would go to
// standard output, into a piped result). Old spellings stay so for one
// release after a rename.
func deprecatedAlias(cmd *cobra.Command, old, current, why string) {
	f := *cmd.Flags().Lookup(current)
	f.Name, f.Shorthand, f.Hidden = old, "", true
	f.Annotations = map[string][]string{deprecatedNote: {"use --" + current + " (" + why + "); --" + old + " goes in the next release"}}
	cmd.Flags().AddFlag(&f)
}

// noteDeprecated prints the note of every old flag spelling on the command line.
func noteDeprecated(cmd *cobra.Command, _ []string) {
	cmd.Flags().Visit(func(f *pflag.Flag) {
		if note := f.Annotations[deprecatedNote]; note != nil {
			fmt.Fprintf(cmd.ErrOrStderr(), "ridemodes: --%s is deprecated: %s\n", f.Name, note[0])
		}
	})
}
