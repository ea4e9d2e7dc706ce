package ingest

import (
	"bytes"
	"encoding/csv"
	"io"
	"runtime"
	"strconv"
	"sync"
	"testing"
	"time"
)

// The benchmarks parse the same generated 100 MB, 5-column log (1 kHz, the
// lead's writer's format) held in memory, so disk speed is out of the
// figures: ours through Stream (all four channels converted, SHA-256 and the
// quality checks included), the baseline with encoding/csv (ReuseRecord) and
// strconv.ParseFloat on every cell. Run:
//
//	go test ./ingest -run '^$' -bench 'Parse' -benchtime 5x
const benchLogBytes = 100 << 20

var (
	benchOnce sync.Once
	benchData []byte
	benchRows int
)

func benchLog() ([]byte, int) {
	benchOnce.Do(func() {
		benchData = genBytes(benchLogBytes, 1)
		benchRows = bytes.Count(benchData, []byte{'\n'}) - 3
	})
	return benchData, benchRows
}

func reportRows(b *testing.B, rows int, m0, m1 *runtime.MemStats) {
	b.ReportMetric(float64(m1.Mallocs-m0.Mallocs)/float64(b.N)/float64(rows), "allocs/row")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(rows), "ns/row")
}

func parseOurs(tb testing.TB, data []byte, rows int) {
	r, err := NewReader(bytes.NewReader(data), "bench.csv", int64(len(data)), Options{})
	if err != nil {
		tb.Fatal(err)
	}
	var sink float64
	sum, err := r.Stream(func(blk Block) error {
		sink += blk.Data[0][0]
		return nil
	})
	if err != nil {
		tb.Fatal(err)
	}
	if sum.Rows != rows {
		tb.Fatalf("rows %d, want %d", sum.Rows, rows)
	}
}

func parseBaseline(tb testing.TB, data []byte, rows int) {
	cr := csv.NewReader(bytes.NewReader(data))
	cr.ReuseRecord = true
	cr.Comment = '#'
	cr.FieldsPerRecord = 5
	if _, err := cr.Read(); err != nil { // header
		tb.Fatal(err)
	}
	n := 0
	var sink float64
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			tb.Fatal(err)
		}
		for _, cell := range rec {
			v, err := strconv.ParseFloat(cell, 64)
			if err != nil {
				tb.Fatal(err)
			}
			sink += v
		}
		n++
	}
	if n != rows {
		tb.Fatalf("rows %d, want %d", n, rows)
	}
}

// BenchmarkParseVsBaseline runs ours and the baseline by turns, five times
// each per iteration, and reports the best time of each as MB/s and their
// ratio: on a shared machine the best of several turns is the figure least
// disturbed by other load. Run with -benchtime 1x.
func BenchmarkParseVsBaseline(b *testing.B) {
	data, rows := benchLog()
	const turns = 5
	bestOurs, bestBase := time.Duration(1<<62), time.Duration(1<<62)
	for range b.N {
		for range turns {
			t0 := time.Now()
			parseOurs(b, data, rows)
			bestOurs = min(bestOurs, time.Since(t0))
			t0 = time.Now()
			parseBaseline(b, data, rows)
			bestBase = min(bestBase, time.Since(t0))
		}
	}
	mb := float64(len(data)) / 1e6
	b.ReportMetric(mb/bestOurs.Seconds(), "ours-MB/s")
	b.ReportMetric(mb/bestBase.Seconds(), "baseline-MB/s")
	b.ReportMetric(bestBase.Seconds()/bestOurs.Seconds(), "ratio")
	b.ReportMetric(0, "ns/op")
}

func BenchmarkParseOurs(b *testing.B) { benchParse(b, parseOurs) }

func BenchmarkParseBaselineEncodingCSV(b *testing.B) { benchParse(b, parseBaseline) }

// benchParse times parse on the generated log and reports bytes, allocations
// and time per row.
func benchParse(b *testing.B, parse func(testing.TB, []byte, int)) {
	data, rows := benchLog()
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	b.ResetTimer()
	for range b.N {
		parse(b, data, rows)
	}
	b.StopTimer()
	runtime.ReadMemStats(&m1)
	reportRows(b, rows, &m0, &m1)
}
