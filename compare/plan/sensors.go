package plan

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// nearNodeShare: a sensor whose vertical motion in a mode is under this
// share of the mode's largest motion over the sensor span sits near the
// mode's node: its signal for that mode all but vanishes (our threshold;
// a tenth is 20 dB down).
const nearNodeShare = 0.1

// layoutSteps is the number of intervals of the grid of positions the
// layout search tries over the span, layoutPasses the number of sweeps
// over the sensors, and layoutGain the least relative fall of the worst
// ratio for which a sensor is moved: a smaller gain is not worth a new
// bracket.
const (
	layoutSteps  = 10
	layoutPasses = 2
	layoutGain   = 0.05
)

// motionShare returns the vertical motion |w(x)| = |z - x theta| of model
// mode m at x over its largest over the span (|w| is convex in x, so the
// largest lies at an end).
func (p *planner) motionShare(x float64, m compare.Mode) float64 {
	peak := math.Max(cmplx.Abs(m.ShapeAt(p.span[0])), cmplx.Abs(m.ShapeAt(p.span[1])))
	return cmplx.Abs(m.ShapeAt(x)) / peak
}

// nearNode returns the first model mode whose node x sits near (see
// nearNodeShare), with the share of its motion there.
func (p *planner) nearNode(x float64) (compare.Mode, float64, bool) {
	ms, err := p.car.Modes()
	if err != nil {
		return compare.Mode{}, 0, false
	}
	for _, m := range ms {
		if s := p.motionShare(x, m); s < nearNodeShare {
			return m, s, true
		}
	}
	return compare.Mode{}, 0, false
}

// searchLayout returns the sensor positions, on a grid of layoutSteps
// intervals over the span and away from every node (nearNode), of least
// worst ratio predicted/wanted: a coordinate search from start that moves
// one sensor at a time to its best grid position when that lowers the
// worst ratio by layoutGain or more, layoutPasses times over the sensors.
// A start position near a node is left whatever its ratio; sensors keep
// half a grid step apart. worst gives +Inf for a layout it cannot predict.
func (p *planner) searchLayout(start []ingest.Sensor, worst func([]ingest.Sensor) float64) []ingest.Sensor {
	cur := slices.Clone(start)
	step := (p.span[1] - p.span[0]) / layoutSteps
	var grid []float64
	for i := 0; i <= layoutSteps; i++ {
		if x := math.Min(p.span[0]+float64(i)*step, p.span[1]); !p.isNearNode(x) {
			grid = append(grid, x)
		}
	}
	best := worst(cur)
	for range layoutPasses {
		moved := false
		for i := range cur {
			score := best * (1 - layoutGain)
			if p.isNearNode(cur[i].XM) {
				score = math.Inf(1)
			}
			bestX := cur[i].XM
			for _, x := range grid {
				if x == cur[i].XM || crowded(cur, i, x, step/2) {
					continue
				}
				trial := slices.Clone(cur)
				trial[i].XM = x
				if !body.CanSeparate(ingest.SensorPositionsM(trial)) {
					continue
				}
				if w := worst(trial); w < score {
					score, bestX = w, x
				}
			}
			if bestX != cur[i].XM {
				cur[i].XM, best, moved = bestX, score, true
			}
		}
		if !moved {
			break
		}
	}
	return cur
}

func (p *planner) isNearNode(x float64) bool {
	_, _, near := p.nearNode(x)
	return near
}

// crowded reports whether x lies within gap of a sensor other than i.
func crowded(s []ingest.Sensor, i int, x, gap float64) bool {
	for j := range s {
		if j != i && math.Abs(s[j].XM-x) < gap {
			return true
		}
	}
	return false
}

// sameLayout reports whether a and b put every sensor at the same place.
func sameLayout(a, b []ingest.Sensor) bool {
	return slices.Equal(ingest.SensorPositionsM(a), ingest.SensorPositionsM(b))
}

// sensorAdvice returns, for each planned sensor, where the setup has it
// (none when the setup had fewer than two), where the plan puts it, and
// warnings on the given place: near a node of either mode, or outside the
// span.
func (p *planner) sensorAdvice(given, fromSetup []ingest.Sensor) []SensorAdvice {
	out := make([]SensorAdvice, len(p.sensors))
	for i, s := range p.sensors {
		a := SensorAdvice{Channel: s.Channel, XM: s.XM}
		if len(fromSetup) >= 2 {
			x := given[i].XM
			a.GivenXM = &x
			if m, share, near := p.nearNode(x); near {
				a.Warnings = append(a.Warnings, fmt.Sprintf("%s at %+.2f m sits %.2f m from the %s node (%+.2f m): it moves "+
					"%.0f %% as much as the %s mode's largest motion along the span, so its signal for that mode all but vanishes; "+
					"put it at %+.2f m", s.Channel, x, math.Abs(x-m.NodeM), m.Label, m.NodeM, 100*share, m.Label, s.XM))
			}
			if x < p.span[0] || x > p.span[1] {
				a.Warnings = append(a.Warnings, fmt.Sprintf("%s at %+.2f m lies outside the allowed span %+.2f to %+.2f m",
					s.Channel, x, p.span[0], p.span[1]))
			}
		}
		out[i] = a
	}
	return out
}
