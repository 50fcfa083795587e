package root

import (
	"encoding/json"
	"path/filepath"
	"sort"
	"testing"
)

// The shards of a scan, each run into its own ledger and merged, hold
// exactly the results of a local run of the whole scan; merging twice
// changes nothing.
func TestShardsMergeToTheLocalRun(t *testing.T) {
	h := newHarness(t)
	cfg := demoPath(t)
	full := decodeRun(t, h.mustRun("run", cfg, "--json"))
	keys := func(rs []map[string]any) []string {
		var out []string
		for _, r := range rs {
			out = append(out, r["key"].(string))
		}
		sort.Strings(out)
		return out
	}
	var shardKeys []string
	var ledgers []string
	for i := 1; i <= 3; i++ {
		l := filepath.Join(h.dir, "shard"+string(rune('0'+i))+".db")
		ledgers = append(ledgers, l)
		r := decodeRun(t, h.mustRun("--ledger", l, "run", cfg, "--shard", string(rune('0'+i))+"/3", "--json"))
		shardKeys = append(shardKeys, keys(r.Results)...)
	}
	sort.Strings(shardKeys)
	if len(shardKeys) != len(full.Results) {
		t.Fatalf("shards give %d results, the full run %d", len(shardKeys), len(full.Results))
	}
	for i, k := range keys(full.Results) {
		if shardKeys[i] != k {
			t.Fatalf("shard results differ from the full run's at %d", i)
		}
	}
	merged := filepath.Join(h.dir, "merged.db")
	args := append([]string{"--ledger", merged, "merge"}, ledgers...)
	h.mustRun(args...)
	h.mustRun(args...) // idempotent
	var runs []map[string]any
	if err := json.Unmarshal([]byte(h.mustRun("--ledger", merged, "runs", "--json")), &runs); err != nil || len(runs) != 3 {
		t.Fatalf("merged ledger holds %d runs (%v)", len(runs), err)
	}
	// The whole scan in the merged ledger computes nothing.
	again := decodeRun(t, h.mustRun("--ledger", merged, "run", cfg, "--json"))
	if again.Computed != 0 {
		t.Errorf("after merging the shards the full scan computed %d nodes", again.Computed)
	}
	if _, _, code := h.run("run", cfg, "--shard", "4/3"); code != 2 {
		t.Errorf("--shard 4/3 accepted")
	}
}
