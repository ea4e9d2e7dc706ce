// Package compare holds the design model of the car body and everything that
// sets measured modes beside it: the two-degree-of-freedom bounce-pitch model,
// the comparison of measured with predicted modes, the back-calculation of
// effective ride rates and damping, and the checks against targets and ride
// guidance.
//
// # Axes and signs (fixed here for the whole module)
//
// Body axes follow ISO 8855: x forward, y left, z up. z is the vertical
// displacement of the centre of gravity (CG), positive up, in m; theta is the
// pitch angle about y, positive nose-down (right-hand rule about y), in rad.
// A longitudinal position s is measured from the CG, positive forward, in m.
// The vertical motion of the body at s is
//
//	w(s) = z - s*theta
//
// The front axle is at s = +a and the rear axle at s = -b; L = a + b is the
// wheelbase. Rates (N/m) and damping (N s/m) are per axle (both wheels
// together), vertical, at the wheel centre: the effective ride rate that the
// body sees.
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
// A damped mode is a complex pole lambda with its shape (z, theta) scaled so
// that z = 1. natural_frequency_hz is |lambda|/(2 pi), damped_frequency_hz is
// Im(lambda)/(2 pi), damping_ratio is -Re(lambda)/|lambda|. Pitch per bounce
// is Re(theta/z) in rad/m and the node is the position z/theta where w
// vanishes. Of the two body modes, the one whose node lies farther from the CG
// is labelled bounce, the other pitch. Kinematics (heave and pitch from a shape
// at body sensors), NodeM and BodyLabels implement these rules for every
// package that identifies modes, and MAC compares shapes.
package compare
