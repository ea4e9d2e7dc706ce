package body

import (
	"fmt"
	"math"
)

// Thresholds of the rules that flag a mode from either route
// (FlagUnsupported). They were measured on simulated logs with known truth
// (compare/simulate): 720 drops of three example cars and six invented ones
// at 2 % and 5 % noise, dropped at once and rolled off the blocks (671
// fitted, 1342 modes), and 360 rig logs of the three example cars; the
// package documentation (section Flags) gives the figures.
const (
	// MaxFrequencySDShare: a natural frequency whose standard deviation
	// exceeds this share of the value is flagged ("a few %", the issue's
	// wording). Such a value decides no check, and the sd itself, a
	// linearisation, is then unreliable: the plain drop at 5 %
	// noise gave a pitch of 2.32 +- 0.33 Hz (sd 14 %) against a true
	// 1.47 Hz. In the drop sweep 569 of 1342 modes were over it, 152 of 706
	// at 2 % noise; no rig mode was (at most 2.6 %, on a road drive).
	MaxFrequencySDShare = 0.05
	// MaxDampingRatioSD: a damping ratio whose standard deviation exceeds
	// this (absolute) is flagged; a tenth of the body modes' usual 0.2-0.4
	// [memory, common practice for passenger cars].
	MaxDampingRatioSD = 0.05
	// LabelMarginSDs: the two modes' pitch angles (see FlagUnsupported) must
	// differ by this many standard deviations of the difference for the
	// labels to stand (under a Gaussian error a margin m leaves the labels
	// swapped with probability Phi(-m): 7 % at 1.5). At 1.5 no swapped pair
	// of the drop sweep with a frequency off by more than 3 sd was left
	// unflagged; at 1.0 one was (margin 1.0, the bounce 3.7 sd off by
	// label), and 1.0 flagged 39 % of the drop modes at 2 % noise against
	// 43 % at 1.5.
	LabelMarginSDs = 1.5
	// BandEdgeShare: a mode within this share of a band edge is flagged.
	BandEdgeShare = 0.05
)

// Flag marks m as not supported by the data and adds the reason: one
// sentence in the user's words that names the evidence with its figures.
func (m *Mode) Flag(reason string) {
	m.Flagged = true
	m.FlagReasons = append(m.FlagReasons, reason)
}

// FlagUnsupported applies the rules common to both routes to the two modes
// ms of one fit (sorted and labelled by SortAndLabel) from sensors at
// positions sensorPosM (m from the CG), found in the band loHz-hiHz:
//
//   - a natural frequency whose standard deviation exceeds
//     MaxFrequencySDShare of it, or a damping ratio whose standard deviation
//     exceeds MaxDampingRatioSD: the data do not pin the mode down, and so
//     large a linearised uncertainty is itself unreliable;
//   - labels that the nodes do not decide (both modes are flagged). The
//     labels go by which node lies farther from the CG, that is by which
//     mode has the smaller |pitch per bounce|. The rule compares the angles
//     phi = atan(L |ppb|), L the sensors' reach (Kinematics.ReachM): a node
//     at the reach lies at 45 degrees, a pure bounce at 0 and a pure pitch
//     at 90. Their standard deviations by the delta method,
//     L sd(ppb)/(1 + (L ppb)^2), stay finite where that of ppb does not (a
//     nearly pure pitch has a tiny heave and an unbounded ppb). The labels
//     stand when phi(pitch) - phi(bounce) reaches LabelMarginSDs standard
//     deviations of the difference;
//   - a natural frequency within BandEdgeShare of a band edge: a mode
//     outside the band may have been fitted in its place.
//
// The route adds its own evidence with Mode.Flag. Another number of modes
// than two is a caller mistake and panics.
func FlagUnsupported(ms []Mode, sensorPosM []float64, loHz, hiHz float64) {
	if len(ms) != 2 {
		panic(fmt.Sprintf("body: %d modes to check; bounce and pitch are two", len(ms)))
	}
	for i := range ms {
		m := &ms[i]
		f, sf := m.NaturalFrequencyHz, m.SD.NaturalFrequencyHz
		if !(sf <= MaxFrequencySDShare*f) {
			m.Flag(fmt.Sprintf("%s: natural frequency %.3g ± %.2g Hz, a standard deviation of %.0f %% of the value "+
				"(over %.0f %%): the data do not pin this mode down; record more (a higher or a second drop, a "+
				"longer rig log) or excite the mode more", m.Label, f, sf, 100*sf/f, 100*MaxFrequencySDShare))
		}
		if z, sz := m.DampingRatio, m.SD.DampingRatio; !(sz <= MaxDampingRatioSD) {
			m.Flag(fmt.Sprintf("%s: damping ratio %.3f ± %.3f, a standard deviation over %.2g: the data do not pin "+
				"this mode's decay down; record more (a higher or a second drop, a longer rig log) or excite the "+
				"mode more", m.Label, z, sz, MaxDampingRatioSD))
		}
		if f < loHz*(1+BandEdgeShare) || f > hiHz*(1-BandEdgeShare) {
			m.Flag(fmt.Sprintf("%s: %.3g Hz lies within %.0f %% of an edge of the band %.3g-%.3g Hz, where a mode "+
				"outside the band may have been fitted in its place; widen the band to check", m.Label, f,
				100*BandEdgeShare, loHz, hiHz))
		}
	}
	b, p := &ms[0], &ms[1]
	if b.Label != "bounce" {
		b, p = p, b
	}
	if margin := LabelMargin(*b, *p, NewKinematics(sensorPosM).ReachM); !(margin >= LabelMarginSDs) {
		reason := fmt.Sprintf("bounce and pitch may be swapped: the labels go by the nodes, and the pitch per bounce "+
			"of bounce (%.3g Hz) %.3g ± %.2g rad/m and of pitch (%.3g Hz) %.3g ± %.2g rad/m say which node lies "+
			"farther from the CG only %.2g standard deviations apart (under %g); put the sensors farther apart or "+
			"excite pitch more (roll the car off the blocks)", b.NaturalFrequencyHz, b.PitchPerBounceRadPerM,
			b.SD.PitchPerBounceRadPerM, p.NaturalFrequencyHz, p.PitchPerBounceRadPerM, p.SD.PitchPerBounceRadPerM,
			math.Max(margin, 0), LabelMarginSDs)
		b.Flag(reason)
		p.Flag(reason)
	}
}

// LabelMargin returns how many standard deviations of their difference
// the pitch angle of the pitch mode p exceeds that of the bounce mode b,
// the angles being phi = atan(L |ppb|) of the pitch per bounce ppb over the
// length reachM (see FlagUnsupported). It is negative when the labels
// contradict the point estimates (which SortAndLabel never returns) and NaN
// when a standard deviation is.
func LabelMargin(b, p Mode, reachM float64) float64 {
	angle := func(m Mode) (phi, sd float64) {
		x := reachM * m.PitchPerBounceRadPerM
		return math.Atan(math.Abs(x)), reachM * m.SD.PitchPerBounceRadPerM / (1 + x*x)
	}
	pb, sb := angle(b)
	pp, sp := angle(p)
	return (pp - pb) / math.Hypot(sb, sp)
}
