//go:build !noasm && !gccgo && !safe

package ingest

import (
	"sync"

	"golang.org/x/sys/cpu"
)

// hpUseAVX2 selects hpBinsAVX2 over hpBinsGo: both give the same bits
// (TestHighPassBinsExact).
var hpUseAVX2 = cpu.X86.HasAVX2

// hpBins sets re[k-1] and im[k-1] to the real and imaginary parts of bin k
// of the DFT of x, for k = 1..kMax, each bit for bit what hpBinsGo gives.
func hpBins(x *[hpSegment]float64, kMax int, re, im *[hpSegment / 2]float64) {
	if !hpUseAVX2 {
		hpBinsGo(x, kMax, re, im)
		return
	}
	hpBinsAVX2(x, &hpTwiddles()[0], (kMax+hpGroup-1)/hpGroup, re, im)
}

// hpGroup is the number of bins hpBinsAVX2 takes in one group: two 256-bit
// registers of real parts and two of imaginary parts.
const hpGroup = 8

// The assembly is written for 256-point segments and groups of 8 bins: a
// constant index out of range stops the build if either changes.
var (
	_ = [1]struct{}{}[hpSegment-256]
	_ = [1]struct{}{}[hpGroup-8]
)

// hpTwiddles is the table hpBinsAVX2 reads, made at its first use and
// shared: for each group of hpGroup bins (1-8, 9-16, ..., 121-128) and each
// j = 0..hpSegment-1, the cosines hpCos[jk mod hpSegment] of the group's
// bins k, then their sines; 512 KiB.
var hpTwiddles = sync.OnceValue(func() []float64 {
	const groups = hpSegment / 2 / hpGroup
	tw := make([]float64, groups*hpSegment*2*hpGroup)
	for g := range groups {
		for j := range hpSegment {
			row := tw[(g*hpSegment+j)*2*hpGroup:][:2*hpGroup]
			for b := range hpGroup {
				i := (j * (g*hpGroup + 1 + b)) & (hpSegment - 1)
				row[b], row[hpGroup+b] = hpCos[i], hpSin[i]
			}
		}
	}
	return tw
})

// hpBinsAVX2 is hpBins in assembly (quality_highpass_amd64.s) for groups
// groups of hpGroup bins from bin 1, reading tw (hpTwiddles), for CPUs with
// AVX2; re and im must have room for the groups' bins.
//
//go:noescape
func hpBinsAVX2(x *[hpSegment]float64, tw *float64, groups int, re, im *[hpSegment / 2]float64)
