package app

import (
	"os"

	"golang.org/x/term"
)

// isTerminal says whether f is a terminal: it answers the terminal's own
// request (isatty(3), through golang.org/x/term). A character device is
// not enough: /dev/null is one.
func isTerminal(f *os.File) bool {
	return term.IsTerminal(int(f.Fd()))
}
