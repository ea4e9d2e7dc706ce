package batch

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"path/filepath"
	"strconv"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// A summary row holds, in this order: the item (log, setup, car, run,
// test), the verdict and the error message, the result file, for each body
// mode its natural frequency, damping ratio and node with their one-sd
// uncertainties and its flag, the back-calculated ride rates and axle
// damping with their sd, then the campaign's metadata columns. Values are
// in the units their names say; a value that does not exist (a failed log,
// a node of a pure bounce, damping that was not measured) is an empty cell
// in summary.csv and null in summary.jsonl.
var summaryColumns = []string{
	"log", "setup", "car", "run", "test", "verdict", "error", "result_json",
	"bounce_natural_frequency_hz", "bounce_natural_frequency_sd_hz", "bounce_damping_ratio", "bounce_damping_ratio_sd",
	"bounce_node_m", "bounce_node_sd_m", "bounce_flagged",
	"pitch_natural_frequency_hz", "pitch_natural_frequency_sd_hz", "pitch_damping_ratio", "pitch_damping_ratio_sd",
	"pitch_node_m", "pitch_node_sd_m", "pitch_flagged",
	"front_rate_n_per_m", "front_rate_sd_n_per_m", "rear_rate_n_per_m", "rear_rate_sd_n_per_m",
	"front_damping_ns_per_m", "front_damping_sd_ns_per_m", "rear_damping_ns_per_m", "rear_damping_sd_ns_per_m",
}

// values returns the row's summary values in the order of summaryColumns
// and then its metadata: strings, bools, *float64, and nil (no value).
func (r *Row) values() []any {
	rec := &r.Record
	v := []any{filepath.ToSlash(r.Log), filepath.ToSlash(r.Setup), r.Car, r.Run, r.Test, rec.Verdict, rec.Error, filepath.ToSlash(r.ResultFile)}
	for _, label := range []string{"bounce", "pitch"} {
		v = append(v, modeValues(rec.Result, label)...)
	}
	v = append(v, rateValues(rec.Result)...)
	for _, m := range r.Meta {
		v = append(v, m)
	}
	return v
}

// modeValues are one mode's summary values (all absent when the result has
// no such mode).
func modeValues(res *compare.Result, label string) []any {
	v := make([]any, 7) // nil: absent
	if res == nil {
		return v
	}
	for _, m := range res.Modes {
		if m.Label != label {
			continue
		}
		v[0], v[2], v[4], v[6] = compare.Finite(m.NaturalFrequencyHz), compare.Finite(m.DampingRatio), m.NodeM, m.Flagged
		if u := m.Uncertainty; u != nil {
			v[1], v[3], v[5] = compare.Finite(u.NaturalFrequencyHz), compare.Finite(u.DampingRatio), u.NodeM
		}
	}
	return v
}

// rateValues are the back-calculated rates and damping with their sd.
func rateValues(res *compare.Result) []any {
	v := make([]any, 8) // nil: absent
	if res == nil || res.Updated == nil {
		return v
	}
	up := res.Updated
	v[0], v[2] = compare.Finite(up.FrontRateNPerM), compare.Finite(up.RearRateNPerM)
	if up.DampingEstimated {
		v[4], v[6] = compare.Finite(up.FrontDampingNsPerM), compare.Finite(up.RearDampingNsPerM)
	}
	if u := up.Uncertainty; u != nil {
		v[1], v[3] = compare.Finite(u.FrontRateNPerM), compare.Finite(u.RearRateNPerM)
		if up.DampingEstimated {
			v[5], v[7] = u.FrontDampingNsPerM, u.RearDampingNsPerM
		}
	}
	return v
}

// writeSummaries writes summary.csv and summary.jsonl under out.
func (b *Batch) writeSummaries(out string) error {
	header := append(append([]string{}, summaryColumns...), b.MetaColumns...)
	if err := ingest.WriteAtomic(filepath.Join(out, SummaryCSV), func(w io.Writer) error {
		cw := csv.NewWriter(w)
		cw.Write(header)
		for i := range b.Rows {
			vals := b.Rows[i].values()
			rec := make([]string, len(vals))
			for j, x := range vals {
				rec[j] = csvCell(x)
			}
			cw.Write(rec)
		}
		cw.Flush()
		return cw.Error()
	}); err != nil {
		return err
	}
	return ingest.WriteAtomic(filepath.Join(out, SummaryJSON), func(w io.Writer) error {
		var line bytes.Buffer
		for i := range b.Rows {
			line.Reset()
			line.WriteByte('{')
			for j, x := range b.Rows[i].values() {
				if j > 0 {
					line.WriteByte(',')
				}
				key, _ := json.Marshal(header[j])
				val, err := json.Marshal(x)
				if err != nil {
					return err
				}
				line.Write(key)
				line.WriteByte(':')
				line.Write(val)
			}
			line.WriteString("}\n")
			if _, err := w.Write(line.Bytes()); err != nil {
				return err
			}
		}
		return nil
	})
}

// csvCell formats a summary value: numbers in the shortest form that reads
// back to the same float64, absent values empty.
func csvCell(x any) string {
	switch x := x.(type) {
	case string:
		return x
	case bool:
		return strconv.FormatBool(x)
	case *float64:
		if x == nil || math.IsNaN(*x) || math.IsInf(*x, 0) {
			return ""
		}
		return strconv.FormatFloat(*x, 'g', -1, 64)
	}
	return ""
}
