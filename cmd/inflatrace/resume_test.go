package main

import (
	"bytes"
	"database/sql"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	_ "github.com/mattn/go-sqlite3"
)

// A scan killed with SIGKILL part-way, then run again with the same
// command, completes with every result and no node recorded twice; the
// killed run is closed as interrupted and the nodes it wrote are reused.
// (A real child process and a real kill.)
func TestKillAndResume(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command and runs a scan")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "inflatrace")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	cfg := filepath.Join(dir, "scan.toml")
	const points = 4000
	if err := os.WriteFile(cfg, []byte(`[[reheating]]
history = "instantaneous"

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = {log = [0.01, 100], points = 4000}
`), 0o644); err != nil {
		t.Fatal(err)
	}
	ledgerPath := filepath.Join(dir, "scan.db")
	env := append(os.Environ(), "INFLATRACE_LEDGER="+ledgerPath)
	first := exec.Command(bin, "run", cfg, "-j", "2")
	first.Env = env
	if err := first.Start(); err != nil {
		t.Fatal(err)
	}
	// Kill it once some batches are in the ledger.
	deadline := time.Now().Add(60 * time.Second)
	for {
		if n := countRows(t, ledgerPath, "nodes"); n >= 1000 {
			break
		}
		if time.Now().After(deadline) {
			first.Process.Kill()
			t.Fatal("the scan wrote nothing in 60 s")
		}
		time.Sleep(20 * time.Millisecond)
	}
	if err := first.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	first.Wait()
	written := countRows(t, ledgerPath, "nodes")
	if written >= 5*points {
		t.Skipf("the scan finished (%d nodes) before it was killed", written)
	}
	// The killed run's lock file stays, and nothing holds it now.
	if locks, _ := os.ReadDir(ledgerPath + ".runlocks"); len(locks) != 1 {
		t.Errorf("%d run lock files after the kill, want the killed run's", len(locks))
	}
	second := exec.Command(bin, "run", cfg, "-j", "2", "--json")
	second.Env = env
	var out, errb bytes.Buffer
	second.Stdout, second.Stderr = &out, &errb
	if err := second.Run(); err != nil {
		t.Fatalf("re-run: %v\n%s", err, errb.String())
	}
	var rep struct {
		Computed, Reused int
		Results          []map[string]any
	}
	if err := json.Unmarshal(out.Bytes(), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Results) != points {
		t.Fatalf("%d results after resuming, want %d", len(rep.Results), points)
	}
	if rep.Reused == 0 || rep.Computed == 0 {
		t.Errorf("computed %d, reused %d: the re-run should reuse what the killed run wrote", rep.Computed, rep.Reused)
	}
	if n := countRows(t, ledgerPath, "nodes"); n != 5*points {
		t.Errorf("%d node rows, want %d (5 stages x %d points, none twice)", n, 5*points, points)
	}
	if !bytes.Contains(errb.Bytes(), []byte("was interrupted")) {
		t.Errorf("the killed run was not closed: %s", errb.String())
	}
	db, err := sql.Open("sqlite3", "file:"+ledgerPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var running int
	db.QueryRow("SELECT count(*) FROM runs WHERE status = 'running'").Scan(&running)
	if running != 0 {
		t.Errorf("%d runs still marked running", running)
	}
	// Closed by its free lock, not by its pid alone (which the system may
	// have given to another process meanwhile); no lock file is left.
	var why string
	db.QueryRow("SELECT error FROM runs WHERE status = 'failed'").Scan(&why)
	if !strings.Contains(why, "run lock is free") {
		t.Errorf("the killed run was closed with %q, want its free run lock named", why)
	}
	if _, err := os.Stat(ledgerPath + ".runlocks"); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the run lock folder is left after the re-run: %v", err)
	}
}

func countRows(t *testing.T, path, table string) int {
	t.Helper()
	if _, err := os.Stat(path); err != nil {
		return 0
	}
	db, err := sql.Open("sqlite3", "file:"+path+"?mode=ro&_busy_timeout=5000")
	if err != nil {
		return 0
	}
	defer db.Close()
	var n int
	if err := db.QueryRow("SELECT count(*) FROM " + table).Scan(&n); err != nil {
		return 0
	}
	return n
}
