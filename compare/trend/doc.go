// Package trend follows a campaign's runs over time: each run's modal
// frequencies, damping ratios and back-calculated ride rates with their
// uncertainties and design values, an individuals and moving-range control
// chart per quantity with limits from the campaign's own scatter (package
// control), the runs that moved more than that scatter and their own
// uncertainty explain, named in a sentence, and the campaign's worst
// verdict. It also writes the history table (CSV, JSON, terminal).
//
// # Drift rule
//
// A run is named when its value lies beyond the individuals chart's limits
// (mean ± 2.66 mean moving range) by more than its own expanded uncertainty
// (2 sd), or when its step from the run before exceeds the moving-range
// chart's upper limit (3.267 mean moving range) by more than the step's
// expanded uncertainty (2 sd of the two runs combined in quadrature). A
// value beyond a limit that its own uncertainty reaches back across is
// drawn outside the limits but not named: a control chart alone would name
// it, this rule asks that the move also be larger than the measurement can
// explain.
//
// Units are those of the result: Hz, N/m, damping ratios as fractions of
// critical; an uncertainty "sd" is one standard deviation, a bar in a
// figure is ± 2 sd.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It imports compare, compare/store (the runs) and
// compare/control, never plots or cmd.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It may import compare, compare/control and compare/store,
// never plots or cmd.
package trend
