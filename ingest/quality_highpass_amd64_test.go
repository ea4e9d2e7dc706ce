//go:build !noasm && !gccgo && !safe

package ingest

import "golang.org/x/sys/cpu"

// hpBinsPaths are the implementations of hpBins this machine can run, for
// TestHighPassBinsExact: the Go loop always, AVX2 where the CPU has it.
func hpBinsPaths() map[string]func(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64) {
	p := map[string]func(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64){"Go": hpBinsGo}
	if cpu.X86.HasAVX2 {
		p["AVX2"] = func(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64) {
			groups := (kMax + hpGroup - 1) / hpGroup
			hpBinsAVX2(x, &hpTwiddles(groups)[0], groups, re, im)
		}
	}
	return p
}
