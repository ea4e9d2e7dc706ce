package plots

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// labelled returns the labelled values of ticks, and the unlabelled ones.
func labelled(ticks []plot.Tick) (major, minor []float64) {
	for _, t := range ticks {
		if t.Label != "" {
			major = append(major, t.Value)
		} else {
			minor = append(minor, t.Value)
		}
	}
	return major, minor
}

// sameValues reports whether got and want agree to 1e-12.
func sameValues(got, want []float64) bool {
	return slices.EqualFunc(got, want, func(a, b float64) bool { return math.Abs(a-b) < 1e-12 })
}

// TestLogTicks: a log frequency axis over the usual 0.5-4 Hz band is
// labelled at 0.5, 1, 2, 3 and 4 Hz with unlabelled ticks at the other whole
// multiples (common practice for log axes: every multiple 1-9 of a power
// of ten is ticked, as many labelled as the span leaves room for).
func TestLogTicks(t *testing.T) {
	cases := []struct {
		lo, hi       float64
		major, minor []float64
	}{
		{0.5, 4, []float64{0.5, 1, 2, 3, 4}, []float64{0.6, 0.7, 0.8, 0.9}},
		{0.3, 5, []float64{0.3, 0.4, 0.5, 1, 2, 3, 4, 5}, []float64{0.6, 0.7, 0.8, 0.9}},
		{0.05, 40, []float64{0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20}, nil},
		{1e-4, 30, []float64{1e-4, 1e-3, 0.01, 0.1, 1, 10}, nil},
	}
	for _, tc := range cases {
		major, minor := labelled(logTicks.Ticks(tc.lo, tc.hi))
		if !sameValues(major, tc.major) {
			t.Errorf("%g-%g: labelled ticks %v, want %v", tc.lo, tc.hi, major, tc.major)
		}
		if tc.minor != nil && !sameValues(minor, tc.minor) {
			t.Errorf("%g-%g: unlabelled ticks %v, want %v", tc.lo, tc.hi, minor, tc.minor)
		}
	}
	// A span without two whole multiples falls back to linear ticks.
	if major, _ := labelled(logTicks.Ticks(1.1, 1.9)); len(major) < 2 {
		t.Errorf("1.1-1.9: labelled ticks %v, want the linear fallback", major)
	}
}

// TestFRFAxes: the FRF figure of a rig test over 0.5-4 Hz (bins that start
// and end inside the band) shows the whole band labelled 0.5, 1, 2, 3, 4 Hz
// on every panel, its phase on whole multiples of 90 degrees labelled every
// 90, and keeps the top band of the magnitude panel, where the mode labels
// go, free of data.
func TestFRFAxes(t *testing.T) {
	d := synthFRF(true)
	var keep []int
	for k, f := range d.FreqHz {
		if f >= 0.52 && f <= 3.98 {
			keep = append(keep, k)
		}
	}
	d = subsetFRF(d, keep)
	fig, err := FRFFigure(d)
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range fig.panels {
		major, _ := labelled(p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max))
		if !sameValues(major, []float64{0.5, 1, 2, 3, 4}) {
			t.Errorf("panel %d: frequency labels %v, want 0.5 1 2 3 4 Hz", i, major)
		}
	}
	phase := fig.panels[1]
	if math.Mod(phase.Y.Min, 90) != 0 || math.Mod(phase.Y.Max, 90) != 0 {
		t.Errorf("phase axis %g to %g deg, want whole multiples of 90", phase.Y.Min, phase.Y.Max)
	}
	major, minor := labelled(phase.Y.Tick.Marker.Ticks(phase.Y.Min, phase.Y.Max))
	for i, v := range major {
		if math.Mod(v, 90) != 0 || (i > 0 && v-major[i-1] != 90) {
			t.Errorf("phase labels %v, want every 90 deg", major)
			break
		}
	}
	if len(major) < 3 || len(minor) == 0 {
		t.Errorf("phase ticks: labelled %v, unlabelled %v", major, minor)
	}
	mag := fig.panels[0]
	hi := 0.0
	for _, c := range d.Curves {
		for _, ys := range [][]float64{c.Magnitude, c.Upper, c.FitMagnitude} {
			hi = math.Max(hi, slices.Max(ys))
		}
	}
	free := math.Log(mag.Y.Max/hi) / math.Log(mag.Y.Max/mag.Y.Min)
	if free < labelBand-1e-9 {
		t.Errorf("top %.2f of the magnitude axis is free of data, want %.2f for the mode labels", free, labelBand)
	}
}

