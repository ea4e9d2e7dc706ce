package compare

import (
	shape "github.com/ridemodes/ridemodes/identify/body"

	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/ingest"
)

// The decision rule is that of JCGM 106:2012 with guarded acceptance and
// guarded rejection, U = 2 sigma (k = 2) [memory: clause 8]. The numbers are
// chosen exact in binary so that "at the limit" is exactly at the limit.
func TestDecideAtLimits(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct {
		name                    string
		value, sigma, low, high float64
		want                    string
	}{
		// Two-sided [1, 5], U = 1.
		{"upper end of value+U at the limit", 4, 0.5, 1, 5, StatusPass},
		{"lower end of value-U at the limit", 2, 0.5, 1, 5, StatusPass},
		{"just inside", 3.999, 0.5, 1, 5, StatusPass},
		{"just across the upper limit", 4.001, 0.5, 1, 5, StatusInconclusive},
		{"value on the limit, straddling", 5, 0.5, 1, 5, StatusInconclusive},
		{"interval touching the limit from outside", 6, 0.5, 1, 5, StatusInconclusive},
		{"just wholly outside above", 6.001, 0.5, 1, 5, StatusFail},
		{"wholly outside below", -0.5, 0.5, 1, 5, StatusFail},
		{"U wider than the tolerance", 3, 3, 1, 5, StatusInconclusive},
		// One-sided: a least value (a MAC) and a greatest value.
		{"least only, inside", 0.95, 0.02, 0.9, nan, StatusPass},
		{"least only, straddling", 0.95, 0.03, 0.9, nan, StatusInconclusive},
		{"least only, wholly below", 0.85, 0.01, 0.9, nan, StatusFail},
		{"least only, far above", 1e9, 1, 0.9, nan, StatusPass},
		{"greatest only, inside", 9, 0.5, nan, 10, StatusPass},
		{"greatest only, wholly above", 11, 0.25, nan, 10, StatusFail},
		{"greatest only, straddling", 10, 0.125, nan, 10, StatusInconclusive},
		// Zero sigma: an exact value is judged on the value alone, limits included.
		{"exact value on the limit", 5, 0, 1, 5, StatusPass},
		{"exact value just outside", 5.0001, 0, 1, 5, StatusFail},
		// Unknown sigma: no confidence can be stated, however far inside.
		{"unknown sigma", 3, nan, 1, 5, StatusInconclusive},
		{"negative sigma", 3, -0.1, 1, 5, StatusInconclusive},
		{"infinite sigma", 3, math.Inf(1), 1, 5, StatusInconclusive},
		{"value not a number", nan, 0.1, 1, 5, StatusInconclusive},
	} {
		if got := decide(c.value, c.sigma, c.low, c.high); got != c.want {
			t.Errorf("%s: decide(%g, %g, %g, %g) = %s, want %s", c.name, c.value, c.sigma, c.low, c.high, got, c.want)
		}
	}
}

