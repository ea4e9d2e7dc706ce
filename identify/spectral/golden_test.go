package spectral

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"testing"
)

// goldenRelTol is the agreement required with scipy.signal, relative to the
// largest magnitude of the compared array (bins far below the peak, such as
// the DC bin of a detrended segment, carry only round-off).
const goldenRelTol = 1e-10

type goldenFile struct {
	Seed    int64        `json:"seed"`
	FsHz    float64      `json:"fs_hz"`
	Signals [][]float64  `json:"signals"`
	Cases   []goldenCase `json:"cases"`
}

type goldenCase struct {
	Window   string      `json:"window"`
	NPerSeg  int         `json:"nperseg"`
	NOverlap int         `json:"noverlap"`
	FreqsHz  []float64   `json:"freqs_hz"`
	PSD      [][]float64 `json:"psd"`
	CSD      []struct {
		I  int       `json:"i"`
		J  int       `json:"j"`
		Re []float64 `json:"re"`
		Im []float64 `json:"im"`
	} `json:"csd"`
	Coherence01 []float64 `json:"coherence01"`
}

func loadGolden(t *testing.T) goldenFile {
	t.Helper()
	// Source: testdata/gen_golden.py run with Debian's python3-scipy 1.10.1
	// (scipy.signal.welch, csd and coherence).
	raw, err := os.ReadFile("testdata/golden_welch.json")
	if err != nil {
		t.Fatal(err)
	}
	var g goldenFile
	if err := json.Unmarshal(raw, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

func goldenWindow(t *testing.T, name string) Window {
	switch name {
	case "hann":
		return Hann
	case "hamming":
		return Hamming
	case "flattop":
		return FlatTop
	case "boxcar":
		return Rectangular
	}
	t.Fatalf("unknown golden window %q", name)
	return 0
}

// psdOf returns the auto spectral density G[f][i][i] of channel i.
func psdOf(sp *Spectra, i int) []float64 {
	p := make([]float64, len(sp.G))
	for f, g := range sp.G {
		p[f] = real(g[i][i])
	}
	return p
}

// csdOf returns the cross spectral density G[f][i][j] (scipy's csd(x_i, x_j)).
func csdOf(sp *Spectra, i, j int) []complex128 {
	c := make([]complex128, len(sp.G))
	for f, g := range sp.G {
		c[f] = g[i][j]
	}
	return c
}

func maxAbs(v []float64) float64 {
	var m float64
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

func compareReal(t *testing.T, what string, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d bins, scipy has %d", what, len(got), len(want))
	}
	scale := maxAbs(want)
	for k := range want {
		if d := math.Abs(got[k] - want[k]); d > goldenRelTol*scale {
			t.Errorf("%s bin %d: got %.17g, scipy %.17g (rel. to peak %.3g)", what, k, got[k], want[k], d/scale)
			return
		}
	}
}

// TestWelchMatchesScipy checks PSD, CSD and coherence against scipy.signal
// for every window, odd and even segment lengths,
// with and without overlap, writing the signal in uneven blocks.
func TestWelchMatchesScipy(t *testing.T) {
	g := loadGolden(t)
	blockLens := []int{1, 7, 100, 33} // uneven blocks exercise the internal buffering
	for _, c := range g.Cases {
		for _, workers := range []int{1, 2, 3} {
			cfg := Config{FsHz: g.FsHz, SegmentLen: c.NPerSeg, Overlap: c.NOverlap,
				Window: goldenWindow(t, c.Window), Workers: workers}
			acc, err := NewAccumulator(cfg, []string{"a", "b", "c"})
			if err != nil {
				t.Fatal(err)
			}
			n := len(g.Signals[0])
			for off, b := 0, 0; off < n; b++ {
				end := min(n, off+blockLens[b%len(blockLens)])
				acc.Write([][]float64{g.Signals[0][off:end], g.Signals[1][off:end], g.Signals[2][off:end]})
				off = end
			}
			sp, err := acc.Spectra()
			if err != nil {
				t.Fatal(err)
			}
			name := fmt.Sprintf("%s/N=%d", c.Window, c.NPerSeg)
			compareReal(t, name+" freq", sp.FreqsHz, c.FreqsHz)
			for ch := range g.Signals {
				compareReal(t, name+" psd", psdOf(sp, ch), c.PSD[ch])
			}
			for _, p := range c.CSD {
				csd := csdOf(sp, p.I, p.J)
				want := make([]complex128, len(p.Re))
				var scale float64
				for k := range want {
					want[k] = complex(p.Re[k], p.Im[k])
					scale = math.Max(scale, cmplx.Abs(want[k]))
				}
				for k := range want {
					if d := cmplx.Abs(csd[k] - want[k]); d > goldenRelTol*scale {
						t.Errorf("%s csd(%d,%d) bin %d: got %v, scipy %v", name, p.I, p.J, k, csd[k], want[k])
						break
					}
				}
			}
			coh := sp.Coherence(0, 1)
			p0, p1 := psdOf(sp, 0), psdOf(sp, 1)
			s0, s1 := maxAbs(p0), maxAbs(p1)
			for k, want := range c.Coherence01 {
				// Coherence is a ratio: compare where both spectra are well
				// above round-off.
				if p0[k] < 1e-6*s0 || p1[k] < 1e-6*s1 {
					continue
				}
				if math.Abs(coh[k]-want) > goldenRelTol*math.Max(1, want) {
					t.Errorf("%s coherence bin %d: got %.17g, scipy %.17g", name, k, coh[k], want)
					break
				}
			}
		}
	}
}
