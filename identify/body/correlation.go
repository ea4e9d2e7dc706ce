package body

import "math"

// Names of the figures of a mode that a Correlation relates: the keys the
// result's modes use for them, prefixed by the mode's label and a dot
// (FigureName).
const (
	FigureNaturalFrequency = "natural_frequency_hz"
	FigureDampingRatio     = "damping_ratio"
	FigurePitchPerBounce   = "pitch_per_bounce_rad_per_m"
)

// FigureName returns the name of figure key (FigureNaturalFrequency, ...) of
// the mode labelled label in a Correlation: "bounce.damping_ratio".
func FigureName(label, key string) string { return label + "." + key }

// Correlation holds the correlation coefficients between the figures of
// the modes of one fit. The two modes are fitted together, so their errors
// are correlated: in a drop fit the pitch per bounce of one mode goes with
// the frequency and damping of the other (coefficients of 0.7-0.8 on
// simulated drops, identify/decay). A calculation that uses several
// figures (the rate update of package compare) needs them to propagate the
// uncertainty.
type Correlation struct {
	// Figures names the figures (FigureName), Matrix[i][j] is the
	// correlation coefficient of figures i and j: symmetric, ones on the
	// diagonal.
	Figures []string
	Matrix  [][]float64
}

// Coefficient returns the correlation coefficient of the figures named a
// and b: 1 when a == b, 0 when c is nil or does not hold both.
func (c *Correlation) Coefficient(a, b string) float64 {
	if a == b {
		return 1
	}
	if c == nil {
		return 0
	}
	i, j := -1, -1
	for k, f := range c.Figures {
		if f == a {
			i = k
		}
		if f == b {
			j = k
		}
	}
	if i < 0 || j < 0 {
		return 0
	}
	return c.Matrix[i][j]
}

// CorrelationOf returns the Correlation of the figures named by names from
// their covariance cov (symmetric, len(names) square). A figure of zero or
// undefined variance correlates with nothing.
func CorrelationOf(names []string, cov [][]float64) *Correlation {
	n := len(names)
	c := &Correlation{Figures: names, Matrix: make([][]float64, n)}
	for i := range c.Matrix {
		c.Matrix[i] = make([]float64, n)
		for j := range c.Matrix[i] {
			if i == j {
				c.Matrix[i][j] = 1
				continue
			}
			d := math.Sqrt(cov[i][i] * cov[j][j])
			if d > 0 && !math.IsInf(d, 0) {
				c.Matrix[i][j] = math.Max(-1, math.Min(1, cov[i][j]/d))
			}
		}
	}
	return c
}
