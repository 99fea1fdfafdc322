// Command pvcouple is a terminal what-if explorer of how the left ventricle
// couples to the arterial system. See README.md.
package main

import (
	"os"

	"pvcouple/cli"
)

func main() {
	os.Exit(cli.Main(os.Args[1:], cli.StdEnv()))
}
