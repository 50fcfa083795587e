package app

import (
	"os"

	"golang.org/x/sys/unix"
)

// isTerminal says whether f is a terminal: it answers the terminal's own
// request (TIOCGETA). A character device is not enough: /dev/null is one.
func isTerminal(f *os.File) bool {
	_, err := unix.IoctlGetTermios(int(f.Fd()), unix.TIOCGETA)
	return err == nil
}
