package trend

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/ridemodes/ridemodes/compare"
)

// column is one column of the history table: its name (CSV header, JSON
// key) and its cell for run i: a string, a float64 (NaN: no value), a
// *bool (nil: no value) or a []string.
type column struct {
	name string
	cell func(c *Campaign, i int) any
}

// columns are the history table's fixed columns, in order; the runs'
// metadata follow (meta_KEY in CSV, an object "meta" in JSON).
var columns = buildColumns()

func buildColumns() []column {
	text := func(name string, f func(c *Campaign, i int) string) column {
		return column{name, func(c *Campaign, i int) any { return f(c, i) }}
	}
	cols := []column{
		text("run_key", func(c *Campaign, i int) string { return c.Runs[i].RunKey }),
		text("car", func(c *Campaign, i int) string { return c.Runs[i].Car }),
		text("run", func(c *Campaign, i int) string { return c.Runs[i].Run }),
		text("test", func(c *Campaign, i int) string { return c.Runs[i].Test }),
		text("analysed_at", func(c *Campaign, i int) string { return c.Runs[i].AnalysedAt.UTC().Format(time.RFC3339Nano) }),
		text("verdict", func(c *Campaign, i int) string { return c.Runs[i].Verdict }),
		text("error", func(c *Campaign, i int) string { return c.Runs[i].Error }),
		text("log_path", func(c *Campaign, i int) string { return c.Runs[i].LogPath }),
		text("log_sha256", func(c *Campaign, i int) string { return c.Runs[i].LogSHA256 }),
		text("setup_sha256", func(c *Campaign, i int) string { return c.Runs[i].SetupSHA256 }),
		text("tool_version", func(c *Campaign, i int) string { return c.Runs[i].ToolVersion }),
	}
	for _, q := range Quantities {
		value := func(f func(Value) float64) func(c *Campaign, i int) any {
			return func(c *Campaign, i int) any {
				v, ok := q.valueOf(c.Runs[i].Result)
				if !ok {
					return math.NaN()
				}
				return f(v)
			}
		}
		cols = append(cols,
			column{q.Key(), value(func(v Value) float64 { return v.Value })},
			column{q.Stem + "_sd" + q.Unit, value(func(v Value) float64 { return v.SD })},
			column{q.Stem + "_design" + q.Unit, value(func(v Value) float64 { return v.Design })},
		)
	}
	for _, label := range []string{"bounce", "pitch"} {
		cols = append(cols,
			column{label + "_node_m", func(c *Campaign, i int) any {
				if m := modeOf(c.Runs[i].Result, label); m != nil && m.NodeM != nil {
					return *m.NodeM
				}
				return math.NaN()
			}},
			column{label + "_flagged", func(c *Campaign, i int) any {
				if m := modeOf(c.Runs[i].Result, label); m != nil {
					return &m.Flagged
				}
				return (*bool)(nil)
			}})
	}
	for _, front := range []bool{true, false} {
		name := "rear_damping_ns_per_m"
		if front {
			name = "front_damping_ns_per_m"
		}
		cols = append(cols, column{name, func(c *Campaign, i int) any {
			res := c.Runs[i].Result
			if res == nil || res.Updated == nil || !res.Updated.DampingEstimated {
				return math.NaN()
			}
			if front {
				return res.Updated.FrontDampingNsPerM
			}
			return res.Updated.RearDampingNsPerM
		}})
	}
	return append(cols, column{"drift", func(c *Campaign, i int) any { return c.drift(i) }})
}

// modeOf is the measured mode labelled label in res, or nil.
func modeOf(res *compare.Result, label string) *compare.ModeJSON {
	if res == nil {
		return nil
	}
	for k := range res.Modes {
		if res.Modes[k].Label == label {
			return &res.Modes[k]
		}
	}
	return nil
}

// drift is the sentences of the findings of run i.
func (c *Campaign) drift(i int) []string {
	out := []string{}
	for _, f := range c.Findings {
		if f.Run == i {
			out = append(out, f.Sentence)
		}
	}
	return out
}

// metaKeys are the metadata keys of all runs, sorted.
func (c *Campaign) metaKeys() []string {
	seen := map[string]bool{}
	var keys []string
	for _, r := range c.Runs {
		for k := range r.Meta {
			if !seen[k] {
				seen[k] = true
				keys = append(keys, k)
			}
		}
	}
	slices.Sort(keys)
	return keys
}

