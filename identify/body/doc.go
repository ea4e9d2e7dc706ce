// Package body holds what every route that identifies the modes of a car
// body shares: the measured mode (Mode, with its standard deviations SD),
// the rigid-body kinematics that turn motion at the body sensors into heave
// and pitch (Kinematics), the node (NodeM), the labels bounce and pitch
// (BodyLabels, SortAndLabel) and the comparison of shapes (MAC).
//
// It sits in the identify layer below the routes (identify/modal for rig
// tests, identify/decay for drop tests) and package compare, which use it;
// it may import only the standard library and gonum, nothing of the project.
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
// Harmonic quantities follow the e^{+i omega t} convention, so a stable pole
// lambda (rad/s) has Re(lambda) < 0 and, of a conjugate pair, the one
// reported has Im(lambda) > 0.
//
// # Modes
//
// A damped mode is a pole lambda with its shape (z, theta) scaled so that
// z = 1. natural_frequency_hz is |lambda|/(2 pi), damped_frequency_hz is
// Im(lambda)/(2 pi), damping_ratio is -Re(lambda)/|lambda|. Pitch per bounce
// is Re(theta/z) in rad/m and the node is the position 1/Re(theta/z) (m from
// the CG) where w vanishes; a mode whose pitch is negligible has no node
// (NaN). Of the two body modes, the one whose node lies farther from the CG
// is labelled bounce, the other pitch.
package body
