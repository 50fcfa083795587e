package root

import (
	"encoding/json"
	"path/filepath"
	"sort"
	"strings"
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
	h.mustRun(args...) // idempotent: nothing merged or assembled again
	var runs []struct {
		Run, Kind     string
		AssembledFrom []string `json:"assembled_from"`
		Computed      int
		Results       int
	}
	if err := json.Unmarshal([]byte(h.mustRun("--ledger", merged, "runs", "--json")), &runs); err != nil || len(runs) != 4 {
		t.Fatalf("merged ledger holds %d runs (%v), want 3 shards and the assembled run", len(runs), err)
	}
	// The newest run is the whole study, assembled from the three shards
	// in shard order, with every result in a local run's order, computing
	// nothing.
	whole := runs[0]
	if whole.Kind != "study" || len(whole.AssembledFrom) != 3 || whole.Computed != 0 || whole.Results != len(full.Results) {
		t.Fatalf("assembled run %+v: want a study run of 3 shards, nothing computed, %d results", whole, len(full.Results))
	}
	for k, r := range runs[1:] {
		if r.Kind != "shard" || r.Run != whole.AssembledFrom[2-k] {
			t.Errorf("run %s (%s) is not shard %d of the assembled run %v", r.Run, r.Kind, 3-k, whole.AssembledFrom)
		}
	}
	var shown struct {
		AssembledFrom []string         `json:"assembled_from"`
		Results       []map[string]any `json:"results"`
	}
	if err := json.Unmarshal([]byte(h.mustRun("--ledger", merged, "show", "latest", "--json")), &shown); err != nil {
		t.Fatal(err)
	}
	for i, r := range shown.Results {
		if r["key"] != full.Results[i]["key"] {
			t.Fatalf("assembled result %d is %v, the local run's %v", i+1, r["label"], full.Results[i]["label"])
		}
	}
	if !strings.Contains(h.mustRun("--ledger", merged, "show", "latest"), "assembled from 3 shard runs") {
		t.Error("show does not say the run was assembled from shards")
	}
	// table, verify and diff work on the whole scan.
	csv := h.mustRun("--ledger", merged, "table", "latest", "--format", "csv")
	if n := strings.Count(csv, "\n") - 1; n != len(full.Results) {
		t.Errorf("table of the assembled run: %d rows, want %d", n, len(full.Results))
	}
	h.mustRun("--ledger", merged, "verify", "latest")
	h.mustRun("--ledger", merged, "tag", "latest", "whole")
	local := decodeRun(t, h.mustRun("--ledger", merged, "run", cfg, "--json"))
	if local.Computed != 0 {
		t.Errorf("after merging the shards the full scan computed %d nodes", local.Computed)
	}
	var d struct {
		Pairs     []any `json:"pairs"`
		Unchanged int   `json:"unchanged_not_shown"`
		Added     []any `json:"added"`
		Removed   []any `json:"removed"`
	}
	if err := json.Unmarshal([]byte(h.mustRun("--ledger", merged, "diff", "whole", local.Run, "--json")), &d); err != nil ||
		len(d.Pairs) != 0 || d.Unchanged != len(full.Results) || len(d.Added)+len(d.Removed) != 0 {
		t.Errorf("diff of the assembled run and a local run: %d changed, %d unchanged, %d added, %d removed (%v)", len(d.Pairs), d.Unchanged, len(d.Added), len(d.Removed), err)
	}
	// An incomplete set is not assembled, and says why.
	lone := filepath.Join(h.dir, "lone.db")
	_, errs, code := h.run("--ledger", lone, "merge", ledgers[0])
	if code != 0 || !strings.Contains(errs, "not assembled") || !strings.Contains(errs, "shard(s) 2, 3 not in this ledger") {
		t.Errorf("merge of one shard of three: exit %d, %q", code, errs)
	}
	if _, _, code := h.run("run", cfg, "--shard", "4/3"); code != 2 {
		t.Errorf("--shard 4/3 accepted")
	}
}
