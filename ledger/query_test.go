package ledger

import (
	"errors"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

func TestRunRoundTrip(t *testing.T) {
	l, _ := openTest(t)
	info := runInfo("20310506-abc", time.Date(2031, 5, 6, 7, 8, 9, 1, time.FixedZone("CEST", 2*3600)))
	if err := l.BeginRun(ctx, info); err != nil {
		t.Fatal(err)
	}
	d, err := l.Run(ctx, info.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !d.Started.Equal(info.Started) || d.Started.Location() != time.UTC {
		t.Errorf("started %v, want %v in UTC", d.Started, info.Started)
	}
	d.Started = info.Started
	want := RunDetail{RunInfo: info, Status: pipeline.RunRunning}
	if !reflect.DeepEqual(d, want) {
		t.Errorf("Run:\n got %+v\nwant %+v", d, want)
	}
}

func TestUnknownRunIsNotFound(t *testing.T) {
	l, _ := openTest(t)
	const id = "ghost-run"
	_, err1 := l.Run(ctx, id)
	_, err2 := l.RunNodes(ctx, id)
	_, err3 := l.RunResults(ctx, id)
	for i, err := range []error{err1, err2, err3} {
		if !errors.Is(err, ErrNotFound) || !strings.Contains(err.Error(), id) {
			t.Errorf("query %d: %v, want ErrNotFound naming %s", i, err, id)
		}
	}
}

func TestRunsNewestFirstWithCounts(t *testing.T) {
	l, _ := openTest(t)
	if runs, err := l.Runs(ctx); err != nil || len(runs) != 0 || runs == nil {
		t.Errorf("Runs on an empty ledger = %#v, %v; want an empty list", runs, err)
	}
	old := beginRun(t, l, "old", testClock)
	a, b := chainAB(t, l, old)
	if err := l.RecordResults(ctx, old, []pipeline.ResultRef{{Ordinal: 0, Label: "ns", Key: b.Key}}); err != nil {
		t.Fatal(err)
	}
	end := testClock.Add(time.Minute)
	if err := l.FinishRun(ctx, old, pipeline.RunSucceeded, end, ""); err != nil {
		t.Fatal(err)
	}
	// Started one nanosecond later: fixed-width times must still sort right
	// ("...09.123456790Z" after "...09.123456789Z").
	newer := beginRun(t, l, "newer", testClock.Add(time.Nanosecond))
	record(t, l, newer, a, pipeline.Reused)
	record(t, l, newer, asFailed(mkNode(t, "reheat", pipeline.Values{"w": num(2)}, nil, a), "boom"), pipeline.Failed)

	runs, err := l.Runs(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(runs) != 2 {
		t.Fatalf("%d runs, want 2", len(runs))
	}
	info := runInfo("old", testClock)
	want := []RunSummary{
		{ID: newer, Started: testClock.Add(time.Nanosecond), Status: pipeline.RunRunning, ToolVersion: info.ToolVersion,
			ConfigPath: info.ConfigPath, ConfigHash: runInfo("newer", testClock).ConfigHash, Reused: 1, Failed: 1},
		{ID: old, Started: testClock, Finished: end, Status: pipeline.RunSucceeded, ToolVersion: info.ToolVersion,
			ConfigPath: info.ConfigPath, ConfigHash: info.ConfigHash, Computed: 2, Results: 1},
	}
	if !reflect.DeepEqual(runs, want) {
		t.Errorf("Runs:\n got %+v\nwant %+v", runs, want)
	}
}

func TestResolveRun(t *testing.T) {
	l, _ := openTest(t)
	if _, err := l.ResolveRun(ctx, Latest); !errors.Is(err, ErrNotFound) {
		t.Errorf("latest on an empty ledger: %v, want ErrNotFound", err)
	}
	beginRun(t, l, "20310506-aaaa", testClock)
	beginRun(t, l, "20310506-aabb", testClock.Add(time.Second))
	beginRun(t, l, "20310507-cccc", testClock.Add(time.Hour))
	beginRun(t, l, "20310505-dddd", testClock.Add(-time.Hour)) // newest row, oldest start
	for _, tc := range []struct{ ref, want string }{
		{"20310506-aaaa", "20310506-aaaa"},
		{"20310507", "20310507-cccc"},
		{"20310506-aab", "20310506-aabb"},
		{Latest, "20310507-cccc"},
	} {
		got, err := l.ResolveRun(ctx, tc.ref)
		if err != nil || string(got) != tc.want {
			t.Errorf("ResolveRun(%q) = %q, %v; want %q", tc.ref, got, err, tc.want)
		}
	}
	_, err := l.ResolveRun(ctx, "20310506-aa")
	if !errors.Is(err, ErrAmbiguous) || !strings.Contains(err.Error(), "20310506-aaaa") || !strings.Contains(err.Error(), "20310506-aabb") {
		t.Errorf("ambiguous prefix: %v, want ErrAmbiguous listing both candidates", err)
	}
	_, err = l.ResolveRun(ctx, "zzz")
	if !errors.Is(err, ErrNotFound) || !strings.Contains(err.Error(), `"zzz"`) {
		t.Errorf("unknown ref: %v, want ErrNotFound naming it", err)
	}
	// Prefix matching is literal: LIKE and GLOB wildcards mean nothing.
	for _, ref := range []string{"%", "2031050_", "*", "2031050?"} {
		if _, err := l.ResolveRun(ctx, ref); !errors.Is(err, ErrNotFound) {
			t.Errorf("ResolveRun(%q) = %v, want ErrNotFound", ref, err)
		}
	}
	if _, err := l.ResolveRun(ctx, ""); err == nil {
		t.Error("ResolveRun accepted an empty reference")
	}
}

func TestResolveRunPrefersExactID(t *testing.T) {
	l, _ := openTest(t)
	beginRun(t, l, "r1", testClock)
	beginRun(t, l, "r10", testClock)
	if got, err := l.ResolveRun(ctx, "r1"); err != nil || got != "r1" {
		t.Errorf("ResolveRun(r1) = %q, %v; want the exact id", got, err)
	}
}

func TestNodeMissing(t *testing.T) {
	l, _ := openTest(t)
	if _, ok, err := l.Node(ctx, pipeline.KeyOf("x")); ok || err != nil {
		t.Errorf("Node of an unknown key = %v, %v", ok, err)
	}
}

// diamond records a → b, a → c, (b, c) → d.
func diamond(t *testing.T, l *Ledger) (a, b, c, d pipeline.NodeRecord) {
	t.Helper()
	run := beginRun(t, l, "r1", testClock)
	a = mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	b = mkNode(t, "canonical", pipeline.Values{"k": num(0.05)}, pipeline.Values{"y": num(3)}, a)
	c = mkNode(t, "slowroll", pipeline.Values{"N": num(60)}, pipeline.Values{"y": num(4)}, a)
	d = mkNode(t, "compare", pipeline.Values{"set": pipeline.String("demo")}, pipeline.Values{"chi2": num(1.5)}, b, c)
	for _, n := range []pipeline.NodeRecord{a, c, b, d} {
		record(t, l, run, n, pipeline.Computed)
	}
	return a, b, c, d
}

func TestLineageDiamond(t *testing.T) {
	l, _ := openTest(t)
	a, b, c, d := diamond(t, l)
	got, err := l.Lineage(ctx, d.Key)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 4 {
		t.Fatalf("lineage has %d nodes, want 4", len(got))
	}
	if got[0].Key != a.Key || got[3].Key != d.Key {
		t.Errorf("lineage order %s %s %s %s: want a first and d last", got[0].Stage, got[1].Stage, got[2].Stage, got[3].Stage)
	}
	pos := map[pipeline.KeyID]int{}
	for i, n := range got {
		if _, dup := pos[n.Key]; dup {
			t.Errorf("node %s appears twice", n.Stage)
		}
		pos[n.Key] = i
	}
	for _, n := range got {
		for _, in := range n.Inputs {
			if pos[in.Key] >= pos[n.Key] {
				t.Errorf("%s comes before its input %s", n.Stage, in.Stage)
			}
		}
	}
	for _, want := range []pipeline.NodeRecord{a, b, c, d} {
		if !reflect.DeepEqual(got[pos[want.Key]], want) {
			t.Errorf("lineage record of %s:\n got %+v\nwant %+v", want.Stage, got[pos[want.Key]], want)
		}
	}
	if got, err := l.Lineage(ctx, b.Key); err != nil || len(got) != 2 || got[0].Key != a.Key || got[1].Key != b.Key {
		t.Errorf("Lineage(b) = %d nodes, %v; want a, b", len(got), err)
	}
	if got, err := l.Lineage(ctx, a.Key); err != nil || len(got) != 1 || got[0].Key != a.Key {
		t.Errorf("Lineage(a) = %d nodes, %v; want a", len(got), err)
	}
	missing := pipeline.KeyOf("unrecorded")
	if _, err := l.Lineage(ctx, missing); !errors.Is(err, ErrNotFound) || !strings.Contains(err.Error(), string(missing)) {
		t.Errorf("Lineage of an unknown key: %v, want ErrNotFound naming it", err)
	}
}

func TestLineageRefusesCycle(t *testing.T) {
	l, _ := openTest(t)
	a, b, _, _ := diamond(t, l)
	// Only a hand edit can do this: make a consume b.
	if _, err := l.db.Exec(`INSERT INTO node_inputs (node, position, input) SELECT a.id, 0, b.id FROM nodes a, nodes b WHERE a.key = ? AND b.key = ?`,
		keyArg(a.Key), keyArg(b.Key)); err != nil {
		t.Fatal(err)
	}
	if _, err := l.Lineage(ctx, b.Key); !errors.Is(err, ErrIntegrity) {
		t.Errorf("Lineage through a cycle: %v, want ErrIntegrity", err)
	}
}

// TestReadsDetectDamagedRows edits stored rows behind the ledger's back;
// every read must report it rather than return the damaged data.
func TestReadsDetectDamagedRows(t *testing.T) {
	for _, tc := range []struct{ name, sql string }{
		{"outputs", "UPDATE nodes SET outputs = 'y f 2.5 1\n' WHERE stage = 'canonical'"},
		{"params", "UPDATE nodes SET params = 'k f 0.06 1\n' WHERE stage = 'canonical'"},
		// The description is not stored but re-derived from the row: a
		// description written into the row must still match the key.
		{"description", "UPDATE nodes SET description = 'inflatrace node key v1\ntool \"x\"\nstage canonical\n' WHERE stage = 'canonical'"},
		{"tool", "UPDATE nodes SET tool = tool || ' ' WHERE stage = 'canonical'"},
		{"stage version", "UPDATE nodes SET stage_version = stage_version + 1 WHERE stage = 'canonical'"},
		// b's input moved from a to c (an ok node of another stage).
		{"input", "UPDATE node_inputs SET input = (SELECT id FROM nodes WHERE stage = 'slowroll') WHERE node = (SELECT id FROM nodes WHERE stage = 'canonical')"},
		{"status", "UPDATE nodes SET status = 'ok', outputs = '', output_hash = zeroblob(32) WHERE stage = 'canonical'"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			l, _ := openTest(t)
			_, b, _, d := diamond(t, l)
			if _, err := l.db.Exec(tc.sql); err != nil {
				t.Fatal(err)
			}
			// A look-up never serves the row: it is a miss, to be computed
			// again (and the row rewritten, TestEditedRowIsRecomputed).
			if _, found, err := l.Lookup(ctx, b.Key); found || err != nil {
				t.Errorf("Lookup: found %v, %v; want a miss", found, err)
			}
			if _, ok := l.suspect.get(b.Key); !ok {
				t.Errorf("Lookup did not remember %s as edited", b.Key)
			}
			if _, _, err := l.Node(ctx, b.Key); !errors.Is(err, ErrIntegrity) {
				t.Errorf("Node: %v, want ErrIntegrity", err)
			}
			if _, err := l.Lineage(ctx, d.Key); !errors.Is(err, ErrIntegrity) {
				t.Errorf("Lineage: %v, want ErrIntegrity", err)
			}
			if _, err := l.RunNodes(ctx, "r1"); !errors.Is(err, ErrIntegrity) {
				t.Errorf("RunNodes: %v, want ErrIntegrity", err)
			}
		})
	}
}

// TestOlderKeyFormat checks that a row written under an earlier key format
// stays readable on its key hash alone, while a new record in a format
// other than today's is refused.
func TestOlderKeyFormat(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	desc := "inflatrace node key v0\nstage model\nparam x f 1 1\n"
	old := pipeline.NodeRecord{
		Key: pipeline.KeyOf(desc), Stage: "model", Version: 3, Params: pipeline.Values{"x": num(1)},
		Description: desc, Outputs: pipeline.Values{"y": num(2)}, Status: pipeline.NodeOK, Duration: time.Second,
	}
	old.OutputHash = withOutputs(t, old, old.Outputs).OutputHash
	if err := l.RecordNode(ctx, run, old, pipeline.Computed); !errors.Is(err, ErrIntegrity) || !strings.Contains(err.Error(), "another key format") {
		t.Errorf("RecordNode of an old-format description: %v, want a refusal", err)
	}
	if _, err := l.db.Exec(`INSERT OR IGNORE INTO kinds (tool, stage, stage_version) VALUES ('', 'model', 3)`); err != nil {
		t.Fatal(err)
	}
	// A row as the first layout's rows are carried forward: text values
	// and a stored description.
	if _, err := l.db.Exec(`INSERT INTO node_rows (kp, key, kind, params, description, outputs, output_hash, status, error, duration_ns, recorded_at)
		VALUES (?, ?, (SELECT id FROM kinds WHERE tool = '' AND stage = 'model' AND stage_version = 3), ?, ?, ?, ?, 'ok', '', ?, ?)`,
		kpOf(keyArg(old.Key)), keyArg(old.Key), "x f 1 1\n", desc, "y f 2 1\n", keyArg(pipeline.KeyID(old.OutputHash)), int64(time.Second), formatTime(testClock)); err != nil {
		t.Fatal(err)
	}
	got, ok, err := l.Node(ctx, old.Key)
	if err != nil || !ok {
		t.Fatalf("Node of an old-format row = %v, %v", ok, err)
	}
	if !reflect.DeepEqual(got, old) {
		t.Errorf("old-format row:\n got %+v\nwant %+v", got, old)
	}
	// Its key hash is still checked.
	if _, err := l.db.Exec("UPDATE nodes SET description = description || 'x' WHERE key = ?", keyArg(old.Key)); err != nil {
		t.Fatal(err)
	}
	if _, _, err := l.Node(ctx, old.Key); !errors.Is(err, ErrIntegrity) {
		t.Errorf("Node of a damaged old-format row: %v, want ErrIntegrity", err)
	}
}

// A row found edited by a look-up is computed again by the run: the row is
// rewritten with what the run computed (and read back intact), and the
// row as found is kept in quarantine with what was wrong with it.
func TestEditedRowIsRecomputed(t *testing.T) {
	for _, tc := range []struct{ name, sql string }{
		{"outputs", "UPDATE nodes SET outputs = 'y f 2.5 1\n' WHERE stage = 'canonical'"},
		{"tool", "UPDATE nodes SET tool = tool || ' ' WHERE stage = 'canonical'"},
		{"input", "UPDATE node_inputs SET input = (SELECT id FROM nodes WHERE stage = 'slowroll') WHERE node = (SELECT id FROM nodes WHERE stage = 'canonical')"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			l, _ := openTest(t)
			_, b, _, _ := diamond(t, l)
			if _, err := l.db.Exec(tc.sql); err != nil {
				t.Fatal(err)
			}
			if _, found, _ := l.Lookup(ctx, b.Key); found {
				t.Fatal("an edited row was served")
			}
			run := beginRun(t, l, "r2", testClock)
			if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: b, Action: pipeline.Computed}}); err != nil {
				t.Fatal(err)
			}
			got, found, err := l.Lookup(ctx, b.Key)
			if err != nil || !found || got.OutputHash != b.OutputHash {
				t.Fatalf("after the re-computation: found %v, %v, hash %s (want %s)", found, err, got.OutputHash, b.OutputHash)
			}
			q, err := l.Quarantined(ctx, run)
			if err != nil || len(q) != 1 || q[0].ID != string(b.Key) || !strings.Contains(q[0].What, "integrity") {
				t.Errorf("quarantine: %v %v", q, err)
			}
		})
	}
}
