// Package store keeps a campaign's runs: every analysed (or failed) log with
// its car, run name, metadata, verdict and whole result, in an embedded
// SQLite file (modernc.org/sqlite, pure Go: no C toolchain) or on a
// PostgreSQL server shared by a team or by the shards of a batch
// (jackc/pgx/v5).
//
// # Tables
//
// Outside tools query the store, so these tables are fixed by the contract
// (columns may be added, never renamed):
//
//	runs(run_key, log_sha256, log_path, setup_sha256, car, run, test, tool_version,
//	     analysed_at, verdict, error, result_json)
//	modes(run_key, ordinal, label, natural_frequency_hz, natural_frequency_sd_hz,
//	      damping_ratio, damping_ratio_sd, node_m, pitch_per_bounce_rad_per_m, flagged)
//	rates(run_key, front_rate_n_per_m, rear_rate_n_per_m, front_damping_ns_per_m,
//	      rear_damping_ns_per_m, front_rate_sd_n_per_m, rear_rate_sd_n_per_m)
//	run_meta(run_key, key, value)
//
// Units are those of the result (Hz, N/m, N s/m, m, rad/m); a "_sd" column is
// one standard deviation; NULL where the result has no value (no node, no
// damping measured, no uncertainty). analysed_at is UTC: TIMESTAMPTZ in
// PostgreSQL, ISO 8601 text (2031-05-04T09:01:00.000000Z) in SQLite. verdict
// is pass, fail, inconclusive, none or error (a log that could not be
// analysed; error holds its message). result_json is the whole result.
//
// # Run key
//
// A run is identified by its log's content, its setup's content and the
// tool's version (RunKey): analysing the same log with the same setup and
// program again replaces the run, never duplicates it.
//
// # Schema and concurrency
//
// The schema's versions are numbered SQL files (migrations/NNNN_*.sql),
// embedded in the program and applied in order by Open, each recorded in
// schema_version, all in one transaction (under an advisory lock on
// PostgreSQL) so that processes opening a new store at once migrate it once.
// Each Record is one transaction: an upsert of the runs row keyed by run_key,
// then its child rows deleted and written again. SQLite runs in WAL mode
// with IMMEDIATE transactions and a busy timeout, so writers in several
// goroutines or processes wait their turn.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It imports compare (the result), never plots or cmd.
package store
