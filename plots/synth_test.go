package plots

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
)

// The invented test car of these tests (our own numbers, not a real
// vehicle): a body on front and rear ride rates and dampers, with sensors
// near each axle.
const (
	carMassKg       = 1450.0
	carInertiaKgm2  = 2050.0
	carFrontM       = 1.15 // a
	carRearM        = 1.45 // b
	carFrontNPerM   = 38000.0
	carRearNPerM    = 41000.0
	carFrontNsPerM  = 3300.0
	carRearNsPerM   = 3100.0
	sensorFrontXM   = 1.0
	sensorRearXM    = -1.3
	synthBins       = 240
	synthMaxFreqHz  = 6.0
	synthSeed       = 7
	synthNoiseLevel = 0.04
)

// bodyFRF returns the accelerance ratio of the body motion w at sensor
// positions sensorsXM to the front and rear pan motions at f Hz, from the
// two-degree-of-freedom model of package compare's doc comment.
func bodyFRF(fHz float64, sensorsXM []float64) (front, rear []complex128) {
	a, b := carFrontM, carRearM
	kf, kr, cf, cr := carFrontNPerM, carRearNPerM, carFrontNsPerM, carRearNsPerM
	om := 2 * math.Pi * fHz
	s := complex(0, om)
	// Dynamic stiffness D = -om^2 M + s C + K.
	d11 := complex(-om*om*carMassKg+kf+kr, 0) + s*complex(cf+cr, 0)
	d12 := complex(-a*kf+b*kr, 0) + s*complex(-a*cf+b*cr, 0)
	d22 := complex(-om*om*carInertiaKgm2+a*a*kf+b*b*kr, 0) + s*complex(a*a*cf+b*b*cr, 0)
	det := d11*d22 - d12*d12
	// Input matrix columns (front, rear).
	in := [2][2]complex128{
		{complex(kf, 0) + s*complex(cf, 0), complex(kr, 0) + s*complex(cr, 0)},
		{complex(-a*kf, 0) + s*complex(-a*cf, 0), complex(b*kr, 0) + s*complex(b*cr, 0)},
	}
	for _, x := range sensorsXM {
		var h [2]complex128
		for j := range 2 {
			z := (d22*in[0][j] - d12*in[1][j]) / det
			th := (-d12*in[0][j] + d11*in[1][j]) / det
			h[j] = z - complex(x, 0)*th
		}
		front = append(front, h[0])
		rear = append(rear, h[1])
	}
	return front, rear
}

// synthFRF returns FRFs of the test car with a noisy "measured" curve, an
// error band, the exact curve as the fit, coherence and two markers.
func synthFRF(logFreq bool) FRFData {
	rng := rand.New(rand.NewPCG(synthSeed, 1))
	d := FRFData{LogFrequency: logFreq, Markers: []Marker{{Label: "bounce 1.14 Hz", FreqHz: 1.14}, {Label: "pitch 1.37 Hz", FreqHz: 1.37}}}
	for k := range synthBins {
		d.FreqHz = append(d.FreqHz, float64(k)*synthMaxFreqHz/synthBins)
	}
	names := []string{"body_front / pan_f", "body_rear / pan_r"}
	d.Curves = make([]FRFCurve, 2)
	d.Coherence = []Series{{Name: "body_front"}, {Name: "body_rear"}}
	for i := range d.Curves {
		c := &d.Curves[i]
		c.Name = names[i]
		for _, f := range d.FreqHz {
			hf, hr := bodyFRF(f, []float64{sensorFrontXM, sensorRearXM})
			h := hf[0]
			if i == 1 {
				h = hr[1]
			}
			noise := 1 + synthNoiseLevel*rng.NormFloat64()
			mag := cmplx.Abs(h)
			c.Magnitude = append(c.Magnitude, mag*noise)
			c.PhaseDeg = append(c.PhaseDeg, cmplx.Phase(h)*180/math.Pi+2*rng.NormFloat64())
			c.Lower = append(c.Lower, mag*noise*(1-2*synthNoiseLevel))
			c.Upper = append(c.Upper, mag*noise*(1+2*synthNoiseLevel))
			c.FitMagnitude = append(c.FitMagnitude, mag)
			c.FitPhaseDeg = append(c.FitPhaseDeg, cmplx.Phase(h)*180/math.Pi)
			coh := 0.97 - 0.25*math.Exp(-f) + 0.01*rng.NormFloat64()
			d.Coherence[i].Values = append(d.Coherence[i].Values, math.Min(coh, 1))
		}
	}
	return d
}

// synthShapes returns the shape figure input for the test car: a bounce mode
// with its node behind the rear axle and a pitch mode with its node inside
// the wheelbase.
func synthShapes() ShapeData {
	return ShapeData{
		FrontM:   carFrontM,
		RearM:    carRearM,
		SensorXM: []float64{sensorFrontXM, sensorRearXM},
		Modes: []ShapeMode{
			{
				Label:    "bounce",
				Measured: &ShapeLine{FreqHz: 1.13, DampingRatio: 0.29, PitchPerBounceRadPerM: -0.21},
				Model:    &ShapeLine{FreqHz: 1.14, DampingRatio: 0.30, PitchPerBounceRadPerM: -0.18},
				SensorW:  []float64{1 + sensorFrontXM*0.21 + 0.02, 1 + sensorRearXM*0.21 - 0.03},
			},
			{
				Label:    "pitch",
				Measured: &ShapeLine{FreqHz: 1.39, DampingRatio: 0.33, PitchPerBounceRadPerM: 2.9},
				Model:    &ShapeLine{FreqHz: 1.37, DampingRatio: 0.32, PitchPerBounceRadPerM: 3.3},
				SensorW:  []float64{1 - sensorFrontXM*2.9 + 0.05, 1 - sensorRearXM*2.9 + 0.04},
			},
		},
	}
}

