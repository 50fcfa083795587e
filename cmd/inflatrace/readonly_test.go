package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// A user who may read a ledger but not write it (its directory and file
// belong to root) can list, show and tabulate its runs; a command that
// writes says so. A real child process run as the user nobody; the test
// needs root and runuser, and skips without them.
func TestReadOnlyLedgerForAnotherUser(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command")
	}
	if os.Geteuid() != 0 {
		t.Skip("needs root to run the command as another user")
	}
	runuser, err := exec.LookPath("runuser")
	if err != nil {
		t.Skip("runuser not found")
	}
	dir := t.TempDir()
	for d := dir; d != "/" && d != os.TempDir(); d = filepath.Dir(d) {
		os.Chmod(d, 0o755)
	}
	bin := filepath.Join(dir, "inflatrace")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	cfg, _ := filepath.Abs("../../configs/demo.toml")
	shared := filepath.Join(dir, "shared")
	os.Mkdir(shared, 0o755)
	led := filepath.Join(shared, "ledger.db")
	if out, err := exec.Command(bin, "--ledger", led, "run", cfg).CombinedOutput(); err != nil {
		t.Fatalf("run: %v\n%s", err, out)
	}
	as := func(args ...string) (string, error) {
		cmd := exec.Command(runuser, append([]string{"-u", "nobody", "--", bin, "--ledger", led}, args...)...)
		cmd.Dir = "/"
		out, err := cmd.CombinedOutput()
		return string(out), err
	}
	for _, args := range [][]string{{"runs"}, {"show", "latest"}, {"table", "latest", "--format", "csv"}, {"trace", "latest#1"}} {
		if out, err := as(args...); err != nil {
			t.Errorf("%v as nobody: %v\n%s", args, err, out)
		}
	}
	if out, err := as("tag", "latest", "v1"); err == nil || !strings.Contains(out, "read-only") && !strings.Contains(out, "readonly") {
		t.Errorf("tag as nobody: %v\n%s; want a refusal that says the ledger is read-only", err, out)
	}
	entries, _ := os.ReadDir(shared)
	if len(entries) != 1 {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("the shared directory holds %v after read-only use, want the ledger alone", names)
	}
}
