//go:build !amd64 || noasm || gccgo || safe

package ingest

// hpBins sets re[k-1] and im[k-1] to the real and imaginary parts of bin k
// of the DFT of x, for k = 1..kMax: hpBinsGo, there being no assembly here.
func hpBins(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64) {
	hpBinsGo(x, kMax, re, im)
}
