// Package job runs the whole analysis of one log as a library call: it
// resolves the options against the car's setup (flags over the setup's
// [analysis] table over the defaults), opens the log for the test's
// channels, identifies the body modes by the rig or drop route of package
// identify, writes them in the contract's form and assesses them against
// the design model (package compare). It returns one Outcome that holds
// everything the JSON result, the terminal summary and the report need; it
// writes no file and draws nothing on a terminal, so a command, a batch
// over many logs or a test can all call it, and a cancelled context.Context
// stops it while the log is read.
//
// It sits on the compare layer of the flow ingest -> identify -> compare ->
// plots -> cmd: it may import ingest, identify and compare, never plots or
// cmd.
package job
