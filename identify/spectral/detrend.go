package spectral

import (
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"
)

// Detrend says what is removed from each segment before windowing.
type Detrend int

const (
	// DetrendMean removes the segment mean (scipy's detrend='constant').
	DetrendMean Detrend = iota
	// DetrendLinear removes the least-squares straight line (scipy's
	// detrend='linear').
	DetrendLinear
	// DetrendNone leaves the segment as it is (transient records).
	DetrendNone
)

// String returns the name of the detrend.
func (d Detrend) String() string {
	switch d {
	case DetrendMean:
		return "mean"
	case DetrendLinear:
		return "linear"
	case DetrendNone:
		return "none"
	}
	return "unknown"
}

// apply detrends seg in place; index holds 0, 1, ..., len(seg)-1.
func (d Detrend) apply(seg, index []float64) {
	switch d {
	case DetrendMean:
		floats.AddConst(-stat.Mean(seg, nil), seg)
	case DetrendLinear:
		alpha, beta := stat.LinearRegression(index, seg, nil, false)
		for i, t := range index {
			seg[i] -= alpha + beta*t
		}
	}
}
