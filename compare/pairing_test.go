package compare

import (
	"math"
	"strings"
	"testing"
)

func TestCompareWarnsOnSwappedLabels(t *testing.T) {
	// Undamped: real shapes, so (1, pitch per bounce) is the whole shape and
	// the MAC with the model is exactly 1 (a damped mode's complex shape is
	// not, and its MAC from the real part alone falls a little below 1).
	v := dampedCase
	v.FrontDampingNsPerM, v.RearDampingNsPerM = 0, 0
	ms, _ := v.Modes()
	meas := measuredFrom(ms, true, false)
	cmp, warns, err := Compare(meas, v, []float64{1.1, -1.4})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cmp {
		if math.Abs(c.DifferencePct) > 1e-9 || math.Abs(c.MAC-1) > 1e-9 || !c.ShapeMeasured {
			t.Errorf("exact modes: %+v", c)
		}
	}
	if len(warns) != 0 {
		t.Errorf("unexpected warnings %v", warns)
	}
	meas[0].Label, meas[1].Label = meas[1].Label, meas[0].Label
	_, warns, err = Compare(meas, v, []float64{1.1, -1.4})
	if err != nil {
		t.Fatal(err)
	}
	if len(warns) != 1 || !strings.Contains(warns[0], "pair the other way round") {
		t.Errorf("swapped labels: warnings %v", warns)
	}
	if _, _, err := Compare(meas[:1], v, nil); err == nil {
		t.Error("one mode should be an error")
	}
}

func TestMeasuredFromJSON(t *testing.T) {
	node := -2.5
	sigNode := 0.25
	js := []ModeJSON{
		{Label: "bounce", NaturalFrequencyHz: 1.2, NodeM: &node, Uncertainty: &Uncertainty{NaturalFrequencyHz: 0.02, NodeM: &sigNode}},
		{Label: "pitch", NaturalFrequencyHz: 1.5, DampingRatio: 0.3,
			SensorShape: []SensorShapeJSON{{XM: 1, Re: -0.5, Im: 0.1}, {XM: -1.4, Re: 1.6}}},
	}
	ms, err := MeasuredFromJSON(js)
	if err != nil {
		t.Fatal(err)
	}
	// ppb = 1/node, sigma = sigma_node/node^2 (first-order propagation).
	if ms[0].PitchPerBounceRadPerM != 1/node || ms[0].Sigma.PitchPerBounceRadPerM != sigNode/(node*node) {
		t.Errorf("bounce: %+v", ms[0])
	}
	if ms[0].HasDamping() || !ms[1].HasDamping() || len(ms[1].Shape) != 2 {
		t.Errorf("damping or shape not read: %+v", ms)
	}
	for _, bad := range []ModeJSON{{Label: "heave", NaturalFrequencyHz: 1}, {Label: "pitch", NaturalFrequencyHz: -1},
		{Label: "pitch", NaturalFrequencyHz: 1, DampingRatio: 1.5}} {
		if _, err := MeasuredFromJSON([]ModeJSON{bad}); err == nil {
			t.Errorf("%+v should be an error", bad)
		}
	}
}
