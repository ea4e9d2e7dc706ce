// Package cli holds the ridemodes command line: the root command and one file
// per subcommand. It only wires the packages ingest, identify, compare and
// plots together; it computes nothing of its own.
//
// Exit codes (the contract): 0 done; 1 bad data or a failed analysis; 2 bad
// usage; 3 done, but a tolerance check failed.
package cli
