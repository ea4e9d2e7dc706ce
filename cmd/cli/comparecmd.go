package cli

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

func newCompareCmd() *cobra.Command {
	var modesPath, setupPath, jsonPath string
	cmd := &cobra.Command{
		Use:   "compare --modes RESULT.json --setup FILE [--json OUT]",
		Short: "Set measured modes beside the design model and back-calculate the rates",
		Long: `compare takes measured bounce and pitch modes — the result of an earlier
analyze, or a hand-written file with the same "modes" array — and sets them
beside the design model of the setup file: frequency difference in %, damping,
node, pitch per bounce, and the MAC of the mode shapes where shapes were
measured. It back-calculates the effective front and rear ride rates (and the
damping, when damping was measured) that make the model match, with their
uncertainties, judges the setup's [targets] and reports the trade's ride
guidance.

A hand-written modes file needs, per mode, "label" (bounce or pitch) and
"natural_frequency_hz"; "damping_ratio", "pitch_per_bounce_rad_per_m" or
"node_m", and "uncertainty" are optional and used when given.

Exit codes: 0 done; 1 bad data; 2 bad usage; 3 done, but a target failed.`,
		Example: `  ridemodes compare --modes result.json --setup car.toml
  ridemodes compare --modes measured.json --setup car-v2.toml --json compared.json`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			setup, err := ingest.LoadSetup(setupPath)
			if err != nil {
				return err
			}
			if jsonPath != "" && (sameFile(jsonPath, modesPath) || sameFile(jsonPath, setupPath)) {
				return usageError{fmt.Errorf("--json %s would overwrite an input file", jsonPath)}
			}
			measured, err := readModes(modesPath)
			if err != nil {
				return err
			}
			res := &compare.Result{Tool: compare.Tool{Name: "ridemodes", Version: version()},
				Test: measured.Test, Log: measured.Log, Analysis: measured.Analysis, Modes: measured.Modes}
			if sum, err := fileSHA256(setupPath); err == nil {
				res.Setup = &compare.FileRef{Path: setupPath, SHA256: sum}
			}
			failed, err := assess(res, setup)
			if err != nil {
				return fmt.Errorf("%s: %w", modesPath, err)
			}
			printSummary(cmd.OutOrStdout(), res)
			if jsonPath != "" {
				data, err := res.Marshal()
				if err != nil {
					return err
				}
				if err := writeFileAtomic(jsonPath, data); err != nil {
					return err
				}
			}
			if failed {
				return errTargetsFailed
			}
			return nil
		},
	}
	cmd.Flags().StringVar(&modesPath, "modes", "", "measured modes: an analyze result or a file with a \"modes\" array (JSON)")
	cmd.Flags().StringVar(&setupPath, "setup", "", "setup file (TOML) with the design model and targets")
	cmd.Flags().StringVar(&jsonPath, "json", "", "write the result as JSON to this file")
	cmd.MarkFlagRequired("modes")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagFilename("modes", "json")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("json", "json")
	return cmd
}

// readModes reads a result or modes file strictly: unknown keys are errors,
// so a misspelt key is not silently ignored.
func readModes(path string) (*compare.Result, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read the modes file: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var res compare.Result
	if err := dec.Decode(&res); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			line, col := lineCol(data, se.Offset)
			return nil, fmt.Errorf("%s:%d:%d: %v; check the JSON syntax", path, line, col, se)
		case errors.As(err, &te):
			line, col := lineCol(data, te.Offset)
			return nil, fmt.Errorf("%s:%d:%d: key %q: %v", path, line, col, te.Field, err)
		}
		return nil, fmt.Errorf("%s: %v (the file holds a ridemodes result or an object with a \"modes\" array)", path, err)
	}
	if len(res.Modes) == 0 {
		return nil, fmt.Errorf("%s: no \"modes\" array with measured modes", path)
	}
	return &res, nil
}

// lineCol converts a byte offset into a 1-based line and column.
func lineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	before := data[:off]
	line := bytes.Count(before, []byte("\n")) + 1
	col := int(off) - bytes.LastIndexByte(before, '\n')
	return line, col
}
