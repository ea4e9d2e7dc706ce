// Package spool records a stream of multichannel sample blocks and plays it
// back, in order and bit for bit, as often as asked, in bounded memory: at
// most MemoryBytes of samples stay in memory, and each time that much has
// gathered it goes to a temporary file. The rig route spools the decimated
// stream (about 0.7 kB per second of log at four channels) so that the
// resolution choice can run Welch estimates at the few segment lengths it
// needs after the whole log has been read, instead of running every
// candidate length during the read.
//
// Samples are float64, stored as their IEEE 754 bits (little-endian), so a
// replay gives back exactly what was written. Units are the caller's.
//
// The temporary file is created in os.TempDir and removed at once where the
// system allows an open file to be removed (so nothing is left behind even
// if the process is killed), else by Close. If no temporary file can be
// made, the spool keeps everything in memory.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer; it imports the standard library only.
package spool
