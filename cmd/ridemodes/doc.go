// Command ridemodes identifies the bounce and pitch modes of a car body from
// rig and drop test logs and sets them beside the design model. Run
// "ridemodes --help" for the commands.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the top;
// main only calls cli.Execute and may import nothing else of the module.
package main
