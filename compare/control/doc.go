// Package control draws Shewhart control charts for individual measurements:
// the individuals (X) chart and the moving-range (MR) chart of a series of
// single values in time order, with limits estimated from the series' own
// point-to-point scatter. It decides whether a value (or a jump between two
// consecutive values) is larger than the series' short-term scatter
// explains.
//
// # Limits
//
// With x_1..x_n and the moving ranges MR_i = |x_i - x_(i-1)|, i = 2..n:
//
//	MRbar  = mean of the MR_i
//	sigma  = MRbar / d2                       (d2 = 1.128 for ranges of two)
//	X chart:  centre line mean(x), limits mean(x) ± 3 sigma = mean(x) ± 2.66 MRbar
//	MR chart: centre line MRbar, upper limit D4 MRbar = 3.267 MRbar, lower limit 0
//
// Values keep the unit of the series.
//
// References:
//   - D. C. Montgomery, Introduction to Statistical Quality Control, 7th ed.,
//     Wiley, 2012: the individuals and moving-range charts (sec. 6.4, from
//     memory), and the factors d2 = 1.128 and D4 = 3.267 for n = 2 (Appendix
//     VI, the table of factors for variables control charts).
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer, pure arithmetic with no imports of the project.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It imports no package of the module (statistics only).
package control