// assessed runs Assess on the hatchback of assessSetup built with the front
// ride rate scaled by frontScale; every measured value has the standard
// deviations sig, and edit may change the measured modes first.
func assessed(t *testing.T, frontScale float64, sig ModeSigma, edit func([]MeasuredMode)) *Assessment {
	t.Helper()
	setup, err := ingest.ParseSetup("hatch.toml", []byte(assessSetup))
	if err != nil {
		t.Fatal(err)
	}
	built := DesignOf(setup.Vehicle)
	built.FrontRateNPerM *= frontScale
	ms, err := built.Modes()
	if err != nil {
		t.Fatal(err)
	}
	meas := measuredFrom(ms, true, true)
	for i := range meas {
		meas[i].Sigma = sig
	}
	if edit != nil {
		edit(meas)
	}
	a, err := Assess(meas, nil, setup)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

var testSigma = ModeSigma{NaturalFrequencyHz: 0.005, DampingRatio: 0.005, PitchPerBounceRadPerM: 0.02}

func checkNamed(t *testing.T, cs []Check, name string) Check {
	t.Helper()
	for _, c := range cs {
		if c.Name == name {
			return c
		}
	}
	t.Fatalf("no check %s in %+v", name, cs)
	return Check{}
}

func TestFlaggedModeMakesItsChecksInconclusive(t *testing.T) {
	const reason = "Its peak does not rise above the noise."
	flagBounce := func(ms []MeasuredMode) {
		for i := range ms {
			if ms[i].Label == "bounce" {
				ms[i].Flagged, ms[i].FlagReasons = true, []string{reason}
			}
		}
	}
	// Front 20 % stiff: unflagged, the bounce frequency and the front ride
	// rate fail wholly outside (TestAssessVerdict); flagged, no check that
	// uses the bounce mode may pass or fail.
	a := assessed(t, 1.2, testSigma, flagBounce)
	for _, name := range []string{"bounce_frequency", "bounce_damping_ratio", "bounce_mode_shape",
		"front_ride_rate", "rear_ride_rate", "front_damping", "rear_damping"} {
		c := checkNamed(t, a.Checks, "target."+name)
		if c.Status != StatusInconclusive || !strings.Contains(c.Detail, reason) {
			t.Errorf("%s: %s, %s", name, c.Status, c.Detail)
		}
		if c.Quantity == nil {
			t.Errorf("%s lost its numbers", name)
		}
	}
	if c := checkNamed(t, a.Checks, "target.pitch_frequency"); c.Status != StatusPass {
		t.Errorf("the pitch frequency uses no flagged mode: %+v", c)
	}
	if a.Verdict.Status != StatusInconclusive || a.AnyFailed {
		t.Errorf("verdict %+v, AnyFailed %v", a.Verdict, a.AnyFailed)
	}
	if !strings.Contains(a.Verdict.Summary, "the bounce mode is flagged ("+reason+")") {
		t.Errorf("summary does not say why: %s", a.Verdict.Summary)
	}

	// The flag travels through the contract's JSON of a mode.
	ms, err := MeasuredFromJSON([]ModeJSON{
		{Label: "bounce", NaturalFrequencyHz: 1.1, Flagged: true, FlagReasons: []string{reason}},
		{Label: "pitch", NaturalFrequencyHz: 1.4},
	})
	if err != nil || !ms[0].Flagged || ms[0].FlagReasons[0] != reason || ms[1].Flagged {
		t.Errorf("flags from JSON: %+v, %v", ms, err)
	}
}

func TestUnknownSigmaIsInconclusive(t *testing.T) {
	// The same exact modes as designed, but without standard deviations: by
	// value alone everything is on target, yet no check can pass.
	a := assessed(t, 1, ModeSigma{}, nil)
	for _, c := range a.Checks {
		if !strings.HasPrefix(c.Name, "target.") {
			continue
		}
		if c.Status != StatusInconclusive || !strings.Contains(c.Detail, "no uncertainty is known") {
			t.Errorf("%s: %s, %s", c.Name, c.Status, c.Detail)
		}
		if c.Quantity == nil || c.Sigma != nil {
			t.Errorf("%s: want numbers with a null sigma, got %+v", c.Name, c.Quantity)
		}
	}
	if a.Verdict.Status != StatusInconclusive {
		t.Errorf("verdict %+v", a.Verdict)
	}
}

func TestVerdictSummaryNamesTheDecidingChecks(t *testing.T) {
	a := assessed(t, 1.2, testSigma, nil)
	if a.Verdict.Status != StatusFail {
		t.Fatalf("verdict %+v", a.Verdict)
	}
	// Front 20 % stiff against a tolerance of 5 %: the summary names the
	// failed checks with value, expanded uncertainty, difference and tolerance.
	for _, want := range []string{"front ride rate 48.0 ± ", " kN/m (k = 2), +20.0 % against design, tolerance ±5 %: fail",
		"Bounce frequency 1.227 ± 0.010 Hz (k = 2), +7.8 % against the model, tolerance ±5 %: fail"} {
		if !strings.Contains(a.Verdict.Summary, want) {
			t.Errorf("summary %q lacks %q", a.Verdict.Summary, want)
		}
	}
	if strings.Contains(a.Verdict.Summary, "pitch") {
		t.Errorf("summary names checks that passed: %s", a.Verdict.Summary)
	}
}

func TestVerdictOf(t *testing.T) {
	nan := math.NaN()
	pass := judged{name: "target.pitch_frequency", value: 1.3, sigma: 0.01, low: 1.2, high: 1.4, shown: shownHz}.check()
	open := openCheck("target.bounce_damping_ratio", "no damping ratio was measured for this mode")
	// Rear ride rate 45060 N/m against design 41000 N/m, tolerance 8 %:
	// value - U = 44860 N/m lies above the upper limit 44280 N/m.
	fail := judged{name: "target.rear_ride_rate", value: 45060, sigma: 100, low: 41000 * 0.92, high: 41000 * 1.08,
		shown: shownRate, against: "+9.9 % against design, tolerance ±8 %"}.check()
	oneSided := judged{name: "target.bounce_mode_shape", value: 0.95, sigma: 0.01, low: 0.9, high: nan, shown: shownRatio}.check()
	for _, c := range []struct {
		name    string
		checks  []Check
		want    string
		summary string
	}{
		{"no targets", nil, StatusNone, "No [targets] in the setup, so nothing was judged."},
		{"all pass", []Check{pass, oneSided}, StatusPass, "All 2 target checks pass, each value with its expanded " +
			"uncertainty (k = 2) inside its tolerance: pitch frequency, bounce mode shape."},
		{"inconclusive", []Check{pass, open}, StatusInconclusive, "Nothing failed, but bounce damping ratio: " +
			"inconclusive (no damping ratio was measured for this mode)."},
		{"fail beats inconclusive", []Check{pass, open, fail}, StatusFail,
			"Rear ride rate 45.1 ± 0.2 kN/m (k = 2), +9.9 % against design, tolerance ±8 %: fail."},
		{"more fails than named", []Check{fail, fail, fail, fail, fail}, StatusFail, ""},
	} {
		v := verdictOf(c.checks)
		if v.Status != c.want || (c.summary != "" && v.Summary != c.summary) {
			t.Errorf("%s: %+v, want %s %q", c.name, v, c.want, c.summary)
		}
	}
	if v := verdictOf([]Check{fail, fail, fail, fail, fail}); !strings.HasSuffix(v.Summary, "; and 2 more.") {
		t.Errorf("five fails: %s", v.Summary)
	}
	if oneSided.High != nil || oneSided.Low == nil || *oneSided.Low != 0.9 {
		t.Errorf("one-sided limits %+v", oneSided.Quantity)
	}
}

func TestGuidanceStaysGuidance(t *testing.T) {
	// As designed, the hatchback's bounce and pitch frequencies lie 1.20
	// apart (1.368/1.139), on the guidance's limit: a warning, which must
	// not touch the verdict.
	a := assessed(t, 1, testSigma, nil)
	warned := false
	for _, c := range a.Checks {
		if !strings.HasPrefix(c.Name, "guidance.") {
			continue
		}
		if c.Status != StatusPass && c.Status != StatusWarn {
			t.Errorf("guidance %s has status %s", c.Name, c.Status)
		}
		if c.Quantity != nil {
			t.Errorf("guidance %s carries tolerance numbers", c.Name)
		}
		warned = warned || c.Status == StatusWarn
	}
	if !warned {
		t.Fatal("the case should raise a guidance warning")
	}
	if a.Verdict.Status != StatusPass {
		t.Errorf("verdict %+v", a.Verdict)
	}
}

func TestResultJSONKeys(t *testing.T) {
	a := assessed(t, 1, testSigma, nil)
	r := Result{Modes: []ModeJSON{
		{Label: "bounce", NaturalFrequencyHz: 1.14, Flagged: true, FlagReasons: []string{"A reason."}},
		{Label: "pitch", NaturalFrequencyHz: 1.37},
	}}
	a.Fill(&r)
	data, err := r.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Modes   []map[string]json.RawMessage `json:"modes"`
		Checks  []map[string]json.RawMessage `json:"checks"`
		Verdict map[string]json.RawMessage   `json:"verdict"`
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	// The contract's keys, as it writes them.
	if string(doc.Verdict["status"]) != `"pass"` || doc.Verdict["summary"] == nil {
		t.Errorf("verdict %s", data)
	}
	var reasons []string
	if err := json.Unmarshal(doc.Modes[0]["flag_reasons"], &reasons); err != nil || string(doc.Modes[0]["flagged"]) != "true" ||
		len(reasons) != 1 || reasons[0] != "A reason." {
		t.Errorf("flagged mode %v", doc.Modes[0])
	}
	if string(doc.Modes[1]["flagged"]) != "false" || doc.Modes[1]["flag_reasons"] != nil {
		t.Errorf("unflagged mode: flagged always, flag_reasons only when there are some: %v", doc.Modes[1])
	}
	units := map[string]string{"target.bounce_frequency": `"Hz"`, "target.front_ride_rate": `"N/m"`,
		"target.rear_damping": `"N s/m"`, "target.pitch_damping_ratio": `"1"`, "target.pitch_mode_shape": `"1"`}
	for _, c := range doc.Checks {
		name := strings.Trim(string(c["name"]), `"`)
		if strings.HasPrefix(name, "guidance.") {
			if c["value"] != nil {
				t.Errorf("%s has a value", name)
			}
			continue
		}
		for _, k := range []string{"value", "unit", "sigma", "low", "high"} {
			if c[k] == nil {
				t.Errorf("%s lacks %q", name, k)
			}
		}
		if u, ok := units[name]; ok && string(c["unit"]) != u {
			t.Errorf("%s unit %s, want %s", name, c["unit"], u)
		}
		if strings.HasSuffix(name, "_mode_shape") && string(c["high"]) != "null" {
			t.Errorf("%s: a one-sided limit leaves high null, got %s", name, c["high"])
		}
	}
	// Round trip: the numbers come back.
	var back Result
	if err := json.Unmarshal(data, &back); err != nil {
		t.Fatal(err)
	}
	c := checkNamed(t, back.Checks, "target.front_ride_rate")
	if c.Quantity == nil || c.Sigma == nil || c.Low == nil || c.High == nil || back.Verdict == nil || !back.Modes[0].Flagged {
		t.Errorf("round trip lost numbers: %+v, verdict %v", c, back.Verdict)
	}
}

func TestMACSigma(t *testing.T) {
	// An undamped model has real shapes; the measured bounce mode is given by
	// its pitch per bounce, off the model's so that the MAC is below 1.
	body := dampedCase
	body.FrontDampingNsPerM, body.RearDampingNsPerM = 0, 0
	ms, err := body.Modes()
	if err != nil {
		t.Fatal(err)
	}
	model := ms[0]
	const sp = 0.03
	ppb := model.PitchPerBounceRadPerM + 0.1
	sensors := []float64{1.0, -1.3}
	rigid := func(p float64) []complex128 {
		return []complex128{complex(1-sensors[0]*p, 0), complex(1-sensors[1]*p, 0)}
	}
	pv := []complex128{model.ShapeAt(sensors[0]), model.ShapeAt(sensors[1])}
	meas := MeasuredMode{Label: model.Label, PitchPerBounceRadPerM: ppb, Sigma: ModeSigma{PitchPerBounceRadPerM: sp}}
	mac, sig, ok := MACSigma(meas, model, sensors, body)
	if !ok {
		t.Fatal("no sigma")
	}
	// Physical check: MAC - 2 sigma is the MAC at the worse end of
	// ppb ± 2 sigma_ppb (the MAC falls monotonically away from the model's
	// shape), computed directly.
	worst := math.Min(shape.MAC(rigid(ppb-2*sp), pv), shape.MAC(rigid(ppb+2*sp), pv))
	const tol = 1e-12
	if math.Abs(mac-shape.MAC(rigid(ppb), pv)) > tol || math.Abs(mac-2*sig-worst) > tol || !(sig > 0) {
		t.Errorf("MAC %.15f sigma %.3g; want MAC - 2 sigma = %.15f", mac, sig, worst)
	}
	// The same rigid shape as a sensor shape, at any scale and phase, gives
	// the same numbers (the MAC and the heave both follow the scale).
	scale := complex(0.3, -0.4)
	shaped := meas
	shaped.Shape = []SensorValue{{sensors[0], scale * rigid(ppb)[0]}, {sensors[1], scale * rigid(ppb)[1]}}
	mac2, sig2, ok := MACSigma(shaped, model, nil, body)
	if !ok || math.Abs(mac2-mac) > tol || math.Abs(sig2-sig) > tol {
		t.Errorf("sensor shape: MAC %g sigma %g, want %g %g", mac2, sig2, mac, sig)
	}
	// At the model's own shape the MAC is 1 and flat; the interval still
	// gives a sigma where first-order propagation would give 0.
	at := meas
	at.PitchPerBounceRadPerM = model.PitchPerBounceRadPerM
	if m, s, ok := MACSigma(at, model, sensors, body); !ok || math.Abs(m-1) > tol || !(s > 0) {
		t.Errorf("at the maximum: MAC %g sigma %g", m, s)
	}
	// Without a standard deviation, or with a shape at one position, there is none.
	none := meas
	none.Sigma = ModeSigma{}
	if _, _, ok := MACSigma(none, model, sensors, body); ok {
		t.Error("sigma without a standard deviation of the pitch per bounce")
	}
	one := shaped
	one.Shape = []SensorValue{{1.0, 1}, {1.0, 0.9}}
	if _, _, ok := MACSigma(one, model, nil, body); ok {
		t.Error("sigma from a shape at a single position")
	}
}
