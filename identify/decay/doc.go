// Package decay identifies the bounce and pitch modes of a car body from a
// drop test: the car is released off blocks onto its wheels, nothing is
// measured at the input, and two or more vertical accelerometers on the body
// log the free decay of two close, heavily damped modes.
//
// # Conventions
//
// SI units: times in s, frequencies in Hz at the interface (rad/s inside),
// positions in m, pitch in rad. Accelerations may be in any unit (the fit
// is linear in them); noise and offsets are reported in the log's unit.
// Axes and signs are those of package identify/body (ISO 8855): z up, pitch theta
// positive nose-down, s positive forward of the CG, w(s) = z - s*theta. A
// stable pole lambda has Re(lambda) < 0; of each conjugate pair the one with
// Im(lambda) > 0 is reported. natural_frequency_hz is |lambda|/(2 pi),
// damped_frequency_hz is Im(lambda)/(2 pi), damping_ratio is
// -Re(lambda)/|lambda|. Samples are indexed from 0 and sample i lies at
// i/rate s.
//
// # Method
//
// Detect finds each release: the first sample at which a body channel
// departs from its preceding rest by more than ThresholdK (8) noise sd for
// 10 ms, with the noise measured robustly from first differences and the
// rest level following slow drift; the event ends at the next 0.5 s of rest.
// Within the event it finds the steps of the pans (Event.Steps): the
// release, and for a car rolled forward off the blocks the rear wheels
// landing a wheelbase later. A step makes the body's acceleration jump at
// once, which a free decay never does: a step is a sample where, on some
// channel, the first difference less the mean of its two neighbours (zero on
// any quadratic in time; sqrt(5) noise sd on white noise) exceeds both
// StepThresholdK (6) times its noise sd and a tenth of the largest such
// jump on that channel in the event (which keeps the smooth decay out,
// noise or not), and is the largest within two samples. Fit then
//
//  1. cuts the fit window: from SettleS (0.1 s) after the last step,
//     because a step is not free decay (in a real drop the wheels land on
//     the tyres and ring at wheel-hop frequency; the model applies an ideal
//     step), and the motion between two steps is not free decay either, to
//     the rest that ends the event, where the decay amplitude has fallen to
//     about 1.6 noise sd: the noise floor;
//  2. removes the pre-release rest level and decimates to about 200 Hz
//     (50 times the band's upper edge) with the Kaiser anti-alias FIR of
//     package spectral;
//  3. runs the eigensystem realization algorithm (ERA) on the block Hankel
//     matrix of all channels for orders 2 to MaxOrder (20), keeps the
//     physical poles in the band (0.5-4 Hz by default; damping ratio in
//     (0, 0.9)) and marks each stable against the previous order (natural
//     frequency within 1 %, damping ratio within 10 %, MAC over 0.98);
//  4. groups the poles across orders, starts a Levenberg-Marquardt
//     refinement of the sum of two damped exponentials with common poles,
//     per-channel complex amplitudes and per-channel offsets from every pair
//     of the four leading groups, and keeps the pair with the least residual;
//  5. takes the shapes at the sensors from the fitted amplitudes, heave and
//     pitch by least squares on w(s_k) = z - s_k theta (for two sensors
//     theta = (w1 - w2)/(s2 - s1), z = (s2 w1 - s1 w2)/(s2 - s1)), pitch per
//     bounce Re(theta/z), node 1/Re(theta/z), and sorts and labels the modes
//     as every route does (body.SortAndLabel: the mode whose node lies
//     farther from the CG is bounce); the MAC of the two shapes and the
//     normalised residual say how distinct the modes are and how well the
//     model fits;
//  6. refits with each channel weighted by the inverse of its own residual
//     sd (feasible generalised least squares): the sensors' noise differs
//     (a share of each channel's peak in compare/simulate; other sensors
//     and gains on a car), and one pooled residual variance misstates the
//     variance of every contrast between channels, which is what pitch is
//     (on simulated drops of an SUV it stated the bounce's frequency and
//     damping sd 20-35 % wide, the pitch's damping and the bounce's pitch
//     per bounce 15-20 % narrow). A refit whose poles leave the band, or
//     whose parameters the data no longer determine, is not taken;
//  7. gives standard deviations from kappa s^2 (J^T J)^-1 (s^2 the weighted
//     residual variance, J the weighted Jacobian at the solution) by the
//     delta method. After decimation the noise samples are correlated;
//     kappa = 1/(q sum h^2) for taps h and factor q is the ratio of the
//     filtered noise density at the body modes to that of white noise of
//     the same variance, so the N fitted samples count as N/kappa
//     independent ones (kappa = 1 without decimation; 1.04 for the default
//     filter). The shape at each sensor gets sigmas of its real and
//     imaginary parts. The pitch per bounce of a shape whose node lies
//     beyond the sensors' reach L (|L ppb| <= 1: the bounce-like shape)
//     takes its sigma from the profile likelihood instead: the fit is
//     repeated with the pitch per bounce held at trial values until the
//     cost has risen by 4 kappa s^2 on each side, the ends of the 2-sigma
//     likelihood interval, and the sigma is half the larger distance, so
//     that the value +- 2 sigma the verdicts use covers that interval. Where
//     the modes are close and heavily damped the delta method fails for
//     it: the fit trades the bounce's pitch against the pitch mode's pole,
//     along a curved valley, and where the pitch pole came out high the
//     bounce looks purer and its delta-method sigma smaller, the error
//     larger (a heavy-damping van dropped at once at 2 % noise, 200 drops:
//     87 % within 2 sigma, RMS z 1.49, worst 7 sigma; the likelihood ratio
//     at the truth was calibrated, 95 % and 1.02; with the profile sigma
//     92 % and 1.11). The node's sigma is sigma_ppb/ppb^2, and NaN
//     (undetermined, null in the result) when the pitch per bounce is
//     within two of its sigmas of zero (the node may lie at infinity;
//     body.SortAndLabel). Result.Correlation relates the two modes'
//     frequencies, damping ratios and pitch per bounce (delta method): in
//     a drop they correlate strongly (0.7-0.8 between the pitch per bounce
//     of one mode and the frequency and damping of the other), and the
//     rate update of package compare uses it;
//  8. computes the one-mode logarithmic decrement per channel as a quick
//     estimate, flagged invalid when the fitted modes' half-power bands
//     overlap;
//  9. flags the modes the decay cannot support (body.Mode.Flagged, with
//     reasons): by the rules of both routes (body.FlagUnsupported: large
//     sd, labels the nodes do not decide, band edge) and by the drop's
//     own evidence (Result.Support): a residual over 1.3 times the noise
//     at rest, a jump after the last step that may be a step the detector
//     missed, a mode whose amplitude at the start of the window is under 5
//     noise sd. Package identify/body documents the rules and their
//     calibration.
//
// # Accuracy (measured; rerun go test -v -run 'Accuracy|Coverage|Table')
//
// On 24 seeded simulated drops (compare/simulate: invented cars with damping
// ratios 0.1-0.4 and modes 15-40 % apart at 0.9-2.6 Hz, sensors inboard of
// the axles, 2 % noise of each channel's peak, DC offsets, 100-1000 Hz,
// default options) both modes are found in every case, and the stated sigmas
// cover the errors: 98 % of the errors in frequency, damping ratio, pitch
// per bounce and node lie within 2 sigma (24 undetermined nodes left out),
// none of the first three beyond 4 sigma; a 40-run Monte Carlo per rate
// gives 92-100 % within 2 sigma and an RMS error of 0.8-1.1 sigma, and
// 93-98 % of the errors in the shape at the sensors (real and imaginary
// parts) within 2 sigma. The accuracy itself is set by how strongly the
// drop excites each mode. A drop of both axles at once excites the
// pitch-like mode weakly on many cars; in 15 of the 48 modes its initial
// amplitude is under a quarter of the channel peak (under 12 noise sd).
// Of all 48 modes, 31 meet 1 % in natural frequency, 37 meet 0.02 in
// damping ratio and 27 meet 10 % in node (a node beyond a wheelbase L:
// pitch per bounce within 0.1/L). Every value whose sigma claims it (3 sigma
// inside the aim) meets the aim. The worst errors of the well-excited modes
// are 8 % in frequency (two modes 17 % apart with damping ratios 0.31 and
// 0.34, logged at 100 Hz; its sigma says 16 %), 0.04 in damping ratio, and
// a node off by a factor of several where its pitch per bounce is uncertain;
// of the weak modes, tens of percent. Without noise the fit returns the model's poles
// and shapes to 1e-9.
//
// Rolling the car off the blocks (the rear axle 0.2-0.8 s after the front,
// compare/simulate's Options.RearDelayS) excites pitch directly. On the
// same 24 cars, sensors, noise and rates (TestRollOffAccuracy), the rear
// step is found at its exact sample in every case (its jump 2.9-6.0 times
// the step threshold) and no drop of both axles at once, with noise or
// without, shows a second step. The pitch-like mode's share of the channel
// peak at the start of the free decay rises from a median of 0.16 to 0.72
// (under a quarter in 15 of the 24 cars dropped at once, in 1 rolled off),
// and its errors and sigmas shrink about threefold: median |error| in
// natural frequency 1.6 % -> 0.4 % (worst 46 % -> 5.9 %), median sigma
// 2.2 % -> 0.7 % (worst 251 % -> 16 %); damping ratio median |error| 0.019
// -> 0.005 (worst 0.70 -> 0.23), median sigma 0.021 -> 0.006 (worst 2.7 ->
// 0.32); 95 % of the rolled-off errors in frequency, damping ratio and pitch
// per bounce of both modes lie within 2 sigma. The worst damping error
// (0.23, its sigma 0.32) comes with the shortest delay at the lowest rate
// (0.21 s at 100 Hz, on a car whose pitch a drop at once already excites
// well): starting the window after the rear step costs a fifth of a second
// of the strongest decay.
//
// Log decrement against the fit on the same logs (TestLogDecrementTable;
// true damping ratios with natural frequencies, fitted, and the decrement
// of each channel):
//
//	| case | rate Hz | true zeta (f Hz)           | fit zeta     | log decrement zeta  | valid |
//	| 1    | 200     | 0.199 (1.09), 0.273 (1.51) | 0.199, 0.289 | 0.167, 0.181        | false |
//	| 2    | 500     | 0.211 (1.45), 0.269 (1.85) | 0.142, 0.271 | 0.247, 0.228, 0.242 | false |
//	| 3    | 1000    | 0.285 (1.11), 0.390 (1.52) | 0.983, 0.388 | 0.358, 0.362, 0.367 | false |
//	| 4    | 100     | 0.336 (1.12), 0.308 (1.31) | 0.298, 0.317 | NaN, 0.275          | false |
//	| 5    | 200     | 0.153 (0.96), 0.194 (1.16) | 0.164, 0.194 | 0.155, 0.151        | false |
//	| 6    | 500     | 0.192 (1.18), 0.250 (1.57) | 0.191, 0.250 | 0.161, 0.176        | false |
//	| 7    | 1000    | 0.229 (1.49), 0.305 (2.06) | 0.230, 0.324 | 0.228, 0.202        | false |
//	| 8    | 100     | 0.248 (1.31), 0.311 (1.66) | 0.072, 0.316 | 0.293, 0.275        | true  |
//
// The decrement gives one number for two modes, lying between or below
// them; median error 0.023 even counted against the nearer mode, against
// 0.009 for the fit. The fit's misses in cases 2, 3 and 8 are weakly
// excited modes, and their sigmas say so (0.05 to 3); case 8 shows that
// the validity flag trusts the fit, and a badly fitted weak mode can hide
// the overlap.
//
// # Where it breaks
//
//   - A mode the drop hardly excites (under about 10 noise sd at every
//     sensor) is still returned, with a large sigma and flagged, but its
//     values are not useful. Roll the car off the blocks (one axle after the
//     other), or put the sensors farther apart, to excite and see pitch; a
//     car whose bounce the roll-off excites weakly (the example hatchback)
//     needs a drop of both axles at once for bounce.
//   - A rear step under about a tenth of the release's jump on every
//     channel, or under 6 noise sd, is not found, and the fit then starts
//     before it: the modes are flagged, on the jump when it exceeds 5
//     noise sd, else on the residual. A spike or a knock inside the event
//     counts as a step, so the window starts after it.
//   - With two sensors and close, heavily damped modes, one drop often
//     cannot tell which node lies farther from the CG: the labels are
//     flagged (at 2 % noise, 8 of 40 modes of the example hatchback dropped
//     at once).
//   - Two modes under about 15 % apart with damping ratios over 0.3 trade
//     energy between them: sigmas of 5-15 % in frequency. More sensors or a
//     second drop (fit each, average) help.
//   - The node's sigma is linearised through 1/ppb: for a nearly pure
//     bounce it is only a guide (hence undetermined near ppb = 0).
//   - The pitch per bounce of a pitch-like shape (node within the sensors'
//     reach) keeps the delta-method sigma: its profile would have to pass
//     a pure pitch (z = 0, where the pitch per bounce is singular), and its
//     held refits found local minima. Where a drop of both axles at once
//     excites pitch weakly its errors have heavy tails (200 drops at 2 %
//     noise each: 85 % within 2 sigma and RMS z 1.4-1.55 on the sweep's
//     coupe and van, 93 % and 1.1 on the hatchback and the SUV); judge its
//     node there, or roll the car off.
//   - The model is two modes: wheel hop, tyre or bump-stop contact inside
//     the window, or a non-linear damper, show up as a poor fit (the modes
//     are flagged); raise SettleS. The noise estimate assumes the log is at
//     rest more than half of the time.
//   - The log decrement is a one-mode estimate and fails on close modes, as
//     the table shows.
//
// # References
//
//   - J.-N. Juang and R. S. Pappa, "An eigensystem realization algorithm for
//     modal parameter identification and model reduction", Journal of
//     Guidance, Control, and Dynamics 8(5):620-627, 1985, doi:10.2514/3.20031.
//   - K. Levenberg, Quarterly of Applied Mathematics 2:164-168, 1944;
//     D. W. Marquardt, Journal of the Society for Industrial and Applied
//     Mathematics 11(2):431-441, 1963 (the refinement, solved by package
//     identify/lsq).
//   - R. J. Carroll and D. Ruppert, Transformation and Weighting in
//     Regression, Chapman and Hall, 1988, ch. 2 (weights estimated from the
//     residuals of an unweighted fit, then a weighted refit) [memory].
//   - D. J. Venzon and S. H. Moolgavkar, Applied Statistics 37(1):87-94,
//     1988; D. M. Bates and D. G. Watts, Nonlinear Regression Analysis and
//     Its Applications, Wiley, 1988, ch. 6 (profile-likelihood intervals).
//   - R. J. Allemang and D. L. Brown, "A correlation coefficient for modal
//     vector analysis", Proc. IMAC I, Orlando, 1982, pp. 110-116 (MAC, via
//     body.MAC).
//   - J. F. Kaiser, Proc. IEEE ISCAS 1974, pp. 20-23 (the anti-alias window,
//     in package spectral).
//   - The logarithmic decrement of a one-degree-of-freedom free vibration,
//     e.g. W. T. Thomson and M. D. Dahleh, Theory of Vibration with
//     Applications, 5th ed., 1998 [memory].
//   - The stabilisation tolerances follow the usual practice of the trade
//     [memory]; the damping tolerance is widened for heavy damping.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer. It may import ingest (the default band), identify/body,
// identify/lsq and identify/spectral (its decimation filter), never compare,
// plots or cmd: it works on samples in memory.
package decay
