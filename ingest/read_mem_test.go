package ingest

import (
	"fmt"
	"runtime"
	"testing"
)

// peakHeap streams a generated log of about size bytes (made on the fly, so
// the log itself is never in memory) and returns the largest HeapInuse seen
// (sampled every 16 blocks and at the end) and the bytes allocated in all.
func peakHeap(tb testing.TB, size int64) (peak, total uint64, rows int) {
	runtime.GC()
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	alloc0 := m.TotalAlloc
	r, err := NewReader(newGenLog(size, 9), "gen.csv", size, Options{})
	if err != nil {
		tb.Fatal(err)
	}
	blocks := 0
	sample := func() {
		runtime.ReadMemStats(&m)
		peak = max(peak, m.HeapInuse)
	}
	sum, err := r.Stream(func(Block) error {
		if blocks++; blocks%16 == 0 {
			sample()
		}
		return nil
	})
	if err != nil {
		tb.Fatal(err)
	}
	sample()
	return peak, m.TotalAlloc - alloc0, sum.Rows
}

// TestPeakHeapIndependentOfLength: the same peak heap for a 10 MB and an
// 80 MB log (BenchmarkPeakHeap shows 10 MB against 200 MB).
func TestPeakHeapIndependentOfLength(t *testing.T) {
	if testing.Short() {
		t.Skip("reads 90 MB")
	}
	p10, a10, _ := peakHeap(t, 10<<20)
	p80, a80, _ := peakHeap(t, 80<<20)
	t.Logf("peak HeapInuse %.1f MiB (10 MB log), %.1f MiB (80 MB log); allocated %.1f and %.1f MiB",
		mib(p10), mib(p80), mib(a10), mib(a80))
	if float64(p80) > 1.25*float64(p10)+4<<20 {
		t.Errorf("peak heap grows with the log: %.1f MiB for 10 MB, %.1f MiB for 80 MB", mib(p10), mib(p80))
	}
}

func mib(b uint64) float64 { return float64(b) / (1 << 20) }

// BenchmarkPeakHeap reports the peak heap while streaming 10 MB and 200 MB
// logs: run with -benchtime 1x.
func BenchmarkPeakHeap(b *testing.B) {
	for _, size := range []int64{10 << 20, 200 << 20} {
		b.Run(fmt.Sprintf("%dMB", size>>20), func(b *testing.B) {
			var peak, total uint64
			rows := 0
			for range b.N {
				p, a, n := peakHeap(b, size)
				peak, total, rows = max(peak, p), a, n
			}
			b.ReportMetric(mib(peak), "peak-heap-MiB")
			b.ReportMetric(mib(total), "alloc-MiB")
			b.ReportMetric(float64(rows), "rows")
		})
	}
}
