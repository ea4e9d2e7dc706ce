package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"

	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

// figure is one reported value the sweep judges.
type figure struct {
	name string // for the tables
	key  string // for the CSV: the mode's label or "updated", and the contract's JSON key
	// relative: the error is stated in % of the truth (frequencies, rates,
	// damping); otherwise in the value's own unit.
	relative bool
	unit     string // of the error
	mode     string // "bounce" or "pitch" for a mode's value, "" for the rates
}

// figures are the judged values, in the table's order.
var figures = func() []figure {
	var fs []figure
	for _, m := range []string{"bounce", "pitch"} {
		fs = append(fs,
			figure{name: m + ": natural frequency", key: m + ".natural_frequency_hz", relative: true, unit: "%", mode: m},
			figure{name: m + ": damping ratio", key: m + ".damping_ratio", unit: "1", mode: m},
			figure{name: m + ": pitch per bounce", key: m + ".pitch_per_bounce_rad_per_m", unit: "rad/m", mode: m},
			figure{name: m + ": node", key: m + ".node_m", unit: "m", mode: m})
	}
	return append(fs,
		figure{name: "front rate", key: "updated.front_rate_n_per_m", relative: true, unit: "%"},
		figure{name: "rear rate", key: "updated.rear_rate_n_per_m", relative: true, unit: "%"},
		figure{name: "front damping", key: "updated.front_damping_ns_per_m", relative: true, unit: "%"},
		figure{name: "rear damping", key: "updated.rear_damping_ns_per_m", relative: true, unit: "%"})
}()

// errorOf returns the error of est against truth in f's error unit.
func (f figure) errorOf(est, truth float64) float64 {
	if f.relative {
		return 100 * (est - truth) / truth
	}
	return est - truth
}

// caseJob is one simulated log to analyse: a car, a condition and a seed.
type caseJob struct {
	car       car
	cond      condition
	seed      uint64
	setupPath string
}

// estimate is one figure of one case. sd is NaN when the result states
// none; a missing estimate (the mode not found) has est NaN.
type estimate struct {
	fig            figure
	truth, est, sd float64
	flagged        bool
	trueDamping    float64 // the mode's true damping ratio (the larger of the two for the rates)
}

// z returns the error in stated standard deviations (NaN without an sd).
func (e estimate) z() float64 { return (e.est - e.truth) / e.sd }

// caseResult is what one case gave.
type caseResult struct {
	job       caseJob
	estimates []estimate
	err       error
	logPath   string
	// resampled: the reader refused the time stamps as non-uniform and the
	// case was rerun with resampling, as its message advises.
	resampled bool
}

// resultView is the part of the contract's JSON result the sweep reads.
// Reading through the JSON keys, not the Go types, keeps the program
// building while the result grows (flagged is a later addition: absent,
// it reads false).
type resultView struct {
	Modes []struct {
		Label                 string   `json:"label"`
		NaturalFrequencyHz    float64  `json:"natural_frequency_hz"`
		DampingRatio          float64  `json:"damping_ratio"`
		PitchPerBounceRadPerM *float64 `json:"pitch_per_bounce_rad_per_m"`
		NodeM                 *float64 `json:"node_m"`
		Flagged               bool     `json:"flagged"`
		Uncertainty           *struct {
			NaturalFrequencyHz    float64  `json:"natural_frequency_hz"`
			DampingRatio          float64  `json:"damping_ratio"`
			PitchPerBounceRadPerM *float64 `json:"pitch_per_bounce_rad_per_m"`
			NodeM                 *float64 `json:"node_m"`
		} `json:"uncertainty"`
	} `json:"modes"`
	Updated *struct {
		FrontRateNPerM     float64 `json:"front_rate_n_per_m"`
		RearRateNPerM      float64 `json:"rear_rate_n_per_m"`
		FrontDampingNsPerM float64 `json:"front_damping_ns_per_m"`
		RearDampingNsPerM  float64 `json:"rear_damping_ns_per_m"`
		DampingEstimated   bool    `json:"damping_estimated"`
		Uncertainty        *struct {
			FrontRateNPerM     float64  `json:"front_rate_n_per_m"`
			RearRateNPerM      float64  `json:"rear_rate_n_per_m"`
			FrontDampingNsPerM *float64 `json:"front_damping_ns_per_m"`
			RearDampingNsPerM  *float64 `json:"rear_damping_ns_per_m"`
		} `json:"uncertainty"`
	} `json:"updated"`
}

