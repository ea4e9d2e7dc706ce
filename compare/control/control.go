package control

import (
	"fmt"
	"math"
)

// Factors for moving ranges of two consecutive values (subgroups of n = 2)
// of the table of factors (Montgomery 2012, Appendix VI). D2 is the mean
// range of two independent standard normal values, 2/sqrt(pi); D4 is
// 1 + 3 d3/d2 with d3 = sqrt(2 - 4/pi), the standard deviation of that range.
const (
	D2 = 1.128
	D4 = 3.267
)

// XFactor multiplies the mean moving range to give the half-width of the
// individuals chart's limits: 3/d2 = 2.66.
const XFactor = 3 / D2

// Chart is an individuals and moving-range chart of a series.
type Chart struct {
	// Center is the mean of the series; Lower and Upper are the limits of
	// the individuals chart, Center ∓ XFactor*MeanMR.
	Center, Lower, Upper float64
	// MR holds the moving ranges: MR[i] = |x[i+1] - x[i]|.
	MR []float64
	// MeanMR is the centre line of the moving-range chart and UpperMR its
	// upper limit, D4*MeanMR (its lower limit is 0).
	MeanMR, UpperMR float64
	// Sigma is the short-term standard deviation that the limits imply,
	// MeanMR/D2.
	Sigma float64
}

// Individuals returns the chart of x, in time order. It needs at least two
// values, all finite.
func Individuals(x []float64) (Chart, error) {
	if len(x) < 2 {
		return Chart{}, fmt.Errorf("an individuals chart needs at least 2 values, got %d", len(x))
	}
	var sum float64
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Chart{}, fmt.Errorf("value %d is %g, not a finite number", i, v)
		}
		sum += v
	}
	c := Chart{Center: sum / float64(len(x)), MR: make([]float64, len(x)-1)}
	var sumMR float64
	for i := 1; i < len(x); i++ {
		c.MR[i-1] = math.Abs(x[i] - x[i-1])
		sumMR += c.MR[i-1]
	}
	c.MeanMR = sumMR / float64(len(c.MR))
	c.UpperMR = D4 * c.MeanMR
	c.Sigma = c.MeanMR / D2
	c.Lower, c.Upper = c.Center-XFactor*c.MeanMR, c.Center+XFactor*c.MeanMR
	return c, nil
}

// Side says where v lies against the individuals chart's limits: +1 above
// Upper, -1 below Lower, 0 on or within them.
func (c Chart) Side(v float64) int {
	switch {
	case v > c.Upper:
		return 1
	case v < c.Lower:
		return -1
	}
	return 0
}

// JumpOut reports whether the moving range MR[i] (between values i and i+1)
// lies above the moving-range chart's upper limit.
func (c Chart) JumpOut(i int) bool { return c.MR[i] > c.UpperMR }
