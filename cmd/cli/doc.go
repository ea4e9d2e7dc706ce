// Package cli holds the ridemodes command line: the root command and one file
// per subcommand. It only wires the packages ingest, identify, compare and
// plots together; it computes nothing of its own.
//
// Exit codes (the contract): 0 done; 1 bad data or a failed analysis; 2 bad
// usage; 3 done, but a tolerance check failed.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the top.
// It may import every package of the module; only cmd/ridemodes imports it.
// It keeps flags, printing, exit codes, the progress bar and Ctrl-C; the
// analysis is a library call (compare/job), so no pipeline lives here.
package cli
