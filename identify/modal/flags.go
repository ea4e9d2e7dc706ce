package modal

import (
	"fmt"

	"github.com/ridemodes/ridemodes/identify/body"
)

// maxChiSquare: a refined fit whose reduced chi-square exceeds this flags
// both modes: the two-mode model does not describe the FRFs within their
// error bands, and the standard deviations, though scaled up by it, do not
// cover what the misfit does to the values. Measured on 360 simulated rig
// logs (compare/simulate; the three example cars, 2 % and 5 % noise,
// 300 s, seeds 1-20): random drives gave 0.74-1.24, sine sweeps 1.33-3.03
// (their errors all within 2.7 sd), and road drives, whose delayed rear
// input leaves FRFs on the front pan alone that no two-mode model fits,
// 26-141 with errors of 10-50 sd.
const maxChiSquare = 8.0

// flagModes flags the modes of res, fitted from sensors at posM, that the
// FRFs cannot support: by the rules common to both routes
// (body.FlagUnsupported) and by the fit's reduced chi-square.
func flagModes(res *Result, posM []float64) {
	body.FlagUnsupported(res.Modes, posM, res.BandLowHz, res.BandHighHz)
	if res.ChiSquarePerDOF > maxChiSquare {
		reason := fmt.Sprintf("the two-mode model does not describe the FRFs: reduced chi-square %.3g (over %g, "+
			"about 1 for a fit within the error bands), normalised residual %.3g; the values follow the model's misfit "+
			"more than the data: look for another mode in the band, a non-linear suspension, or pans driven with "+
			"correlated signals (a road-like drive), and drive the pans with independent signals",
			res.ChiSquarePerDOF, maxChiSquare, res.NormalisedResidual)
		for i := range res.Modes {
			res.Modes[i].Flag(reason)
		}
	}
}
