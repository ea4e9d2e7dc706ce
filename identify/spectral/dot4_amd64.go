//go:build !noasm && !gccgo && !safe

package spectral

import "golang.org/x/sys/cpu"

// useAVX2 selects dot4AVX2 over dot4SSE2: both give the same bits
// (TestDot4MatchesDot), the AVX2 one in half the instructions.
var useAVX2 = cpu.X86.HasAVX2

// dot4 returns the dot products of h with x0..x3, each bit for bit
// floats.Dot(h, xk[:len(h)]) (TestDot4MatchesDot). It panics if an xk is
// shorter than h.
func dot4(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64) {
	n := len(h)
	if len(x0) < n || len(x1) < n || len(x2) < n || len(x3) < n {
		panic("spectral: dot4 operand shorter than the taps")
	}
	if useAVX2 {
		return dot4AVX2(h, x0, x1, x2, x3)
	}
	return dot4SSE2(h, x0, x1, x2, x3)
}

// dot4SSE2 is dot4 in assembly (dot4_amd64.s), for operands the caller
// checked.
//
//go:noescape
func dot4SSE2(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64)

// dot4AVX2 is dot4SSE2 on 256-bit registers (dot4_amd64.s), for CPUs with
// AVX2.
//
//go:noescape
func dot4AVX2(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64)