// subsetFRF keeps the bins keep of d.
func subsetFRF(d FRFData, keep []int) FRFData {
	pick := func(xs []float64) []float64 {
		if xs == nil {
			return nil
		}
		var out []float64
		for _, k := range keep {
			out = append(out, xs[k])
		}
		return out
	}
	d.FreqHz = pick(d.FreqHz)
	for i := range d.Curves {
		c := &d.Curves[i]
		c.Magnitude, c.PhaseDeg, c.Lower, c.Upper = pick(c.Magnitude), pick(c.PhaseDeg), pick(c.Lower), pick(c.Upper)
		c.FitMagnitude, c.FitPhaseDeg = pick(c.FitMagnitude), pick(c.FitPhaseDeg)
	}
	for i := range d.Coherence {
		d.Coherence[i].Values = pick(d.Coherence[i].Values)
	}
	return d
}

// fourPostFRF is the FRF input of a four-post rig: four body sensors, four
// pans, sixteen curves named by output and input, from the invented test
// car's model (synth_test.go), the rear pans' curves scaled down a little
// so that the curves differ.
func fourPostFRF() FRFData {
	base := synthFRF(true)
	d := FRFData{FreqHz: base.FreqHz, LogFrequency: true, Markers: base.Markers}
	for o := range 4 {
		for i := range 4 {
			src := base.Curves[(o+i)%2]
			scale := 1 / (1 + 0.2*float64(o) + 0.1*float64(i))
			c := FRFCurve{Name: fmt.Sprintf("body_%d / pan_%d", o+1, i+1), Output: fmt.Sprintf("body_%d", o+1), Input: fmt.Sprintf("pan_%d", i+1),
				PhaseDeg: src.PhaseDeg, FitPhaseDeg: src.FitPhaseDeg}
			for k := range src.Magnitude {
				c.Magnitude = append(c.Magnitude, src.Magnitude[k]*scale)
				c.FitMagnitude = append(c.FitMagnitude, src.FitMagnitude[k]*scale)
			}
			d.Curves = append(d.Curves, c)
		}
		d.Coherence = append(d.Coherence, Series{Name: fmt.Sprintf("body_%d", o+1), Values: base.Coherence[o%2].Values})
	}
	return d
}

// TestLegendsOutsideData lays out every figure and checks that each legend
// sits in the column right of the data areas, within the figure, without
// meeting any panel's data area; and that a four-post rig's sixteen FRFs
// get a legend of ten entries (four sensors, four pans, measured and
// fitted) that fits beside the magnitude panel.
func TestLegendsOutsideData(t *testing.T) {
	for _, tc := range figureCases() {
		t.Run(tc.name, func(t *testing.T) {
			fig, err := tc.make()
			if err != nil {
				t.Fatal(err)
			}
			w, h := fig.Size()
			c := draw.New(vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(72)))
			l := fig.layout(c)
			legends := 0
			for i, box := range l.legends {
				if box.Size().X == 0 {
					continue
				}
				legends++
				if box.Min.X < 0 || box.Min.Y < 0 || box.Max.X > w || box.Max.Y > h {
					t.Errorf("legend %d at %v lies outside the %v x %v figure", i, box, w, h)
				}
				for j, data := range l.data {
					if overlaps(box, []vg.Rectangle{data}) {
						t.Errorf("legend %d at %v meets the data area of panel %d at %v", i, box, j, data)
					}
				}
			}
			if legends == 0 {
				t.Error("figure has no legend")
			}
			for j := 1; j < len(l.data); j++ {
				// Glyphs at the ends of a panel's curves pad its data area by
				// a hair; half a point is aligned to the eye.
				if math.Abs(float64(l.data[j].Min.X-l.data[0].Min.X)) > 0.5 || math.Abs(float64(l.data[j].Max.X-l.data[0].Max.X)) > 0.5 {
					t.Errorf("panel %d's data area spans %v-%v, panel 0's %v-%v: not aligned", j, l.data[j].Min.X, l.data[j].Max.X, l.data[0].Min.X, l.data[0].Max.X)
				}
			}
			if tc.name == "frf_fourpost" {
				_, lh := legendSize(&fig.legends[0])
				entry := fig.legends[0].TextStyle.Rectangle("from pan_1 Hg").Max.Y
				if n := int(math.Round(float64((lh + fig.legends[0].Padding) / (entry + fig.legends[0].Padding)))); n != 10 {
					t.Errorf("four-post legend has %d entries, want 10", n)
				}
				if data := l.data[0]; lh > data.Size().Y {
					t.Errorf("four-post legend is %v high beside a %v high panel", lh, data.Size().Y)
				}
			}
		})
	}
}
