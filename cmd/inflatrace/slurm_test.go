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
	var runs []struct{ Run, Status string }
	if err := json.Unmarshal(run("--ledger", merged, "runs", "--json"), &runs); err != nil || len(runs) != 4 {
		t.Fatalf("merged ledger holds %d runs (%v)", len(runs), err)
	}
	keys := func(ledger string, ids []string) []string {
		var out []string
		for _, id := range ids {
			var shown struct {
				Results []struct{ Key string } `json:"results"`
			}
			if err := json.Unmarshal(run("--ledger", ledger, "show", id, "--json"), &shown); err != nil {
				t.Fatal(err)
			}
			for _, r := range shown.Results {
				out = append(out, r.Key)
			}
		}
		sort.Strings(out)
		return out
	}
	var ids []string
	for _, r := range runs {
		if r.Status != "succeeded" {
			t.Errorf("shard run %s: %s", r.Run, r.Status)
		}
		ids = append(ids, r.Run)
	}
	local := filepath.Join(dir, "local.db")
	var lr struct{ Run string }
	if err := json.Unmarshal(run("--ledger", local, "run", cfg, "--json"), &lr); err != nil {
		t.Fatal(err)
	}
	got, want := keys(merged, ids), keys(local, []string{lr.Run})
	if strings.Join(got, ",") != strings.Join(want, ",") || len(want) != 64 {
		t.Fatalf("merged shards hold %d results, the local run %d; they differ", len(got), len(want))
	}
}
