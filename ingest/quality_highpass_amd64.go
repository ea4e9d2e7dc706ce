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
	groups := (kMax + hpGroup - 1) / hpGroup
	hpBinsAVX2(x, &hpTwiddles(groups)[0], groups, re, im)
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

// hpTw is the table hpBinsAVX2 reads, shared: for each group of hpGroup
// bins (1-8, 9-16, ...) and each j = 0..hpSegment-1, the cosines
// hpCos[jk mod hpSegment] of the group's bins k, then their sines; 32 KiB a
// group, made for as many groups as asked so far (9, 288 KiB, for 65 bins)
// rather than for all 16: each page of it is a page fault the first time it
// is written, about 12 us on a 2-core AMD EPYC (Turin) VM. Measured there
// (perf, the hour-long rig log, 8 runs each): 1.5 ms of a run's CPU to make
// 9 groups against 2.8 ms for 16.
var hpTw struct {
	sync.Mutex
	tw []float64
}

// hpTwiddles returns hpTw's table with at least groups groups.
func hpTwiddles(groups int) []float64 {
	const stride = hpSegment * 2 * hpGroup // one group
	hpTw.Lock()
	defer hpTw.Unlock()
	if len(hpTw.tw) < groups*stride {
		tw := make([]float64, groups*stride)
		for g := range groups {
			for j := range hpSegment {
				row := tw[g*stride+j*2*hpGroup:][:2*hpGroup]
				for b := range hpGroup {
					i := (j * (g*hpGroup + 1 + b)) & (hpSegment - 1)
					row[b], row[hpGroup+b] = hpCos[i], hpSin[i]
				}
			}
		}
		hpTw.tw = tw
	}
	return hpTw.tw
}

// hpBinsAVX2 is hpBins in assembly (quality_highpass_amd64.s) for groups
// groups of hpGroup bins from bin 1, reading tw (hpTwiddles), for CPUs with
// AVX2; re and im must have room for the groups' bins.
//
//go:noescape
func hpBinsAVX2(x *[hpSegment]float64, tw *float64, groups int, re, im *[hpSegment / 2]float64)
