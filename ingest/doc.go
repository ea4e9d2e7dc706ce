// Package ingest reads what a test engineer brings to ridemodes: the setup
// file (TOML) that describes the vehicle, its sensors and the rig inputs, and
// the CSV logs of vertical accelerations. Everything leaves this package in SI
// units (m, s, kg, N, rad; accelerations in m/s^2).
//
// # The log dialect
//
// What Open and NewReader read (the contract's "The log"):
//
//   - Lines that start with '#' before the header are notes, kept in Info.Notes
//     without the '#' and one space. Blank lines before the header are skipped; a
//     UTF-8 byte order mark is dropped. Notes and header must be UTF-8.
//   - The header is "name [unit]" or "name" cells. Cells may carry spaces and
//     double quotes ("" is a quote; a quoted cell may hold the delimiter). The
//     delimiter is the most frequent of ',', ';' and tab outside quotes in the
//     header (ties: tab, then ';'). One empty cell after a trailing delimiter is
//     allowed, in the header and in every row.
//   - Units: m/s^2 (also m/s2, m/s²), mm/s^2 (mm/s2, mm/s²), g and G (9.80665 m/s^2
//     exactly, the standard gravity); time in s or ms. A column without a unit is
//     m/s^2 (time: s) with a WarnUnitMissing warning. An unknown unit is an error
//     only for a column that is read: only the channels named in Options.Channels
//     are converted (all non-time columns when it is empty).
//   - The first column is the time column when it is named time or t, in any case;
//     a time column elsewhere is an error. Without one, Options.SampleRateHz gives
//     the rate.
//   - With ';' or tab the decimal separator may be a comma: the first '.' or ','
//     in the data decides, and a cell with the other one is an error (ErrDecimal),
//     so a thousands separator is never read as a decimal point. Numbers are
//     [+-]digits[sep digits][e[+-]digits]; NaN, Inf and overflow are errors.
//   - Rows end in "\n" or "\r\n"; a line longer than MaxLineBytes (1 MiB), a NUL
//     byte or a blank line followed by more rows is an error; blank lines at the end
//     are not.
//   - Sampling must be uniform: each step within 1 % of the median of the first 32
//     steps, time never repeating or going backwards. Options.Resample accepts a
//     jittery log and interpolates it linearly onto a uniform grid, with a warning.
//
// Every error is a *ParseError that names the file, the line (1-based, as an
// editor counts; 0 for the whole log) and the column (its header name), and wraps
// one of the Err* sentinels for errors.Is. Data-quality findings (clipping,
// dropouts, a DC offset, a high-pass sensor's roll-off, a rate too low for the
// band) are Warning values in the Summary; the package prints nothing.
//
// Stream reads the rows once and hands blocks of Options.BlockSamples samples to a
// consumer, in memory independent of the log's length (a few MiB: the read
// chunks in flight, the blocks and the checks). Reading and hashing run on one
// goroutine and parsing on up to four more, so that parsing uses the machine's
// cores; the consumer and the checks run on the caller's goroutine, in file
// order. ReadAll keeps the whole (windowed) log in memory instead.
package ingest
