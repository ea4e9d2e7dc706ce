//go:build !noasm && !gccgo && !safe

package spectral

import "golang.org/x/sys/cpu"

// dot4Paths are the implementations of dot4 this machine can run, for
// TestDot4MatchesDot: SSE2 always, AVX2 where the CPU has it.
func dot4Paths() map[string]func(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64) {
	p := map[string]func(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64){"SSE2": dot4SSE2}
	if cpu.X86.HasAVX2 {
		p["AVX2"] = dot4AVX2
	}
	return p
}
