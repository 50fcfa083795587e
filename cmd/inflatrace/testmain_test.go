package main

import (
	"os"
	"testing"
)

// TestMain points the inflatrace processes the tests start at a
// configuration folder of their own: a signing key made by export lands
// there, never in the user's folder.
func TestMain(m *testing.M) {
	dir, err := os.MkdirTemp("", "inflatrace-test-config-")
	if err != nil {
		panic(err)
	}
	os.Setenv("XDG_CONFIG_HOME", dir)
	os.Unsetenv("INFLATRACE_KEY")
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}
