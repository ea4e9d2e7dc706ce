package body

import (
	"math"
	"testing"
)

// TestBodyLabels checks the label rule of the contract (the mode whose node
// lies farther from the CG is bounce). The first pair of nodes is Rao's
// pitch-and-bounce example [published: S. S. Rao, Mechanical Vibrations]:
// 2.646 m behind and 0.306 m ahead of the CG, bounce and pitch.
func TestBodyLabels(t *testing.T) {
	for _, c := range []struct {
		n0, n1 float64
		l0     string
	}{
		{-2.646, 0.306, "bounce"},
		{0.306, -2.646, "pitch"},
		{0.3, math.NaN(), "pitch"}, // no node: infinitely far
		{math.NaN(), -0.5, "bounce"},
	} {
		l0, l1 := BodyLabels(c.n0, c.n1)
		if l0 != c.l0 || l0 == l1 {
			t.Errorf("nodes %g, %g m: labels %s, %s; want %s first", c.n0, c.n1, l0, l1, c.l0)
		}
	}
}

// TestSortAndLabel checks the one rule that finishes both routes' modes:
// sorted by natural frequency, labelled by BodyLabels, and the node's sd
// NaN (undetermined) exactly when the mode has no node or its pitch per
// bounce is zero within NodeDeterminedSDs of its sd.
func TestSortAndLabel(t *testing.T) {
	mode := func(fnHz, ppb, sdPPB float64) Mode {
		return Mode{NaturalFrequencyHz: fnHz, PitchPerBounceRadPerM: ppb, NodeM: NodeM(ppb, 1.5),
			SD: SD{PitchPerBounceRadPerM: sdPPB, NodeM: sdPPB / (ppb * ppb)}}
	}
	for _, c := range []struct {
		name          string
		in            [2]Mode
		labels        [2]string
		nodeSDDefined [2]bool
	}{
		{"determined, given in descending frequency",
			[2]Mode{mode(1.4, 1.6, 0.01), mode(1.1, -0.45, 0.003)}, [2]string{"bounce", "pitch"}, [2]bool{true, true}},
		{"pitch at exactly two sd is undetermined",
			[2]Mode{mode(1.1, -0.02, 0.01), mode(1.4, 1.6, 0.01)}, [2]string{"bounce", "pitch"}, [2]bool{false, true}},
		{"pitch just over two sd is determined",
			[2]Mode{mode(1.1, -0.0201, 0.01), mode(1.4, 1.6, 0.01)}, [2]string{"bounce", "pitch"}, [2]bool{true, true}},
		{"no node, though the pitch is over two sd",
			[2]Mode{mode(1.1, 1e-12, 1e-14), mode(1.4, 1.6, 0.01)}, [2]string{"bounce", "pitch"}, [2]bool{false, true}},
		{"the lower mode pitches",
			[2]Mode{mode(1.1, 2.5, 0.01), mode(1.4, 0.2, 0.01)}, [2]string{"pitch", "bounce"}, [2]bool{true, true}},
	} {
		ms := []Mode{c.in[0], c.in[1]}
		SortAndLabel(ms)
		if ms[0].NaturalFrequencyHz > ms[1].NaturalFrequencyHz {
			t.Errorf("%s: frequencies %g, %g Hz not ascending", c.name, ms[0].NaturalFrequencyHz, ms[1].NaturalFrequencyHz)
		}
		for i, m := range ms {
			if m.Label != c.labels[i] {
				t.Errorf("%s: mode %d labelled %s, want %s", c.name, i, m.Label, c.labels[i])
			}
			if defined := !math.IsNaN(m.SD.NodeM); defined != c.nodeSDDefined[i] {
				t.Errorf("%s: mode %d (ppb %g +- %g) node sd %g, want defined %v", c.name, i,
					m.PitchPerBounceRadPerM, m.SD.PitchPerBounceRadPerM, m.SD.NodeM, c.nodeSDDefined[i])
			}
		}
	}
}
