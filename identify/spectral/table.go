package spectral

import (
	"encoding/csv"
	"io"
	"math"
	"math/cmplx"
	"strconv"
)

// accelPSDUnit is the unit of a spectral density of acceleration.
const accelPSDUnit = "[(m/s^2)^2/Hz]"

// WriteFRFTable writes the FRF set as CSV: a "freq [Hz]" column, then for
// every output/input pair "OUT/IN |H| [-]", "OUT/IN phase [deg]",
// "OUT/IN re [-]", "OUT/IN im [-]", "OUT/IN coherence [-]",
// "OUT/IN coherence sd [-]", "OUT/IN |H| sd [-]" (one standard deviation,
// eps|H| times |H|) and "OUT/IN phase sd [deg]"; with more than one input also
// "OUT multiple coherence [-]", "OUT multiple coherence sd [-]" per output and
// "inputs cond [-]", the condition number of Gxx. Phases lie in (-180, 180].
// NaN marks bins without an estimate. Inputs and outputs are accelerations,
// so H is dimensionless.
func WriteFRFTable(w io.Writer, set *FRFSet) error {
	header := []string{"freq [Hz]"}
	multi := len(set.Inputs) > 1
	for o, out := range set.Outputs {
		for _, p := range set.Pairs[o] {
			n := p.Output + "/" + p.Input
			header = append(header, n+" |H| [-]", n+" phase [deg]", n+" re [-]", n+" im [-]",
				n+" coherence [-]", n+" coherence sd [-]", n+" |H| sd [-]", n+" phase sd [deg]")
		}
		if multi {
			header = append(header, out+" multiple coherence [-]", out+" multiple coherence sd [-]")
		}
	}
	if multi {
		header = append(header, "inputs cond [-]")
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	row := make([]string, 0, len(header))
	for f, fHz := range set.FreqsHz {
		row = append(row[:0], num(fHz))
		for o := range set.Outputs {
			for _, p := range set.Pairs[o] {
				h := p.H[f]
				a := cmplx.Abs(h)
				row = append(row, num(a), num(cmplx.Phase(h)*180/math.Pi), num(real(h)), num(imag(h)),
					num(p.Coherence[f]), num(p.CoherenceErr[f]), num(p.MagRelErr[f]*a), num(p.PhaseErrRad[f]*180/math.Pi))
			}
			if multi {
				row = append(row, num(set.MultipleCoherence[o][f]), num(set.MultipleCoherenceErr[o][f]))
			}
		}
		if multi {
			row = append(row, num(set.Condition[f]))
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteSpectraTable writes auto and cross spectra of the sensors as CSV, for
// logs without inputs: "freq [Hz]", then per channel "CH PSD [(m/s^2)^2/Hz]"
// and "CH PSD sd [(m/s^2)^2/Hz]" (G/sqrt(nd)), then per channel pair i < j
// "CHi*CHj CSD re [...]", "CHi*CHj CSD im [...]" (the mean of conj(X_i) X_j)
// and "CHi*CHj coherence [-]", "CHi*CHj coherence sd [-]".
func WriteSpectraTable(w io.Writer, s *Spectra) error {
	header := []string{"freq [Hz]"}
	for _, c := range s.Channels {
		header = append(header, c+" PSD "+accelPSDUnit, c+" PSD sd "+accelPSDUnit)
	}
	for i, ci := range s.Channels {
		for _, cj := range s.Channels[i+1:] {
			n := ci + "*" + cj
			header = append(header, n+" CSD re "+accelPSDUnit, n+" CSD im "+accelPSDUnit, n+" coherence [-]", n+" coherence sd [-]")
		}
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	psdErr := s.PSDRandomError()
	var cohs [][]float64 // pairs i < j in header order
	for i := range s.Channels {
		for j := i + 1; j < len(s.Channels); j++ {
			cohs = append(cohs, s.Coherence(i, j))
		}
	}
	row := make([]string, 0, len(header))
	for f, fHz := range s.FreqsHz {
		g := s.G[f]
		row = append(row[:0], num(fHz))
		for i := range s.Channels {
			row = append(row, num(real(g[i][i])), num(real(g[i][i])*psdErr))
		}
		pair := 0
		for i := range s.Channels {
			for j := i + 1; j < len(s.Channels); j++ {
				coh := cohs[pair][f]
				pair++
				row = append(row, num(real(g[i][j])), num(imag(g[i][j])), num(coh), num(coherenceErr(coh, s.EffectiveAverages)))
			}
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// num formats a value with 10 significant digits ("NaN", "+Inf" as strconv
// writes them).
func num(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }
