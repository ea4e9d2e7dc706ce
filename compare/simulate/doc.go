// Package simulate makes synthetic test logs from the bounce-pitch model of
// package compare: rig tests with the front and rear wheel pans driven, and
// drop tests (the car released onto its wheels, then free decay). It is the
// project's own source of truth for the identification tests, so both routes
// are exact to rounding:
//
//   - Rig: the pan accelerations are periodic over the synthesis length, built
//     from Fourier coefficients; each body channel is the inverse FFT of the
//     model's transmissibility times the pan spectra. That is the exact
//     steady-state response of the model to the drive (the periodic state is
//     the initial state), however long the record.
//   - Drop: the pans step down at the release instant; from the state just
//     after the step (compare.Vehicle.StepState) the body is propagated with
//     the exact discrete transition matrix exp(A dt) of the state matrix.
//     A car rolled off the blocks (Options.RearDelayS > 0) drops the front
//     axle first and the rear one the delay later: the rear step adds its
//     own StepState to the propagated state, and a step between samples is
//     propagated in two exact parts (see Drop).
//
// Sensor noise is white and Gaussian with a standard deviation that is a
// fraction of each channel's clean RMS (rig) or peak absolute value (drop),
// or an absolute one in m/s^2, the same on every channel
// (Options.NoiseSDMPerS2: a sensor's noise floor, with which a higher drive
// or drop gives a cleaner log).
// Every random number comes from one PCG stream seeded by Options.Seed, so a
// log is reproducible byte for byte.
//
// Run is the command's entry: it refuses what cannot be a car (no damping:
// the response would have no bound) and options out of range (as
// *compare.OptionError naming the flag). What analyze needs of a log is
// package compare/job's (ShortLogWarning).
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer, beside the model it simulates. It may import ingest (the
// setup's sensors and inputs, the log writer) and compare, never identify
// (whose tests simulate their truth with it), plots or cmd.
package simulate
