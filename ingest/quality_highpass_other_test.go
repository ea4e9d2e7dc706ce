//go:build !amd64 || noasm || gccgo || safe

package ingest

// hpBinsPaths are the implementations of hpBins, for TestHighPassBinsExact:
// here the Go loop only.
func hpBinsPaths() map[string]func(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64) {
	return map[string]func(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64){"Go": hpBinsGo}
}
