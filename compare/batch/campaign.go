package batch

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/ingest"
)

// Item is one log of a campaign and how to analyse it.
type Item struct {
	// Log and Setup are the paths of the log and of the car's setup file
	// (a manifest's paths joined to the manifest's folder).
	Log, Setup string
	// Car and Run identify the run in the summary and the store.
	Car, Run string
	// Test is "rig", "drop" or "" (from the setup: rig when it has
	// [[input]] tables).
	Test string
	// Meta holds the values of the campaign's MetaColumns, in their order.
	Meta []string
	// Line is the item's line in its manifest (0 for command-line inputs).
	Line int
	// setupColumn is the setup cell's column in the manifest, for messages.
	setupColumn int
}

// Campaign is the ordered list of logs to analyse.
type Campaign struct {
	Items []Item
	// MetaColumns names the manifest's metadata columns (none for
	// command-line inputs).
	MetaColumns []string
	// Manifest is the manifest's path ("" for command-line inputs).
	Manifest string
	// setups holds every setup the items name, loaded once.
	setups map[string]*setupFile
}

// setupFile is a loaded setup and the SHA-256 of its content.
type setupFile struct {
	setup  *ingest.Setup
	sha256 string
}

// Expand makes the campaign of command-line inputs, all analysed with the
// setup at setupPath and test ("rig", "drop" or "": from the setup). Each
// input is a log file (any name), a folder (every file in it whose name ends
// in .csv, any case; sub-folders are not searched) or a glob pattern of
// path/filepath.Match (quoted, so that the shell leaves it alone) whose
// matches count as inputs. The logs are sorted by path, each once. A log's
// run is its file name without the extension and its car the setup's
// [vehicle] name.
func Expand(inputs []string, setupPath, test string) (*Campaign, error) {
	if err := checkTest(test); err != nil {
		return nil, err
	}
	var logs []string
	for _, in := range inputs {
		found, err := expandInput(in, true)
		if err != nil {
			return nil, err
		}
		logs = append(logs, found...)
	}
	for i := range logs {
		logs[i] = filepath.Clean(logs[i])
	}
	slices.Sort(logs)
	logs = slices.Compact(logs)
	if len(logs) == 0 {
		return nil, fmt.Errorf("no log to analyse in %s: a folder's logs are its *.csv files", strings.Join(inputs, " "))
	}
	sf, err := loadSetup(setupPath)
	if err != nil {
		return nil, err
	}
	c := &Campaign{setups: map[string]*setupFile{setupPath: sf}}
	for _, log := range logs {
		run := strings.TrimSuffix(filepath.Base(log), filepath.Ext(log))
		c.Items = append(c.Items, Item{Log: log, Setup: setupPath, Car: sf.setup.Vehicle.Name, Run: run, Test: test})
	}
	return c, nil
}

// checkTest refuses a test other than rig, drop or "" with a
// *compare.OptionError: the caller's mistake.
func checkTest(test string) error {
	if test != "" && test != identify.TestRig && test != identify.TestDrop {
		return &compare.OptionError{Err: fmt.Errorf("test %q: choose rig or drop (or leave it to the setup)", test)}
	}
	return nil
}

// expandInput lists the logs of one input; glob says whether a pattern is
// allowed (not inside a pattern's matches).
func expandInput(in string, glob bool) ([]string, error) {
	st, err := os.Stat(in)
	switch {
	case err == nil && st.IsDir():
		return csvFiles(in)
	case err == nil:
		return []string{in}, nil
	case glob && strings.ContainsAny(in, `*?[`):
		matches, err := filepath.Glob(in)
		if err != nil {
			return nil, fmt.Errorf("%s: not a valid pattern (%w)", in, err)
		}
		if len(matches) == 0 {
			return nil, fmt.Errorf("%s: no file matches the pattern", in)
		}
		var logs []string
		for _, m := range matches {
			found, err := expandInput(m, false)
			if err != nil {
				return nil, err
			}
			logs = append(logs, found...)
		}
		return logs, nil
	case errors.Is(err, fs.ErrNotExist):
		return nil, fmt.Errorf("%s: no such log file or folder", in)
	}
	return nil, err
}

// csvFiles lists the regular files of dir whose names end in .csv.
func csvFiles(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var logs []string
	for _, e := range entries {
		if !strings.EqualFold(filepath.Ext(e.Name()), ".csv") {
			continue
		}
		path := filepath.Join(dir, e.Name())
		if st, err := os.Stat(path); err == nil && st.Mode().IsRegular() {
			logs = append(logs, path)
		}
	}
	return logs, nil
}

// setupLoadError is a setup that cannot be loaded, at its first item.
type setupLoadError struct {
	item int
	err  error
}

func (e *setupLoadError) Error() string { return e.err.Error() }
func (e *setupLoadError) Unwrap() error { return e.err }

// loadSetups returns the setups that items name: those in loaded (which
// it does not change), and the others read and hashed once each.
func loadSetups(loaded map[string]*setupFile, items []Item) (map[string]*setupFile, error) {
	setups := maps.Clone(loaded)
	if setups == nil {
		setups = map[string]*setupFile{}
	}
	for i, it := range items {
		if _, ok := setups[it.Setup]; ok {
			continue
		}
		sf, err := loadSetup(it.Setup)
		if err != nil {
			return nil, &setupLoadError{i, err}
		}
		setups[it.Setup] = sf
	}
	return setups, nil
}

// loadSetup reads a setup and hashes its content.
func loadSetup(path string) (*setupFile, error) {
	setup, err := ingest.LoadSetup(path)
	if err != nil {
		return nil, err
	}
	sum, err := ingest.FileSHA256(path)
	if err != nil {
		return nil, err
	}
	return &setupFile{setup: setup, sha256: sum}, nil
}

// Select returns the campaign's shard: every s.Count-th item of its order,
// starting with the s.Index-th. The zero Shard selects every item.
func (c *Campaign) Select(s Shard) *Campaign {
	if s.Count <= 1 {
		return c
	}
	out := *c
	out.Items = nil
	for i := s.Index - 1; i < len(c.Items); i += s.Count {
		out.Items = append(out.Items, c.Items[i])
	}
	return &out
}

// ResultName is the file name of an item's result JSON under results/: the
// log's file name without its extension, then 16 hex digits of the SHA-256
// of the log's path, the setup's path and the test. It is the same in every
// run of the campaign and shard, and differs between the items of a
// campaign (a manifest refuses two rows with the same log, setup and test;
// Expand lists each log once) unless 64-bit hash prefixes collide.
func (it Item) ResultName() string {
	h := sha256.Sum256([]byte(filepath.ToSlash(it.Log) + "\x00" + filepath.ToSlash(it.Setup) + "\x00" + it.Test))
	stem := strings.TrimSuffix(filepath.Base(it.Log), filepath.Ext(it.Log))
	return stem + "-" + hex.EncodeToString(h[:8]) + ".json"
}
