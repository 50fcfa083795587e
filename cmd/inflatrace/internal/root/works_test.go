package root

import (
	"context"
	"database/sql"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
)

// A re-run of an unchanged study reuses its works whole: the same output
// to the byte (run --json, with every result's key and row), every node
// reused, a few hundred bytes of ledger per work (a run row and one link
// a work, not a row a node), and the run's recorded results read from the
// works' summaries equal those assembled from the nodes' lineages. The
// demo holds a band, results of four histories and, in chunks of three
// points, a work per chunk.
func TestWarmRunReusesWorks(t *testing.T) {
	saved := app.ChunkPoints
	app.ChunkPoints = 3
	defer func() { app.ChunkPoints = saved }()
	h := newHarness(t)
	coldOut := h.mustRun("run", demoPath(t), "--json")
	cold := decodeRun(t, coldOut)
	before := ledgerBytes(t, h.ledger)
	warmOut := h.mustRun("run", demoPath(t), "--json")
	warm := decodeRun(t, warmOut)
	grown := ledgerBytes(t, h.ledger) - before
	if warm.Computed != 0 || warm.Reused != cold.Computed+cold.Reused {
		t.Errorf("warm run: %d computed, %d reused; want 0 and %d", warm.Computed, warm.Reused, cold.Computed+cold.Reused)
	}
	if !reflect.DeepEqual(cold.Results, warm.Results) || cold.Status != warm.Status {
		t.Errorf("warm results differ from cold:\n%s\n---\n%s", coldOut, warmOut)
	}
	works := (16 + 2) / 3
	if limit := int64(2 * 16384); grown > limit {
		t.Errorf("a warm re-run of %d works grew the ledger by %d bytes, want at most %d (two pages)", works, grown, limit)
	}
	l, err := ledger.Open(h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	ctx := context.Background()
	for _, run := range []string{cold.Run, warm.Run} {
		ws, only, err := l.RunWorks(ctx, pipeline.RunID(run))
		if err != nil {
			t.Fatal(err)
		}
		if !only || len(ws) != works {
			t.Fatalf("run %s: %d works (only works %v), want %d", run, len(ws), only, works)
		}
		fromWorks, err := app.RecordedResults(ctx, l, pipeline.RunID(run))
		if err != nil {
			t.Fatal(err)
		}
		fromNodes, err := app.ResultsOfLineages(ctx, l, pipeline.RunID(run))
		if err != nil {
			t.Fatal(err)
		}
		a, _ := json.Marshal(fromWorks)
		b, _ := json.Marshal(fromNodes)
		if string(a) != string(b) {
			t.Errorf("run %s: results from the works' summaries differ from those assembled from the nodes:\n%s\n%s", run, a, b)
		}
	}
	// The views show every node and result of a works run, as before.
	nodes, err := l.RunNodes(ctx, pipeline.RunID(warm.Run))
	if err != nil {
		t.Fatal(err)
	}
	results, err := l.RunResults(ctx, pipeline.RunID(warm.Run))
	if err != nil {
		t.Fatal(err)
	}
	if len(nodes) != warm.Reused || len(results) != len(warm.Results) {
		t.Errorf("views: %d nodes and %d results of the warm run, want %d and %d", len(nodes), len(results), warm.Reused, len(warm.Results))
	}
	for i, r := range results {
		if r.Ordinal != i || r.Label != warm.Results[i]["label"] || string(r.Key) != warm.Results[i]["key"] {
			t.Fatalf("result %d of the view: %d %q %s; run printed %v %v", i, r.Ordinal, r.Label, r.Key, warm.Results[i]["label"], warm.Results[i]["key"])
		}
	}
	h.mustRun("verify", "--all")
	h.mustRun("verify", warm.Run)
}

// A study that changes one setting misses its works but reuses every
// node the change does not reach; an exported works run imports into
// another ledger with its works, verifies there, and reads the same.
func TestChangedStudyReusesNodesAndWorksTravel(t *testing.T) {
	h := newHarness(t)
	text := customHead + "[[model]]\nfamily = \"t-model\"\nalpha = [1, 2, 3]\n"
	a := decodeRun(t, h.mustRun("run", h.write("a.toml", text), "--json"))
	b := decodeRun(t, h.mustRun("run", h.write("b.toml", text+"\n[[forecast]]\nuse = \"tern-b\"\n"), "--json"))
	if b.Computed != 3 || b.Reused != a.Computed {
		t.Errorf("added forecast: %d computed, %d reused; want 3 (one compare a point) and %d", b.Computed, b.Reused, a.Computed)
	}
	table := h.mustRun("table", b.Run, "--format", "csv")
	arch := filepath.Join(h.dir, "b.tar.gz")
	h.mustRun("export", b.Run, "--out", arch)
	h2 := newHarness(t)
	trust(t, h, h2)
	h2.mustRun("import", arch)
	h2.mustRun("verify", "--all")
	if got := h2.mustRun("table", b.Run, "--format", "csv"); got != table {
		t.Errorf("table of the merged run differs:\n%s\n---\n%s", got, table)
	}
	// And the merged works are reused there.
	c := decodeRun(t, h2.mustRun("run", h2.write("b.toml", text+"\n[[forecast]]\nuse = \"tern-b\"\n"), "--json"))
	if c.Computed != 0 || !reflect.DeepEqual(len(c.Results), len(b.Results)) {
		t.Errorf("re-run after merge: %d computed, %d results", c.Computed, len(c.Results))
	}
}

// A node row edited behind the ledger's back is never served: a reader
// that meets it fails and says what to do; the next run that needs the
// node computes it again, rewrites the row (the row as found kept in
// quarantine) and says so; the ledger then verifies clean and the
// prediction is the one first computed.
func TestEditedNodeIsRecomputed(t *testing.T) {
	h := newHarness(t)
	first := decodeRun(t, h.mustRun("run", demoPath(t), "--json"))
	db, err := sql.Open("sqlite3", h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("UPDATE nodes SET outputs = replace(outputs, 'n_s f 0.9', 'n_s f 0.8') WHERE id = (SELECT min(id) FROM nodes WHERE stage = 'reheat')"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	if _, errs, code := h.run("show", first.Run); code == 0 || !strings.Contains(errs, "verify --all") {
		t.Errorf("show of a run with an edited node: exit %d, %q; want a failure pointing at verify --all", code, errs)
	}
	// The same study with another constraint set: its works are new, its
	// reheat nodes are looked up, the edited one among them.
	out, errs, code := h.run("run", demoOtherSet(t, h), "--json")
	if code != 0 || !strings.Contains(errs, "found edited") {
		t.Fatalf("run over an edited node: exit %d, %q", code, errs)
	}
	second := decodeRun(t, out)
	if _, errs, code := h.run("verify", "--all"); code != 0 {
		t.Errorf("verify --all after the row was rewritten: exit %d, %s", code, errs)
	}
	for i, r := range second.Results {
		if r["n_s"] != first.Results[i]["n_s"] {
			t.Errorf("result %d: n_s %v, first computed %v", i, r["n_s"], first.Results[i]["n_s"])
		}
	}
}

// demoOtherSet writes the demo study with another constraint set: its
// works are new, and its reheat nodes are looked up one by one.
func demoOtherSet(t *testing.T, h *harness) string {
	t.Helper()
	text, err := os.ReadFile(demoPath(t))
	if err != nil {
		t.Fatal(err)
	}
	return h.write("d2.toml", strings.Replace(string(text), "cmb-combined-2025", "planck2018-bk18", 1))
}
