//go:build !amd64 || noasm || gccgo || safe

package spectral

import "gonum.org/v1/gonum/floats"

// dot4 returns the dot products of h with x0..x3, each floats.Dot(h,
// xk[:len(h)]): where gonum's dot product is not its amd64 assembly, this is
// gonum's. It panics if an xk is shorter than h.
func dot4(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64) {
	n := len(h)
	return floats.Dot(h, x0[:n]), floats.Dot(h, x1[:n]), floats.Dot(h, x2[:n]), floats.Dot(h, x3[:n])
}
