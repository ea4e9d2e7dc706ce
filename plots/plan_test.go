package plots

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare/plan"
)

// inventedPlan returns an invented drop plan: two wanted values against the
// number of drops, the second falling under the wanted sd at three drops.
func inventedPlan() *plan.Plan {
	n := 3
	ratio := func(r float64) *float64 { return &r }
	sd := 0.004
	p := &plan.Plan{Test: "drop", DurationS: 7, SampleRateHz: 200, Drops: &n, NoiseSDMPerS2: 0.02,
		Drop:        &plan.DropJSON{HeightM: 0.04, PreTriggerS: 1},
		SensorSpanM: [2]float64{-1.5, 1.2}, Meets: true,
		Sensors: []plan.SensorAdvice{{Channel: "front", XM: 1.2, Warnings: []string{"front sits near the pitch node"}}},
		Checks: []plan.Check{{Key: "bounce.natural_frequency_hz", Name: "bounce natural frequency", Unit: "Hz", WantedSD: 0.0125,
			PredictedSD: &sd, Ratio: ratio(0.32)}},
		Prediction: plan.PredictionJSON{Method: "an invented method", Margin: 1.25},
		Curve: plan.Curve{XLabel: "drops pooled", X: []float64{1, 2, 3, 4}, Chosen: 3, Series: []plan.CurveSeries{
			{Name: "bounce natural frequency", Ratio: []float64{0.55, 0.39, 0.32, 0.28}},
			{Name: "pitch damping ratio", Ratio: []float64{1.3, 0.92, 0.75, 0.65}}}},
		Warnings: []string{}}
	return p
}

func TestPlanFigureRefusesBadData(t *testing.T) {
	d := planData(inventedPlan())
	if _, err := PlanFigure(d); err != nil {
		t.Fatal(err)
	}
	d.Series[1].Values = []float64{1, math.NaN(), 0.5, 0.4}
	var se *SeriesError
	if _, err := PlanFigure(d); !errors.As(err, &se) || se.Index != 1 {
		t.Errorf("NaN ratio: %v", err)
	}
	d = planData(inventedPlan())
	d.Series[0].Values = d.Series[0].Values[:2]
	if _, err := PlanFigure(d); !errors.As(err, &se) || se.Index != -1 {
		t.Errorf("short series: %v", err)
	}
}

func TestPlanTextAndPage(t *testing.T) {
	p := inventedPlan()
	var buf bytes.Buffer
	WritePlan(&buf, p)
	for _, want := range []string{"Plan: drop test", "3 drops of 40 mm", "bounce natural frequency", "0.32",
		"front sits near the pitch node", "predicted to meet"} {
		if !strings.Contains(buf.String(), want) {
			t.Errorf("text lacks %q:\n%s", want, buf.String())
		}
	}
	dir := filepath.Join(t.TempDir(), "plan")
	written, err := WritePlanReport(dir, p)
	if err != nil {
		t.Fatal(err)
	}
	if len(written) != 2 || filepath.Base(written[0]) != "plan-curve.png" || filepath.Base(written[1]) != PlanReportFile {
		t.Fatalf("written %v", written)
	}
	page, err := os.ReadFile(written[1])
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`id="verdict"`, `data-verdict="none"`, "Safety:", "<svg", "front sits near the pitch node"} {
		if !strings.Contains(string(page), want) {
			t.Errorf("page lacks %q", want)
		}
	}
}
