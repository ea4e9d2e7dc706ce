// Package plan plans a rig test or a drop series before the car is booked:
// from the design model in the setup, the sensors' noise and the
// uncertainty wanted of the modes and rates, it recommends the test's
// conditions (rig: record length, sample rate, drive band and level, the
// Welch segment length; drops: height, roll-off delay, log length and how
// many drops to pool), advises on the sensor positions, predicts the
// standard deviation of every reported value, and checks the prediction
// against the real analysis of simulated tests.
//
// # Conventions
//
// Units and signs are those of package compare (SI, ISO 8855 axes, s
// positive forward of the CG, w(s) = z - s theta). A predicted sd is one
// standard deviation, in the unit of its value, of the estimate about the
// true value (its root mean square error: random error and bias), under
// the keys of a result's "uncertainty". Noise is white and Gaussian, the
// same standard deviation on every channel (pans and body sensors) at the
// logged rate, as compare/simulate adds it (Options.NoiseSDMPerS2).
//
// # The prediction
//
// Each test has an asymptotic estimate, fast enough for the searches:
//
//   - Rig: the expected Welch spectra of the pans and sensors (the model's
//     transmissibility, the drive's flat acceleration density, the noise
//     density), smoothed by the window's kernel as a Welch estimate is in
//     expectation (spectral.Expected, modal.WindowKernel), go through the
//     rig route's own FRF estimator with the random-error bands of Bendat
//     and Piersol (spectral.EstimateFRF) and its fit (modal.Fit): the
//     fit's covariance gives the random sd, the departure of its values
//     from the truth the bias of the spectral window (measured: within
//     10 % of the mean error of 30 real analyses). A dither of a thousandth
//     of the error bands keeps the fit's order sweep regular.
//   - Drop: the Cramer-Rao bound of the drop route's model, two damped
//     exponentials with common poles, a complex amplitude per mode and an
//     offset per sensor, in white noise, over the route's fit window (from
//     decay.DefaultSettleS after the last step to where the decay sinks to
//     1.6 noise sd), carried to the modal values by the delta method; it
//     has no bias. n drops pooled (inverse-variance weights, equal drops)
//     divide the random sd by sqrt(n).
//
// The rates' sd follow from the modal values' through the analysis's own
// back-calculation (compare.Result.AssessAgainst).
//
// A small Monte Carlo then refines the random sd: seeded tests of the
// chosen conditions (Request.RefineSeeds, one rig record or one drop
// each) are simulated (compare/simulate) and analysed by the real
// analysis (compare/job, as `ridemodes analyze` does), and each value's
// random sd is scaled by its realism factor, the root mean square of
// (error - bias)/random sd over the tests (for the modal values blended
// halfway, in the square, with that over all regular values). It corrects
// what the asymptotic estimate misses: the rig's error bands come from a
// coherence that the window's leakage lowers, so its random sd ran up to
// twice the real one at coarse resolutions; a drop reaches the bound only
// at high signal-to-noise ratios; the analysis propagates the rates from
// modal values taken as independent. Verify repeats the test with other
// seeds, the planned number of drops pooled, and reports the spread
// achieved beside the prediction.
//
// Measured (the package's acceptance test with -plan.runs 100: two invented
// cars, a rig test and a drop series each, noise 0.02 m/s^2): every wanted
// value's achieved sd lay within 0.75-1.27 of its prediction, the ratio
// pooled over the values within 0.92-1.04, and every wanted sd was met.
//
// # Choices
//
// The conditions are the least demanding that meet every wanted sd with
// the margin Margin on the prediction: the shortest record of a list of
// lengths in whole minutes (rig; with the Welch segment of least worst
// ratio among the finest with at least identify.FitMinAverages averages),
// the fewest drops, then the lowest drop (drop). The drive and the drop
// keep within the request's limits (pan acceleration and travel, drop
// height). The sensors are searched over a grid of the span allowed, one
// at a time, away from the nodes; a sensor near a node (its motion in a
// mode under a tenth of the mode's largest) is warned of and moved. The
// conditions are chosen again for the layout found and after each
// refinement, and refined again while they change (at most three times).
//
// # References
//
//   - J. S. Bendat and A. G. Piersol, Random Data: Analysis and Measurement
//     Procedures, 4th ed., Wiley, 2010, Ch. 9 (random errors of FRF
//     estimates; used through package identify/spectral).
//   - S. M. Kay, Fundamentals of Statistical Signal Processing: Estimation
//     Theory, Prentice Hall, 1993, Ch. 3 (the Cramer-Rao bound; the Fisher
//     information of a signal in white Gaussian noise is the sum over
//     samples of the products of the signal's derivatives over the noise
//     variance).
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It may import compare, compare/simulate, compare/job,
// identify and its subpackages, and ingest; never plots or cmd.
package plan