// synthIndicator returns singular values of the test car's 2x2 FRF matrix.
func synthIndicator() IndicatorData {
	d := IndicatorData{Peaks: []Marker{{Label: "1.14 Hz", FreqHz: 1.14}, {Label: "1.37 Hz", FreqHz: 1.37}}}
	d.Values = make([]Series, 2)
	d.Values[0].Name, d.Values[1].Name = "first", "second"
	for k := 1; k <= synthBins; k++ {
		f := float64(k) * synthMaxFreqHz / synthBins
		hf, hr := bodyFRF(f, []float64{sensorFrontXM, sensorRearXM})
		// Singular values of [[hf0, hr0], [hf1, hr1]] from the eigenvalues
		// of A^H A.
		p := cmplx.Abs(hf[0])*cmplx.Abs(hf[0]) + cmplx.Abs(hf[1])*cmplx.Abs(hf[1])
		q := cmplx.Abs(hr[0])*cmplx.Abs(hr[0]) + cmplx.Abs(hr[1])*cmplx.Abs(hr[1])
		r := cmplx.Abs(cmplx.Conj(hf[0])*hr[0] + cmplx.Conj(hf[1])*hr[1])
		disc := math.Sqrt((p-q)*(p-q)/4 + r*r)
		d.FreqHz = append(d.FreqHz, f)
		d.Values[0].Values = append(d.Values[0].Values, math.Sqrt((p+q)/2+disc))
		d.Values[1].Values = append(d.Values[1].Values, math.Sqrt(math.Max((p+q)/2-disc, 1e-12)))
	}
	return d
}

// synthStab returns a stabilisation diagram of invented poles settling on
// the two body modes as the model order grows.
func synthStab() StabData {
	rng := rand.New(rand.NewPCG(synthSeed, 2))
	ind := synthIndicator()
	d := StabData{IndicatorFreqHz: ind.FreqHz, Indicator: ind.Values[0].Values,
		Selected: []Marker{{Label: "bounce", FreqHz: 1.14}, {Label: "pitch", FreqHz: 1.37}}}
	for order := 2; order <= 30; order += 2 {
		for _, fHz := range []float64{1.14, 1.37} {
			spread := 0.3 / float64(order)
			status := PoleStable
			switch {
			case order < 6:
				status = PoleNew
			case order < 10:
				status = PoleFrequencyOnly
			}
			d.Poles = append(d.Poles, StabPole{Order: order, FreqHz: fHz + spread*rng.NormFloat64(), Status: status})
		}
		for range order / 6 {
			d.Poles = append(d.Poles, StabPole{Order: order, FreqHz: 0.2 + 5.5*rng.Float64(), Status: PoleNew})
		}
	}
	return d
}

// synthDecay returns a two-sensor free decay after a drop at 0.5 s with the
// fitted response over the fit window.
func synthDecay() DecayData {
	rng := rand.New(rand.NewPCG(synthSeed, 3))
	const rateHz, dropS, endS = 200.0, 0.5, 5.0
	resp := func(t, ampl, fHz, zeta, phase float64) float64 {
		if t < dropS {
			return 0
		}
		om := 2 * math.Pi * fHz
		tt := t - dropS
		return ampl * math.Exp(-zeta*om*tt) * math.Cos(om*math.Sqrt(1-zeta*zeta)*tt+phase)
	}
	d := DecayData{WindowStartS: 0.6, WindowEndS: 3.5, Unit: "m/s²",
		Measured: []Series{{Name: "body_front"}, {Name: "body_rear"}}, Fitted: []Series{{Name: "body_front fit"}, {Name: "body_rear fit"}}}
	for k := 0; float64(k)/rateHz < endS; k++ {
		t := float64(k) / rateHz
		front := resp(t, 3.1, 1.13, 0.29, 0) + resp(t, 1.2, 1.39, 0.33, 0.4)
		rear := resp(t, 2.6, 1.13, 0.29, 0.1) - resp(t, 1.7, 1.39, 0.33, 0.4)
		d.TimeS = append(d.TimeS, t)
		d.Measured[0].Values = append(d.Measured[0].Values, front+0.05*rng.NormFloat64())
		d.Measured[1].Values = append(d.Measured[1].Values, rear+0.05*rng.NormFloat64())
		if t >= d.WindowStartS && t <= d.WindowEndS {
			d.FitTimeS = append(d.FitTimeS, t)
			d.Fitted[0].Values = append(d.Fitted[0].Values, front)
			d.Fitted[1].Values = append(d.Fitted[1].Values, rear)
		}
	}
	return d
}
