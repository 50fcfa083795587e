//go:build !linux && !darwin

package app

import "os"

// isTerminal says whether f is a character device (on these systems no
// terminal request is asked; /dev/null then counts as a terminal).
func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