// WriteCSV writes the history table as CSV: a header row, then one row per
// run in time order. Missing values are empty cells; numbers are written in
// full precision; drift sentences are joined by "; "; the metadata columns
// are meta_KEY.
func (c *Campaign) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	keys := c.metaKeys()
	header := make([]string, 0, len(columns)+len(keys))
	for _, col := range columns {
		header = append(header, col.name)
	}
	for _, k := range keys {
		header = append(header, "meta_"+k)
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for i := range c.Runs {
		row := make([]string, 0, len(header))
		for _, col := range columns {
			switch v := col.cell(c, i).(type) {
			case string:
				row = append(row, v)
			case float64:
				if math.IsNaN(v) {
					row = append(row, "")
				} else {
					row = append(row, strconv.FormatFloat(v, 'g', -1, 64))
				}
			case *bool:
				if v == nil {
					row = append(row, "")
				} else {
					row = append(row, strconv.FormatBool(*v))
				}
			case []string:
				row = append(row, strings.Join(v, "; "))
			}
		}
		for _, k := range keys {
			row = append(row, c.Runs[i].Meta[k])
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteJSON writes the history as one JSON object: car (empty for every
// car), verdict and summary (the campaign's worst), runs (one object per run
// with the CSV's columns as keys, null for a missing value, drift as a list
// and meta as an object), findings (run, run_key, quantity, kind, value,
// limit, sentence) and notes.
func (c *Campaign) WriteJSON(w io.Writer) error {
	type finding struct {
		Run      string  `json:"run"`
		RunKey   string  `json:"run_key"`
		Quantity string  `json:"quantity"`
		Kind     string  `json:"kind"`
		Value    float64 `json:"value"`
		Limit    float64 `json:"limit"`
		Sentence string  `json:"sentence"`
	}
	doc := struct {
		Car      string            `json:"car"`
		Verdict  string            `json:"verdict"`
		Summary  string            `json:"summary"`
		Runs     []json.RawMessage `json:"runs"`
		Findings []finding         `json:"findings"`
		Notes    []string          `json:"notes"`
	}{Car: c.Car, Verdict: c.Verdict, Summary: c.Summary, Runs: []json.RawMessage{}, Findings: []finding{}, Notes: c.Notes}
	if doc.Notes == nil {
		doc.Notes = []string{}
	}
	for i := range c.Runs {
		row, err := c.jsonRow(i)
		if err != nil {
			return err
		}
		doc.Runs = append(doc.Runs, row)
	}
	for _, f := range c.Findings {
		r := c.Runs[f.Run]
		doc.Findings = append(doc.Findings, finding{Run: r.Run, RunKey: r.RunKey, Quantity: f.Quantity.Key(), Kind: f.Kind,
			Value: f.Value, Limit: f.Limit, Sentence: f.Sentence})
	}
	b, err := json.MarshalIndent(doc, "", "  ")
	if err != nil {
		return err
	}
	_, err = w.Write(append(b, '\n'))
	return err
}

// jsonRow is run i as a JSON object with the keys in column order.
func (c *Campaign) jsonRow(i int) (json.RawMessage, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for k, col := range columns {
		v := col.cell(c, i)
		if f, ok := v.(float64); ok && math.IsNaN(f) {
			v = nil
		}
		if err := writeMember(&b, k > 0, col.name, v); err != nil {
			return nil, err
		}
	}
	meta := c.Runs[i].Meta
	if meta == nil {
		meta = map[string]string{}
	}
	if err := writeMember(&b, true, "meta", meta); err != nil {
		return nil, err
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// writeMember writes "key": value to b, with a leading comma when comma.
func writeMember(b *bytes.Buffer, comma bool, key string, v any) error {
	if comma {
		b.WriteByte(',')
	}
	kb, _ := json.Marshal(key)
	vb, err := json.Marshal(v)
	if err != nil {
		return fmt.Errorf("%s: %w", key, err)
	}
	b.Write(kb)
	b.WriteByte(':')
	b.Write(vb)
	return nil
}

// WriteTable prints the history for a terminal: one line per run with the
// followed quantities (a value beyond its control limits is marked "*"),
// then the drift findings, the notes and the campaign's verdict.
func (c *Campaign) WriteTable(w io.Writer) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := []string{"run", "analysed (UTC)", "test", "verdict"}
	for _, q := range Quantities {
		h := q.Name
		if q.Symbol != "" {
			h += " [" + q.Symbol + "]"
		}
		head = append(head, h)
	}
	fmt.Fprintln(tw, strings.Join(head, "\t")+"\t")
	out := map[[2]int]bool{}
	for _, f := range c.Findings {
		if f.Kind != "jump" {
			out[[2]int{f.Run, slices.Index(Quantities, f.Quantity)}] = true
		}
	}
	for i, r := range c.Runs {
		cells := []string{r.Run, r.AnalysedAt.UTC().Format("2006-01-02 15:04"), r.Test, r.Verdict}
		for k, q := range Quantities {
			v, ok := q.valueOf(r.Result)
			cell := "—"
			if ok {
				cell = strconv.FormatFloat(v.Value, 'f', q.Decimals, 64)
			}
			if out[[2]int{i, k}] {
				cell += "*"
			}
			cells = append(cells, cell)
		}
		fmt.Fprintln(tw, strings.Join(cells, "\t")+"\t")
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for i, r := range c.Runs {
		if r.Error != "" {
			fmt.Fprintf(w, "%s could not be analysed: %s\n", c.Labels[i], r.Error)
		}
	}
	if len(c.Findings) > 0 {
		fmt.Fprintln(w, "\nDrift (moved more than the campaign's scatter and its own uncertainty explain; * in the table):")
		for _, f := range c.Findings {
			fmt.Fprintln(w, "  "+f.Sentence+".")
		}
	}
	for _, n := range c.Notes {
		fmt.Fprintln(w, n)
	}
	_, err := fmt.Fprintln(w, c.Summary)
	return err
}
