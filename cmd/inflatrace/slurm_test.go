package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"
)

// TestSlurmShardedScan runs a sharded scan through a real Slurm cluster:
// "inflatrace slurm" writes the job array and the merge job, sbatch runs
// them, and the merged ledger must hold exactly the results of a local run.
// It runs only when INFLATRACE_SLURM_E2E=1 and sbatch is on PATH (.ci/run
// brings up a single-node cluster with .ci/slurm.sh and sets it).
func TestSlurmShardedScan(t *testing.T) {
	if os.Getenv("INFLATRACE_SLURM_E2E") != "1" {
		t.Skip("set INFLATRACE_SLURM_E2E=1 with a Slurm cluster up (.ci/slurm.sh up)")
	}
	if _, err := exec.LookPath("sbatch"); err != nil {
		t.Fatal("INFLATRACE_SLURM_E2E=1 but sbatch is not on PATH")
	}
	dir := t.TempDir()
	os.Chmod(dir, 0o755)
	bin := filepath.Join(dir, "inflatrace")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	cfg, _ := filepath.Abs("../../configs/demo.toml")
	jobs := filepath.Join(dir, "jobs")
	run := func(args ...string) []byte {
		t.Helper()
		cmd := exec.Command(bin, args...)
		cmd.Dir = dir
		out, err := cmd.Output()
		if err != nil {
			t.Fatalf("%v: %v", args, err)
		}
		return out
	}
	run("slurm", cfg, "--tasks", "4", "--cpus", "1", "--time", "00:10:00", "--mem", "500M", "--dir", jobs, "--bin", bin)
	sub := exec.Command("bash", filepath.Join(jobs, "submit.sh"))
	out, err := sub.CombinedOutput()
	if err != nil {
		t.Fatalf("submit: %v\n%s", err, out)
	}
	// Wait until no job is left in the queue.
	deadline := time.Now().Add(3 * time.Minute)
	for {
		q, _ := exec.Command("squeue", "-h", "-o", "%A").Output()
		if strings.TrimSpace(string(q)) == "" {
			break
		}
		if time.Now().After(deadline) {
			exec.Command("scancel", strings.Fields(string(q))...).Run()
			t.Fatalf("jobs still queued after 3 minutes: %s", q)
		}
		time.Sleep(200 * time.Millisecond)
	}
	merged := filepath.Join(jobs, "merged.db")
	if _, err := os.Stat(merged); err != nil {
		logs, _ := filepath.Glob(filepath.Join(jobs, "logs", "*"))
		var text string
		for _, l := range logs {
			b, _ := os.ReadFile(l)
			text += l + ":\n" + string(b)
		}
		t.Fatalf("no merged ledger: %v\n%s", err, text)
	}
	var runs []struct {
		Run, Status, Kind string
		AssembledFrom     []string `json:"assembled_from"`
	}
	if err := json.Unmarshal(run("--ledger", merged, "runs", "--json"), &runs); err != nil || len(runs) != 5 {
		t.Fatalf("merged ledger holds %d runs (%v), want 4 shards and the assembled run", len(runs), err)
	}
	keys := func(ledger string, id string) []string {
		var out []string
		var shown struct {
			Results []struct{ Key string } `json:"results"`
		}
		if err := json.Unmarshal(run("--ledger", ledger, "show", id, "--json"), &shown); err != nil {
			t.Fatal(err)
		}
		for _, r := range shown.Results {
			out = append(out, r.Key)
		}
		return out
	}
	var shards []string
	whole := ""
	for _, r := range runs {
		if r.Status != "succeeded" {
			t.Errorf("run %s: %s", r.Run, r.Status)
		}
		switch r.Kind {
		case "shard":
			shards = append(shards, r.Run)
		case "study":
			whole = r.Run
			if len(r.AssembledFrom) != 4 {
				t.Errorf("assembled run %s lists %d shard runs, want 4", r.Run, len(r.AssembledFrom))
			}
		}
	}
	if len(shards) != 4 || whole == "" {
		t.Fatalf("merged ledger: %d shard runs and assembled run %q", len(shards), whole)
	}
	local := filepath.Join(dir, "local.db")
	var lr struct{ Run string }
	if err := json.Unmarshal(run("--ledger", local, "run", cfg, "--json"), &lr); err != nil {
		t.Fatal(err)
	}
	want := keys(local, lr.Run)
	// The shards together hold the local run's results...
	var got []string
	for _, id := range shards {
		got = append(got, keys(merged, id)...)
	}
	sorted := append([]string(nil), want...)
	sort.Strings(got)
	sort.Strings(sorted)
	if strings.Join(got, ",") != strings.Join(sorted, ",") || len(want) != 64 {
		t.Fatalf("merged shards hold %d results, the local run %d; they differ", len(got), len(want))
	}
	// ...and the assembled run holds them in the local run's order, and
	// table and verify work on it.
	if strings.Join(keys(merged, whole), ",") != strings.Join(want, ",") {
		t.Fatalf("the assembled run's results are not the local run's, in order")
	}
	if n := strings.Count(string(run("--ledger", merged, "table", whole, "--format", "csv")), "\n") - 1; n != 64 {
		t.Errorf("table of the assembled run: %d rows, want 64", n)
	}
	run("--ledger", merged, "verify", whole)
}
