// Package batch runs a campaign: the whole job of package job on many logs,
// in parallel, with one row per log in a summary whose order never depends
// on the number of workers.
//
// # Campaigns
//
// A campaign is a list of Items (log, setup, car, run, test, metadata). It
// comes from command-line inputs (Expand: files, folders and glob patterns
// with one setup) or from a manifest (ReadManifest: a CSV file with the
// header log,setup,car,run plus metadata columns). Its order is the order
// of the summary: sorted paths for inputs, the manifest's row order for a
// manifest.
//
// # Shards
//
// A Shard (I of N, 1-based) takes every N-th item of that order, starting
// with the I-th, so that the processes of a scheduler that knows nothing of
// ridemodes (a Kubernetes indexed Job, a Slurm job array) share a campaign
// without talking to each other: each writes its own summary, and all of
// them write one store. ShardFromEnv reads the schedulers' index variables.
//
// # Outputs
//
// Run analyses every item and writes under its Out folder: results/ (one
// result JSON per analysed log, named by ResultName), summary.csv and
// summary.jsonl (one row per item, failures included with their message).
// Every file is written whole or not at all (ingest.WriteAtomic); the
// summaries are written last, so a cancelled campaign leaves the results of
// the logs already done and no summary. A log that fails never stops the
// others; only a cancelled context, a file that cannot be written or a
// store that refuses a run stops a campaign. With a store, every run is
// recorded (store.Record), failures with the verdict "error".
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It may import ingest, identify and compare (compare/job,
// compare/store), never plots or cmd.
package batch
