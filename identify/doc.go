// Package identify turns logs into measured body modes. It composes the
// routes of its subpackages:
//
//   - spectral: streaming Welch spectra, FRFs (H1, two-input H1),
//     coherence and their random-error bands, decimation and the choice of
//     resolution, which for the modal fit weighs the resolution bias against
//     the random error of the record at hand (its doc comment fixes the
//     scaling and FRF conventions);
//   - lpm: the local polynomial FRFs of a whole record (two inputs), free
//     of leakage, with their noise from the local fits' residuals; the rig
//     route's fit takes them when the record is long for the damping;
//   - modal: the mode indicator, the multi-mode pole-residue fit of the FRFs
//     with common poles, mode shapes and uncertainties (rig tests);
//   - decay: release detection and the multi-output free-decay fit (drop
//     tests);
//   - spool: a recorded stream of sample blocks, replayed in bounded memory
//     (the rig route's decimated stream, for the resolution choice).
//
// Both routes return the measured modes of package body (body.Mode), sorted,
// labelled and given their node's uncertainty by one rule
// (body.SortAndLabel), and flagged where the data cannot support them by
// the rules of body.FlagUnsupported and their own evidence (Identified
// carries each reason into its warnings: FlagWarnings); body also holds the
// kinematics from sensors to heave and pitch, and MAC.
//
// This package holds the glue that a command needs: an FRF stage that takes
// the blocks of an ingest stream, combines the pans of one axle, decimates
// and accumulates in constant memory, and hands the FRFs on.
//
// Conventions: SI units; frequencies in Hz; harmonic quantities in the
// e^{+i omega t} convention; body positions s from the CG, positive forward
// (package identify/body fixes the axes).
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer. It may import ingest and its own subpackages (spectral,
// modal, decay, body, lsq, spool, lpm), never compare, plots or cmd.
package identify
