// Package ingest reads what a test engineer brings to ridemodes: the setup
// file (TOML) that describes the vehicle, its sensors and the rig inputs, and
// the CSV logs of vertical accelerations. Everything leaves this package in SI
// units (m, s, kg, N, rad; accelerations in m/s^2). A setup value far
// outside any car's (plausible.go) is an error that says what the number
// probably meant.
//
// # The log dialect
//
// What Open and NewReader read (the contract's "The log"):
//
//   - Lines that start with '#' before the header are notes, kept in Info.Notes
//     without the '#' and one space. Blank lines before the header are skipped; a
//     UTF-8 byte order mark is dropped. Notes and header must be UTF-8.
//   - The header is "name [unit]", "name (unit)" (when the parentheses hold a
//     unit of the dialect; other parentheses belong to the name) or "name" cells. Cells may carry spaces and
//     double quotes ("" is a quote; a quoted cell may hold the delimiter). The
//     delimiter is the most frequent of ',', ';' and tab outside quotes in the
//     header (ties: tab, then ';'). One empty cell after a trailing delimiter is
//     allowed, in the header and in every row.
//   - Units: m/s^2 (also m/s2, m/s², m s^-2, m s-2, m s⁻², m·s^-2, m·s⁻²),
//     mm/s^2 (mm/s2, mm/s², mm s^-2), g and G (9.80665 m/s^2
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
//   - Sampling must be uniform: each time step within 1 % of the reference step
//     (the median of the first 32 steps), time never repeating or going backwards.
//     On top of the 1 %, a step may differ from the reference by the rounding of
//     the time stamps, one unit in their last decimal place u: a 256 Hz log
//     written to 4 decimals has steps of 0.0039 s and 0.0040 s. u is 10^-d of
//     the time column's unit, d the decimal places that most stamps have (an
//     exponent counts), counted over the first 512 KiB of rows and at least the
//     first 33. It is allowed when the first 32 steps show the rounding (differ
//     by u/2 or more: a 200 Hz log's exact 0.005 s steps keep the plain 1 %) and
//     u is under a quarter of the step (coarser stamps cannot tell rounding from
//     jitter; the error then says so). Options.Resample accepts a jittery log
//     and interpolates it linearly onto a uniform grid, with a warning.
//   - The sample rate (Summary.SampleRateHz) is 1/dt of the least-squares line
//     t_i = a + i dt through every time stamp of the log (the rows outside the
//     window too), fitted as the rows stream by. Rounded stamps average out: for
//     N stamps rounded to u the relative error is at most 1.5 u/(N dt), about
//     (u/dt) N^-1.5 if the rounding errors are independent, where the first
//     steps' median can be a whole u off (255.754 Hz for 256 Hz written to 4
//     decimals). That early reference serves only the per-step check, the
//     resampling grid when no rate is given (the grid's rate is exact for the
//     interpolated samples, so it is the rate reported) and Block.SampleRateHz,
//     which a consumer may use to lay out a filter before the end of the log,
//     never to compute a frequency. Summary.T0S is the first delivered sample's
//     own stamp, as written (the fitted line differs from it by the stamp's
//     rounding and jitter); sample k lies at T0S + k/SampleRateHz to within a
//     few units of that rounding, plus the jitter.
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
// cores; the consumer, the checks and the fit of the sample rate run on the
// caller's goroutine, in file order. ReadAll keeps the whole (windowed) log in
// memory instead.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// bottom. It imports no package of the module; besides the standard library
// it uses go-toml/v2 for the setup file. It draws nothing on a terminal: the
// progress hook (Options.Progress) is the caller's to draw.
package ingest
