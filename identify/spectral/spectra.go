package spectral

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Spectra is a Welch estimate of the one-sided spectral matrix of several
// channels (conventions in the package documentation).
type Spectra struct {
	Channels   []string
	FsHz       float64 // sample rate [Hz]
	SegmentLen int     // samples per segment
	Overlap    int     // samples shared by consecutive segments
	Window     Window
	Segments   int // whole segments averaged
	// EffectiveAverages is the number nd of independent averages that gives
	// the same variance as the overlapped windowed segments (Welch, 1967).
	EffectiveAverages float64
	// NoiseBandwidthHz is the window's equivalent noise bandwidth Be in Hz
	// (1.5 fs/N for Hann).
	NoiseBandwidthHz float64
	FreqsHz          []float64        // bin frequencies k fs/N [Hz]
	G                [][][]complex128 // G[f][i][j], (m/s^2)^2/Hz for accelerations
}

// ResolutionHz returns the bin spacing fs/N [Hz].
func (s *Spectra) ResolutionHz() float64 { return s.FsHz / float64(s.SegmentLen) }

func (s *Spectra) checkChannel(i int) {
	if i < 0 || i >= len(s.Channels) {
		panic(fmt.Sprintf("spectral: channel %d out of range [0, %d)", i, len(s.Channels)))
	}
}

// Coherence returns the ordinary coherence |G_ij|^2/(G_ii G_jj) between
// channels i and j; it is NaN where either auto spectrum is zero.
//
// References:
//   - J. S. Bendat and A. G. Piersol, Random Data, 4th ed., Wiley, 2010,
//     Sec. 5.2 (equation number not checked).
func (s *Spectra) Coherence(i, j int) []float64 {
	s.checkChannel(i)
	s.checkChannel(j)
	c := make([]float64, len(s.G))
	for f, g := range s.G {
		den := real(g[i][i]) * real(g[j][j])
		if den == 0 {
			c[f] = math.NaN()
			continue
		}
		a := cmplx.Abs(g[i][j])
		c[f] = a * a / den
	}
	return c
}

// PSDRandomError returns the normalised random error 1/sqrt(nd) of the auto
// spectral densities (Bendat & Piersol, 4th ed., 2010, Sec. 8.5, from memory).
func (s *Spectra) PSDRandomError() float64 { return 1 / math.Sqrt(s.EffectiveAverages) }
