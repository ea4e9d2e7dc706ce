//go:build !amd64 || noasm || gccgo || safe

package spectral

// dot4Paths are the implementations of dot4 besides dot4 itself, for
// TestDot4MatchesDot: here dot4 is gonum's dot product, the only path.
func dot4Paths() map[string]func(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64) {
	return nil
}
