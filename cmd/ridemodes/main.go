package main

import (
	"os"

	"github.com/ridemodes/ridemodes/cmd/cli"
)

func main() {
	os.Exit(cli.Execute(os.Args[1:], os.Stdout, os.Stderr))
}
