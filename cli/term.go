package cli

import (
	"os"

	"golang.org/x/term"
)

// stdIsTerminal reports whether both stdin and stdout are terminals.
func stdIsTerminal() bool {
	return term.IsTerminal(int(os.Stdin.Fd())) && term.IsTerminal(int(os.Stdout.Fd()))
}
