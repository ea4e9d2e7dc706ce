package body

import (
	"fmt"
	"math"
)

// Mode is one measured body mode, from either route: a rig test (package
// identify/modal, from FRFs) or a drop test (package identify/decay, from a
// free decay). The definitions are those of the package documentation.
type Mode struct {
	Label              string     // "bounce" or "pitch" (BodyLabels)
	Pole               complex128 // lambda in rad/s, Re(lambda) < 0 < Im(lambda)
	NaturalFrequencyHz float64    // |lambda|/(2 pi)
	DampedFrequencyHz  float64    // Im(lambda)/(2 pi)
	DampingRatio       float64    // -Re(lambda)/|lambda|
	// PitchPerBounceRadPerM is Re(theta/z) in rad/m.
	PitchPerBounceRadPerM float64
	// NodeM is 1/Re(theta/z) in m from the CG (NodeM); NaN when the pitch is
	// negligible (a pure bounce, without a node).
	NodeM float64
	// HeaveAndPitch is the shape (z, theta) in (m, rad), scaled to z = 1.
	HeaveAndPitch [2]complex128
	// Shape is the mode shape at each sensor, w(s_k)/z, in the order of the
	// sensors' positions, scaled to z = 1.
	Shape []complex128
	// RankOneRatio is the second over the first singular value of the
	// mode's residue matrix (outputs x inputs): 0 for an exact
	// base-excitation mode. Rig route only; 0 from a drop test, which has no
	// measured input.
	RankOneRatio float64
	SD           SD
	// Flagged is true when the data cannot support the mode's values: a
	// value is reported, but neither its number nor its standard deviation
	// should be trusted. FlagReasons say why, one sentence each, naming the
	// evidence with its figures (see Flag and the package documentation).
	Flagged     bool
	FlagReasons []string
}

// SD holds one standard deviation of each of a Mode's values, in the same
// units, by the delta method from the covariance of the fitted parameters
// (the rig route adds the expected resolution bias in quadrature, see
// package identify/modal; the drop route reads the pitch per bounce of a
// bounce-like shape from the profile likelihood, see identify/decay).
type SD struct {
	NaturalFrequencyHz    float64
	DampedFrequencyHz     float64
	DampingRatio          float64
	PitchPerBounceRadPerM float64
	// NodeM is NaN when the node is undetermined (Mode.NodeUndetermined);
	// the contract writes it as null.
	NodeM float64
	// ShapeRe and ShapeIm are those of the real and imaginary parts of
	// Mode.Shape, per sensor.
	ShapeRe, ShapeIm []float64
}

// NodeDeterminedSDs is how many of its own standard deviations the pitch per
// bounce must lie away from zero for the node's standard deviation to be
// stated: within about two sd (the usual 95 % level, common practice) the
// pitch may be zero, the node may lie at infinity, and the node's sd
// linearised through 1/ppb, sd(ppb)/ppb^2, means nothing.
const NodeDeterminedSDs = 2

// NodeUndetermined reports whether the node of m has no standard deviation
// to state: the mode has no node (NodeM is NaN), or its pitch per bounce is
// zero within NodeDeterminedSDs of its standard deviation.
func (m Mode) NodeUndetermined() bool {
	return math.IsNaN(m.NodeM) || math.Abs(m.PitchPerBounceRadPerM) <= NodeDeterminedSDs*m.SD.PitchPerBounceRadPerM
}

// SortAndLabel finishes the two modes of a fit, from either route: it sorts
// them by natural frequency, labels them by their nodes (BodyLabels) and
// sets SD.NodeM to NaN where the node is undetermined (NodeUndetermined).
// Another number of modes than two is a caller mistake and panics.
func SortAndLabel(ms []Mode) {
	if len(ms) != 2 {
		panic(fmt.Sprintf("body: %d modes to label; bounce and pitch are two", len(ms)))
	}
	if ms[1].NaturalFrequencyHz < ms[0].NaturalFrequencyHz {
		ms[0], ms[1] = ms[1], ms[0]
	}
	ms[0].Label, ms[1].Label = BodyLabels(ms[0].NodeM, ms[1].NodeM)
	for i := range ms {
		if ms[i].NodeUndetermined() {
			ms[i].SD.NodeM = math.NaN()
		}
	}
}

// BodyLabels names the two body modes by their nodes (m from the CG, NaN for
// a mode without one): the mode whose node lies farther from the CG is
// "bounce", the other "pitch". A mode without a node counts as infinitely
// far; when both are as far, the first is bounce.
func BodyLabels(node0M, node1M float64) (label0, label1 string) {
	dist := func(nodeM float64) float64 {
		if math.IsNaN(nodeM) {
			return math.Inf(1)
		}
		return math.Abs(nodeM)
	}
	if dist(node1M) > dist(node0M) {
		return "pitch", "bounce"
	}
	return "bounce", "pitch"
}