// run simulates the case's log into dir, analyses it with the library call
// and compares every figure with the truth.
func (j caseJob) run(ctx context.Context, dir string) caseResult {
	logPath := filepath.Join(dir, fmt.Sprintf("%s-%s-%d.csv", j.car.name, j.cond.name, j.seed))
	res := caseResult{job: j, logPath: logPath}
	defer os.Remove(logPath)
	if err := j.writeLog(logPath); err != nil {
		res.err = err
		return res
	}
	o := job.Options{LogPath: logPath, SetupPath: j.setupPath, Test: j.cond.route, ToolVersion: "calibration sweep"}
	out, err := job.Analyze(ctx, o)
	if errors.Is(err, ingest.ErrNonUniform) {
		o.Resample, res.resampled = true, true
		out, err = job.Analyze(ctx, o)
	}
	if err != nil {
		res.err = err
		return res
	}
	raw, err := json.Marshal(out.Result)
	if err != nil {
		res.err = err
		return res
	}
	var view resultView
	if err := json.Unmarshal(raw, &view); err != nil {
		res.err = err
		return res
	}
	res.estimates, res.err = j.compare(&view)
	return res
}

// writeLog simulates the case with compare/simulate (exact) and writes it,
// with the time column rounded to the condition's decimals.
func (j caseJob) writeLog(path string) error {
	keep := j.car.allSensors()
	if j.cond.endPair {
		keep = j.car.endSensors()
	}
	var sensors []ingest.Sensor
	for _, i := range keep {
		sensors = append(sensors, ingest.Sensor{Channel: fmt.Sprintf("body_%d", i+1), XM: j.car.sensorsXM[i]})
	}
	o := simulate.Defaults(j.cond.route)
	o.DurationS, o.RateHz, o.Seed, o.NoiseFraction = j.cond.durationS, j.cond.rateHz, j.seed, j.cond.noise
	var log *simulate.Log
	var err error
	if j.cond.route == routeRig {
		inputs := []ingest.Input{{Channel: "pan_front", Axle: "front"}, {Channel: "pan_rear", Axle: "rear"}}
		log, err = simulate.Rig(j.car.vehicle, sensors, inputs, o)
	} else {
		o.RearDelayS = j.cond.rearDelayS
		log, err = simulate.Drop(j.car.vehicle, sensors, o)
	}
	if err != nil {
		return err
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	var w io.Writer = f
	var cw *coarseTime
	if j.cond.decimals > 0 {
		cw = &coarseTime{w: bufio.NewWriterSize(f, 1<<16), decimals: j.cond.decimals}
		w = cw
	}
	err = log.Write(w)
	if err == nil && cw != nil {
		err = cw.w.Flush()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// compare sets the result's figures beside the car's truth: the damped
// model's modes (compare.Vehicle.DampedModes, by label) and its rates and
// damping. The rates, which come from both modes, count as flagged when
// either mode is.
func (j caseJob) compare(view *resultView) ([]estimate, error) {
	truth, err := j.car.vehicle.DampedModes()
	if err != nil {
		return nil, err
	}
	nan := math.NaN()
	deref := func(p *float64) float64 {
		if p == nil {
			return nan
		}
		return *p
	}
	var out []estimate
	anyFlagged := false
	for _, tm := range truth {
		e := func(f figure, t float64) estimate {
			return estimate{fig: f, truth: t, est: nan, sd: nan, trueDamping: tm.DampingRatio}
		}
		fs := figuresOf(tm.Label)
		es := []estimate{e(fs[0], tm.NaturalFrequencyHz), e(fs[1], tm.DampingRatio),
			e(fs[2], tm.PitchPerBounceRadPerM), e(fs[3], tm.NodeM)}
		for _, m := range view.Modes {
			if m.Label != tm.Label {
				continue
			}
			es[0].est, es[1].est = m.NaturalFrequencyHz, m.DampingRatio
			es[2].est, es[3].est = deref(m.PitchPerBounceRadPerM), deref(m.NodeM)
			if u := m.Uncertainty; u != nil {
				es[0].sd, es[1].sd = u.NaturalFrequencyHz, u.DampingRatio
				es[2].sd, es[3].sd = deref(u.PitchPerBounceRadPerM), deref(u.NodeM)
			}
			for i := range es {
				es[i].flagged = m.Flagged
			}
			anyFlagged = anyFlagged || m.Flagged
			break
		}
		out = append(out, es...)
	}
	v := j.car.vehicle
	zetaMax := math.Max(truth[0].DampingRatio, truth[1].DampingRatio)
	rf := figures[len(figures)-4:]
	rates := []estimate{
		{fig: rf[0], truth: v.FrontRateNPerM}, {fig: rf[1], truth: v.RearRateNPerM},
		{fig: rf[2], truth: v.FrontDampingNsPerM}, {fig: rf[3], truth: v.RearDampingNsPerM}}
	for i := range rates {
		rates[i].est, rates[i].sd, rates[i].flagged, rates[i].trueDamping = nan, nan, anyFlagged, zetaMax
	}
	if u := view.Updated; u != nil {
		rates[0].est, rates[1].est = u.FrontRateNPerM, u.RearRateNPerM
		if u.DampingEstimated {
			rates[2].est, rates[3].est = u.FrontDampingNsPerM, u.RearDampingNsPerM
		}
		if s := u.Uncertainty; s != nil {
			rates[0].sd, rates[1].sd = s.FrontRateNPerM, s.RearRateNPerM
			rates[2].sd, rates[3].sd = deref(s.FrontDampingNsPerM), deref(s.RearDampingNsPerM)
		}
	}
	return append(out, rates...), nil
}

// figuresOf returns the four figures of mode label, in figures' order.
func figuresOf(label string) []figure {
	var fs []figure
	for _, f := range figures {
		if f.mode == label {
			fs = append(fs, f)
		}
	}
	return fs
}

// coarseTime passes a log's text through, rounding the first cell of each
// data row (the time, in s) to decimals places, as acquisition exports
// with a fixed number of decimals write it. Note lines ("#") and the
// header pass unchanged.
type coarseTime struct {
	w        *bufio.Writer
	decimals int
	header   bool // the header line has passed
	line     []byte
	buf      []byte
}

func (c *coarseTime) Write(p []byte) (int, error) {
	n := len(p)
	for len(p) > 0 {
		i := bytes.IndexByte(p, '\n')
		if i < 0 {
			c.line = append(c.line, p...)
			break
		}
		c.line = append(c.line, p[:i+1]...)
		p = p[i+1:]
		if err := c.flushLine(); err != nil {
			return 0, err
		}
	}
	return n, nil
}

func (c *coarseTime) flushLine() error {
	line := c.line
	c.line = c.line[:0]
	if len(line) > 0 && line[0] == '#' || !c.header {
		c.header = c.header || len(line) > 0 && line[0] != '#'
		_, err := c.w.Write(line)
		return err
	}
	comma := bytes.IndexByte(line, ',')
	t, err := strconv.ParseFloat(string(line[:comma]), 64)
	if err != nil {
		return fmt.Errorf("coarse time: %w", err)
	}
	c.buf = strconv.AppendFloat(c.buf[:0], t, 'f', c.decimals, 64)
	c.buf = append(c.buf, line[comma:]...)
	_, err = c.w.Write(c.buf)
	return err
}
