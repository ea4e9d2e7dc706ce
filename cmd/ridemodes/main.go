// Command ridemodes identifies the bounce and pitch modes of a car body from
// rig and drop test logs and sets them beside the design model. Run
// "ridemodes --help" for the commands.
package main

import (
	"os"

	"github.com/ridemodes/ridemodes/cmd/cli"
)

func main() {
	os.Exit(cli.Execute(os.Args[1:], os.Stdout, os.Stderr))
}
