package app

import (
	"os"
	"path/filepath"
	"testing"
)

// TestIsTerminal: neither /dev/null (a character device) nor a regular
// file is a terminal, so output sent there is neither aligned nor given a
// progress bar (common practice: a terminal is what answers the terminal
// request, as isatty(3) asks).
func TestIsTerminal(t *testing.T) {
	null, err := os.OpenFile(os.DevNull, os.O_WRONLY, 0)
	if err != nil {
		t.Skip(err)
	}
	defer null.Close()
	if isTerminal(null) {
		t.Errorf("%s is taken for a terminal", os.DevNull)
	}
	f, err := os.Create(filepath.Join(t.TempDir(), "out.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if isTerminal(f) {
		t.Error("a regular file is taken for a terminal")
	}
}
