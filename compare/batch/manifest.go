package batch

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// ManifestError locates a mistake in a manifest. Line and Column are 1-based
// as an editor counts (Column in bytes; 0 when the mistake is the whole
// file's).
type ManifestError struct {
	Path         string
	Line, Column int
	Msg          string
	// Err is the underlying error (a setup file's, a CSV syntax error), if any.
	Err error
}

func (e *ManifestError) Error() string {
	msg := e.Msg
	if e.Err != nil {
		msg += ": " + e.Err.Error()
	}
	if e.Line == 0 {
		return e.Path + ": " + msg
	}
	return fmt.Sprintf("%s:%d:%d: %s", e.Path, e.Line, e.Column, msg)
}

func (e *ManifestError) Unwrap() error { return e.Err }

// Manifest columns. The first four are the contract's; test is ours.
const (
	colLog   = "log"
	colSetup = "setup"
	colCar   = "car"
	colRun   = "run"
	// colTest, when present, says "rig" or "drop" for its row; an empty
	// cell leaves the choice to the command's --test, then to the setup.
	colTest = "test"
)

// manifestColumns are the columns that are not metadata.
var manifestColumns = []string{colLog, colSetup, colCar, colRun, colTest}

// ReadManifest reads the manifest at path and loads every setup it names.
// Its paths are relative to the manifest's folder (or absolute). Rows
// whose test cell is empty (or that have none) take test ("rig", "drop", or
// "": from the setup). A setup that cannot be loaded is an error at its
// first row, so a mistake stops the campaign before any log is analysed.
func ReadManifest(path, test string) (*Campaign, error) {
	if err := checkTest(test); err != nil {
		return nil, err
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read the manifest: %w", err)
	}
	c, err := ParseManifest(bytes.NewReader(data), path)
	if err != nil {
		return nil, err
	}
	c.Manifest = path
	dir := filepath.Dir(path)
	for i := range c.Items {
		it := &c.Items[i]
		it.Log, it.Setup = joinPath(dir, it.Log), joinPath(dir, it.Setup)
		if it.Test == "" {
			it.Test = test
		}
	}
	if c.setups, err = loadSetups(nil, c.Items); err != nil {
		var se *setupLoadError
		errors.As(err, &se)
		it := c.Items[se.item]
		return nil, &ManifestError{Path: path, Line: it.Line, Column: it.setupColumn, Msg: "setup " + it.Setup, Err: se.err}
	}
	return c, nil
}

func joinPath(dir, p string) string {
	if filepath.IsAbs(p) {
		return filepath.Clean(p)
	}
	return filepath.Join(dir, p)
}

// ParseManifest parses a manifest's text; name is its path in messages. It
// does not touch the files the manifest names: the items keep the paths as
// written. The rules: a header with the columns log, setup, car and run
// (any order, each once), an optional test column, and any further
// metadata columns with unique names that are not summary columns; every
// row as many cells as the header, with log, setup, car and run not empty
// and test empty, "rig" or "drop"; no two rows with the same log, setup
// and test. Cells are trimmed of spaces, lines starting with # are
// comments, blank lines are skipped, a UTF-8 byte order mark is ignored.
// Every mistake is a *ManifestError with its line and column.
func ParseManifest(r io.Reader, name string) (*Campaign, error) {
	br := bufio.NewReader(r)
	if bom, err := br.Peek(3); err == nil && string(bom) == "\ufeff" {
		br.Discard(3)
	}
	cr := csv.NewReader(br)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &ManifestError{Path: name, Msg: "the manifest is empty; its first line is the header log,setup,car,run"}
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	cols, meta, err := parseHeader(cr, name, header)
	if err != nil {
		return nil, err
	}
	c := &Campaign{MetaColumns: meta}
	seen := map[[3]string]int{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(name, err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(cols) {
			return nil, &ManifestError{Path: name, Line: line, Column: 1,
				Msg: fmt.Sprintf("%d cells, but the header has %d columns (quote a cell that holds a comma)", len(rec), len(cols))}
		}
		it := Item{Line: line, Meta: make([]string, 0, len(meta))}
		for i, col := range cols {
			cell := strings.TrimSpace(rec[i])
			_, column := cr.FieldPos(i)
			switch col {
			case colLog, colSetup, colCar, colRun:
				if cell == "" {
					return nil, &ManifestError{Path: name, Line: line, Column: column, Msg: "the " + col + " cell is empty; every row needs a log, a setup, a car and a run"}
				}
			case colTest:
				if cell != "" && cell != "rig" && cell != "drop" {
					return nil, &ManifestError{Path: name, Line: line, Column: column, Msg: fmt.Sprintf("test %q: write rig, drop, or leave the cell empty", cell)}
				}
			}
			switch col {
			case colLog:
				it.Log = cell
			case colSetup:
				it.Setup, it.setupColumn = cell, column
			case colCar:
				it.Car = cell
			case colRun:
				it.Run = cell
			case colTest:
				it.Test = cell
			default:
				it.Meta = append(it.Meta, cell)
			}
		}
		key := [3]string{filepath.Clean(it.Log), filepath.Clean(it.Setup), it.Test}
		if first, ok := seen[key]; ok {
			return nil, &ManifestError{Path: name, Line: line, Column: 1,
				Msg: fmt.Sprintf("log %s with setup %s is already on line %d; remove one of the rows", it.Log, it.Setup, first)}
		}
		seen[key] = line
		c.Items = append(c.Items, it)
	}
	if len(c.Items) == 0 {
		return nil, &ManifestError{Path: name, Line: 1, Column: 1, Msg: "the manifest names no log; add one row per log under the header"}
	}
	return c, nil
}

// parseHeader checks the header and returns each column's name and the
// metadata columns in order.
func parseHeader(cr *csv.Reader, name string, header []string) (cols, meta []string, err error) {
	line, _ := cr.FieldPos(0)
	at := map[string]int{}
	for i, h := range header {
		h = strings.TrimSpace(h)
		_, column := cr.FieldPos(i)
		switch first, dup := at[h]; {
		case h == "":
			return nil, nil, &ManifestError{Path: name, Line: line, Column: column, Msg: "a column has no name; name it or remove it"}
		case dup:
			return nil, nil, &ManifestError{Path: name, Line: line, Column: column, Msg: fmt.Sprintf("column %q appears twice (first as column %d)", h, first+1)}
		case !slices.Contains(manifestColumns, h) && slices.Contains(summaryColumns, h):
			return nil, nil, &ManifestError{Path: name, Line: line, Column: column,
				Msg: fmt.Sprintf("column %q is a summary column; give the metadata column another name", h)}
		}
		at[h] = i
		cols = append(cols, h)
		if !slices.Contains(manifestColumns, h) {
			meta = append(meta, h)
		}
	}
	for _, req := range []string{colLog, colSetup, colCar, colRun} {
		if _, ok := at[req]; !ok {
			return nil, nil, &ManifestError{Path: name, Line: line, Column: 1,
				Msg: fmt.Sprintf("the header has no %s column; it needs log,setup,car,run (then any metadata columns)", req)}
		}
	}
	return cols, meta, nil
}

// csvError places a CSV syntax error (a stray quote) in the manifest.
func csvError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &ManifestError{Path: name, Line: pe.Line, Column: pe.Column,
			Msg: pe.Err.Error() + `: quote a whole cell with "..." and double each quote inside it`}
	}
	return &ManifestError{Path: name, Msg: "cannot read the manifest", Err: err}
}
