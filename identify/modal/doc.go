// Package modal identifies the bounce and pitch modes of a car body from the
// frequency response functions (FRFs) of a rig test: body vertical
// accelerations at two or more sensors per wheel-pan acceleration at the
// front and rear pans.
//
// It offers a quick estimate (peak picking with the half-power rule on the
// complex mode indicator function) and a multi-mode fit of all FRFs with
// common poles: a common-denominator rational fraction polynomial in the
// scaled Laplace variable, solved the LSCF way (numerators eliminated,
// reduced normal equations) with Sanathanan-Koerner reweighting, swept over
// model orders with a stabilisation check on frequency, damping and mode
// shape (MAC), then a weighted
// nonlinear least-squares refinement of the pole-residue model that uses the
// FRFs' error bands as weights and yields standard deviations of every
// reported modal parameter.
//
// # Conventions
//
// SI units: frequencies in Hz at the interface, angular frequencies in rad/s
// inside, positions in m, pitch in rad. Body axes and signs are those of
// package identify/body (ISO 8855): z up, pitch theta positive nose-down, s
// positive forward of the CG, w(s) = z - s*theta. Harmonic quantities follow
// the e^{+i omega t} convention, so a stable pole lambda has Re(lambda) < 0
// and the oscillating one of a conjugate pair Im(lambda) > 0.
//
// An FRF here is a transmissibility: body acceleration per pan acceleration,
// dimensionless. Each FRF is modelled by the pole-residue form
//
//	H_oi(omega) = sum_r [ R_roi/(i omega - lambda_r) + conj(R_roi)/(i omega - conj(lambda_r)) ]
//	              + U_oi - L_oi/omega^2
//
// with common poles lambda_r (rad/s), complex residues R_roi (rad/s, since
// H is dimensionless) and two real residual terms per FRF for modes outside
// the band: the upper residual U_oi (modes above the band, seen as a
// constant) and the lower residual L_oi (rad^2/s^2; modes below the band, seen
// as an inertia-like 1/omega^2 term). The bounce-pitch model's
// transmissibility is strictly proper, so for it the residual terms vanish;
// a real car's wheel hop (10-15 Hz) shows up in U_oi.
//
// For base excitation the residue matrix of mode r (outputs x inputs) is
// rank one, R_r = psi_r L_r^T: psi_r is the mode shape at the sensors and
// L_r the modal participation of the pans. The shape is taken as the dominant
// left singular vector of the fitted R_r. Heave and pitch (z, theta) follow
// from psi_r and the sensor positions by least squares on w(s_k) = z - s_k
// theta; the shape is scaled to z = 1, pitch per bounce is Re(theta/z) in
// rad/m and the node is 1/Re(theta/z) in m.
//
// natural_frequency_hz is |lambda|/(2 pi), damped_frequency_hz is
// Im(lambda)/(2 pi), damping_ratio is -Re(lambda)/|lambda|.
//
// # Uncertainty
//
// FRFSet.SigmaAbs is the standard deviation of each of the real and
// imaginary parts of H (circular complex noise): for a spectral estimate
// with normalised magnitude error eps it is |H| eps, since the phase
// standard deviation is eps rad. Errors at neighbouring bins of a windowed
// Welch estimate are correlated; FRFSet.ErrorCorrelation carries that
// correlation and the covariance of the fitted parameters is the sandwich
// B^-1 M B^-1 with B = J^T W J and M the same sum with the bin correlation,
// scaled up by the reduced chi-square when that exceeds one. Derived
// quantities get their standard deviations by the delta method, to which
// the expected resolution bias is added in quadrature when the set carries
// its window's kernel (FRFSet.Kernel): a Welch H1 is, in expectation, the
// true FRF smoothed by the window's kernel, so the fit is repeated on the
// fitted model so smoothed and the shift of every mode quantity is that
// bias (Result.ResolutionBias). It is budgeted rather than subtracted: the
// kernel model assumes an input spectrum flat across the kernel, and on
// simulated rig logs it predicted the mean damping bias 10-27 % low
// (identify's resolution sweep). The node's standard deviation is NaN
// (undetermined) when the mode has no node or its pitch per bounce is zero
// within two of its standard deviations (body.SortAndLabel, the rule of
// both routes).
//
// # Flags
//
// Fit flags a mode the FRFs cannot support (body.Mode.Flagged, with
// reasons): by the rules of both routes (body.FlagUnsupported: large sd,
// labels the nodes do not decide, band edge) and when the refined fit's
// reduced chi-square exceeds 8 (both modes), as it does when pans driven
// with correlated signals leave FRFs on one reference pan that no two-mode
// model fits. Package identify/body documents the rules and their
// calibration.
//
// # References
//
//   - C. Y. Shih, Y. G. Tsuei, R. J. Allemang and D. L. Brown, "Complex mode
//     indication function and its applications to spatial domain parameter
//     estimation", Mechanical Systems and Signal Processing 2(4):367-377,
//     1988, doi:10.1016/0888-3270(88)90060-X.
//   - M. H. Richardson and D. L. Formenti, "Parameter estimation from
//     frequency response measurements using rational fraction polynomials",
//     Proc. IMAC I, Orlando, 1982, pp. 167-181.
//   - C. K. Sanathanan and J. Koerner, "Transfer function synthesis as a
//     ratio of two complex polynomials", IEEE Trans. Autom. Control
//     8(1):56-58, 1963, doi:10.1109/TAC.1963.1105517.
//   - P. Guillaume, P. Verboven, S. Vanlanduit, H. Van der Auweraer and
//     B. Peeters, "A poly-reference implementation of the least-squares
//     complex frequency-domain estimator", Proc. IMAC XXI, Kissimmee, 2003.
//   - T. De Troyer, P. Guillaume and M. C. Runacres, "Bias and variance of
//     the LSCF estimator", Mechanical Systems and Signal Processing 31, 2012
//     (damping bias of the unweighted estimator; the weighted refinement is
//     the remedy used here).
//   - K. Levenberg, "A method for the solution of certain non-linear
//     problems in least squares", Quart. Appl. Math. 2:164-168, 1944;
//     D. W. Marquardt, "An algorithm for least-squares estimation of
//     nonlinear parameters", J. SIAM 11(2):431-441, 1963 (the refinement,
//     solved by package identify/lsq).
//   - R. J. Allemang and D. L. Brown, "A correlation coefficient for modal
//     vector analysis", Proc. IMAC I, Orlando, 1982, pp. 110-116 (MAC).
//   - J. S. Bendat and A. G. Piersol, Random Data, 4th ed., Wiley, 2010
//     (random errors of FRF estimates).
//   - H. White, "A heteroskedasticity-consistent covariance matrix
//     estimator and a direct test for heteroskedasticity", Econometrica
//     48(4):817-838, 1980 (the sandwich form of the covariance).
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer. It may import identify/body, identify/lsq and
// identify/spectral (the FRFs it fits), never compare, plots or cmd.
package modal
