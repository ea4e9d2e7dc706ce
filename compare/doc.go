// Package compare holds the design model of the car body and everything that
// sets measured modes beside it: the two-degree-of-freedom bounce-pitch model,
// the comparison of measured with predicted modes, the back-calculation of
// effective ride rates and damping, and the checks against targets and ride
// guidance.
//
// # Axes and signs
//
// Those fixed for the whole module by package identify/body (ISO 8855): z up
// at the centre of gravity (CG), in m; pitch theta about y, positive
// nose-down, in rad; s positive forward of the CG, in m; the vertical motion
// of the body at s is w(s) = z - s*theta. The front axle is at s = +a and the
// rear axle at s = -b; L = a + b is the wheelbase. Rates (N/m) and damping
// (N s/m) are per axle (both wheels together), vertical, at the wheel
// centre: the effective ride rate that the body sees.
//
// # The model
//
// With q = (z, theta), M = diag(m, J) and base (wheel pan) inputs u = (uf, ur):
//
//	M q'' + C q' + K q = Cin u' + Kin u
//	K   = [[kf + kr, -a kf + b kr], [-a kf + b kr, a^2 kf + b^2 kr]]
//	Kin = [[kf, kr], [-a kf, b kr]]
//
// and C, Cin of the same form in cf, cr. Harmonic quantities use the
// e^{+i omega t} convention: u(t) = Re(U e^{i omega t}).
//
// # Modes
//
// Modal quantities (natural and damped frequency, damping ratio, pitch per
// bounce, node) and the labels bounce and pitch are those defined by package
// identify/body, which implements them (NodeM, BodyLabels) for the model and
// for every route that identifies modes, and compares shapes (MAC).
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It may import ingest (the setup) and identify (identify/body
// for the measured mode and the body geometry, identify/lsq for the update),
// never plots or cmd.
package compare
