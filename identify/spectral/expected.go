package spectral

import (
	"fmt"

	"gonum.org/v1/gonum/floats"
)

// Expected returns the Welch estimate that cfg would give, in expectation,
// of a record of the given number of samples whose true one-sided spectral
// matrix at frequency f is g(f) (G[i][j] in the package's conventions:
// Hermitian, the density of conj(X_i) X_j): the same segments, effective
// averages nd and noise bandwidth as an Accumulator fed that record, and at
// each bin the matrix g gives, which should be the expected estimate: the
// true matrix smoothed by the window's kernel. It is the input of an
// asymptotic prediction: the FRFs, coherences and error bands of
// EstimateFRF follow from it exactly as from measured spectra, without the
// random error that those bands describe. g is called once per bin, in
// increasing order, and may return a matrix it reuses.
func Expected(cfg Config, channels []string, samples int, g func(fHz float64) [][]complex128) (*Spectra, error) {
	if err := cfg.validate(); err != nil {
		return nil, err
	}
	if len(channels) == 0 {
		return nil, fmt.Errorf("spectral: no channels")
	}
	n := cfg.SegmentLen
	hop := n - cfg.Overlap
	if samples < n {
		return nil, &ShortRecordError{Samples: samples, SegmentLen: n, Need: 1}
	}
	win, err := cfg.Window.Values(n)
	if err != nil {
		return nil, err
	}
	if floats.Dot(win, win) == 0 {
		return nil, fmt.Errorf("spectral: window %v is zero over the %d-sample segment", cfg.Window, n)
	}
	segments := (samples-n)/hop + 1
	nch := len(channels)
	s := &Spectra{
		Channels:          append([]string(nil), channels...),
		FsHz:              cfg.FsHz,
		SegmentLen:        n,
		Overlap:           cfg.Overlap,
		Window:            cfg.Window,
		Segments:          segments,
		EffectiveAverages: effectiveAverages(win, hop, segments),
		NoiseBandwidthHz:  noiseBandwidthBins(win) * cfg.FsHz / float64(n),
		FreqsHz:           make([]float64, n/2+1),
		G:                 make([][][]complex128, n/2+1),
	}
	for f := range s.G {
		s.FreqsHz[f] = float64(f) * cfg.FsHz / float64(n)
		m := g(s.FreqsHz[f])
		if len(m) != nch {
			panic(fmt.Sprintf("spectral: Expected: g returned %d rows for %d channels", len(m), nch))
		}
		s.G[f] = make([][]complex128, nch)
		for i := range m {
			if len(m[i]) != nch {
				panic(fmt.Sprintf("spectral: Expected: g returned row %d of %d values for %d channels", i, len(m[i]), nch))
			}
			s.G[f][i] = append([]complex128(nil), m[i]...)
		}
	}
	return s, nil
}
