package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

// firstLayout writes a ledger at path in the first schema layout
// (migrations 1 to 4): the diamond a -> b, a -> c, (b, c) -> d recorded
// computed by run r1 with d as its result, plus a failed node e, written
// with the first layout's own statements.
func firstLayout(t *testing.T, path string) (nodes []pipeline.NodeRecord) {
	t.Helper()
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("sqlite3", dsn(path))
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if err := migrate(ctx, db, ms[:4], fixedClock); err != nil {
		t.Fatal(err)
	}
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	b := mkNode(t, "canonical", pipeline.Values{"k": num(0.05)}, pipeline.Values{"y": num(3)}, a)
	c := mkNode(t, "slowroll", pipeline.Values{"N": num(60)}, pipeline.Values{"y": num(4)}, a)
	d := mkNode(t, "compare", pipeline.Values{"set": pipeline.String("demo")}, pipeline.Values{"chi2": num(1.5)}, b, c)
	e := asFailed(mkNode(t, "slowroll", pipeline.Values{"N": num(900)}, pipeline.Values{"y": num(0)}, a), "inflation never ends")
	info := runInfo("r1", testClock)
	exec := func(q string, args ...any) {
		t.Helper()
		if _, err := db.Exec(q, args...); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
	}
	exec(`INSERT INTO runs (id, started_at, finished_at, tool_version, config_path, config_text, config_hash, status, error)
		VALUES (?, ?, ?, ?, ?, ?, ?, 'failed', '1 node(s) failed')`,
		string(info.ID), formatTime(testClock), formatTime(testClock), info.ToolVersion, info.ConfigPath, info.ConfigText, info.ConfigHash)
	for i, n := range []pipeline.NodeRecord{a, b, c, d, e} {
		text, err := rowValues(n)
		if err != nil {
			t.Fatal(err)
		}
		exec(`INSERT INTO nodes (key, stage, stage_version, params, description, outputs, output_hash, status, error, duration_ns, recorded_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`, string(n.Key), n.Stage, n.Version, text.params, n.Description, text.outputs,
			string(n.OutputHash), string(n.Status), n.Error, int64(n.Duration), formatTime(testClock))
		for p, in := range n.Inputs {
			exec(`INSERT INTO node_inputs (key, position, input_key, input_stage, input_output_hash) VALUES (?, ?, ?, ?, ?)`,
				string(n.Key), p, string(in.Key), in.Stage, string(in.Output))
		}
		action, errText := "computed", ""
		if n.Status == pipeline.NodeFailed {
			action, errText = "failed", n.Error
		}
		exec(`INSERT INTO run_nodes (run_id, key, action, duration_ns, error, ordinal) VALUES (?, ?, ?, ?, ?, ?)`,
			string(info.ID), string(n.Key), action, int64(n.Duration), errText, i)
	}
	exec(`INSERT INTO run_results (run_id, ordinal, label, key) VALUES ('r1', 0, 'd', ?)`, string(d.Key))
	return []pipeline.NodeRecord{a, b, c, d, e}
}

// TestCompactLayoutMigration opens a first-layout ledger: migration 0005
// must carry every node, input, run link and result over unchanged as the
// ledger's readers see them, keep checking the copied rows (an edit is
// still caught), and let new runs reuse and extend them.
func TestCompactLayoutMigration(t *testing.T) {
	path := filepath.Join(t.TempDir(), "old.db")
	want := firstLayout(t, path)
	a, d, e := want[0], want[3], want[4]
	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	for _, n := range want {
		got, ok, err := l.Node(ctx, n.Key)
		if err != nil || !ok {
			t.Fatalf("Node(%s) after migration: %v %v", n.Stage, ok, err)
		}
		if !reflect.DeepEqual(got, n) {
			t.Errorf("%s node after migration:\n got %+v\nwant %+v", n.Stage, got, n)
		}
	}
	lin, err := l.Lineage(ctx, d.Key)
	if err != nil || len(lin) != 4 || lin[0].Key != a.Key || lin[3].Key != d.Key {
		t.Errorf("Lineage(d) after migration: %d nodes, %v", len(lin), err)
	}
	rns, err := l.RunNodes(ctx, "r1")
	if err != nil || len(rns) != 5 || rns[4].Action != pipeline.Failed || rns[4].RunError != e.Error || rns[2].Key != want[2].Key {
		t.Errorf("RunNodes after migration: %+v, %v", rns, err)
	}
	res, err := l.RunResults(ctx, "r1")
	if err != nil || len(res) != 1 || res[0].Key != d.Key || res[0].Label != "d" {
		t.Errorf("RunResults after migration: %+v, %v", res, err)
	}
	if probs, err := l.Audit(ctx); err != nil || len(probs) != 0 {
		t.Errorf("Audit after migration: %+v, %v", probs, err)
	}
	// The copied rows keep their descriptions, still checked on read.
	var stored int
	if err := l.db.QueryRow("SELECT count(*) FROM nodes WHERE description IS NOT NULL").Scan(&stored); err != nil || stored != 5 {
		t.Errorf("%d copied rows keep their description (%v), want 5", stored, err)
	}
	// A new run reuses a copied node and adds one downstream of it.
	run := beginRun(t, l, "r2", testClock)
	if _, ok, err := l.Lookup(ctx, d.Key); !ok || err != nil {
		t.Fatalf("Lookup(d): %v %v", ok, err)
	}
	record(t, l, run, d, pipeline.Reused)
	f := mkNode(t, "compare", pipeline.Values{"set": pipeline.String("other")}, pipeline.Values{"chi2": num(2.5)}, d)
	if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: a, Action: pipeline.Reused}, {Node: f, Action: pipeline.Computed}}); err != nil {
		t.Fatal(err)
	}
	if got, ok, err := l.Node(ctx, f.Key); err != nil || !ok || !reflect.DeepEqual(got, f) {
		t.Errorf("new node over migrated ones: %+v %v %v", got, ok, err)
	}
	if _, err := l.db.Exec("UPDATE nodes SET params = 'x f 7 1\n' WHERE key = ?", keyArg(a.Key)); err != nil {
		t.Fatal(err)
	}
	if _, _, err := l.Node(ctx, a.Key); !errors.Is(err, ErrIntegrity) {
		t.Errorf("edited copied row: %v, want ErrIntegrity", err)
	}
}

// TestCompactLayoutStoresNoDescription: a node recorded in the compact
// layout stores its key and output hash as 32-byte digests and no
// description, and reads back with the description Describe writes.
func TestCompactLayoutStoresNoDescription(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a, b := chainAB(t, l, run)
	var keyLen, hashLen int
	var desc sql.NullString
	var tool string
	if err := l.db.QueryRow("SELECT length(key), length(output_hash), description, tool FROM nodes WHERE key = ?", keyArg(b.Key)).
		Scan(&keyLen, &hashLen, &desc, &tool); err != nil {
		t.Fatal(err)
	}
	if keyLen != 32 || hashLen != 32 || desc.Valid || tool != testTool {
		t.Errorf("stored row: key %d bytes, hash %d bytes, description %v, tool %q", keyLen, hashLen, desc, tool)
	}
	got, ok, err := l.Node(ctx, b.Key)
	if err != nil || !ok || got.Description != b.Description || !reflect.DeepEqual(got.Inputs, b.Inputs) {
		t.Errorf("Node(b) = %+v, %v, %v", got, ok, err)
	}
	// Prefix look-ups use the key index: odd and even numbers of digits.
	hexPart := strings.TrimPrefix(string(a.Key), pipeline.HashPrefix)
	for _, n := range []int{6, 7, 64} {
		if k, err := l.ResolveKey(context.Background(), hexPart[:n]); err != nil || k != a.Key {
			t.Errorf("ResolveKey(%d digits) = %s, %v", n, k, err)
		}
	}
	if _, err := l.ResolveKey(context.Background(), "zzzzzzz"); err == nil {
		t.Error("ResolveKey of non-hex digits succeeded")
	}
}

// TestPageSize: a new ledger file gets PageSize; an existing one keeps
// the page size it was made with (SQLite cannot change it in WAL mode).
func TestPageSize(t *testing.T) {
	l, _ := openTest(t)
	var size int
	if err := l.db.QueryRow("PRAGMA page_size").Scan(&size); err != nil || size != PageSize {
		t.Errorf("new ledger: page size %d (%v), want %d", size, err, PageSize)
	}
	path := filepath.Join(t.TempDir(), "old.db")
	firstLayout(t, path)
	old, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer old.Close()
	if err := old.db.QueryRow("PRAGMA page_size").Scan(&size); err != nil || size != 4096 {
		t.Errorf("existing ledger: page size %d (%v), want 4096 as made", size, err)
	}
}

// TestMissingKeyWrittenMeanwhile: a key LookupMany found missing is
// recorded without being read again; when another process wrote it in
// between, the batch is recorded again reading every key, and the node is
// linked to the run once, with its row unchanged.
func TestMissingKeyWrittenMeanwhile(t *testing.T) {
	l, path := openTest(t)
	other, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer other.Close()
	run := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	b := mkNode(t, "canonical", pipeline.Values{"k": num(0.05)}, pipeline.Values{"y": num(3)}, a)
	found, err := l.LookupMany(ctx, []pipeline.KeyID{a.Key, b.Key})
	if err != nil || len(found) != 0 {
		t.Fatalf("LookupMany on an empty ledger: %v, %v", found, err)
	}
	// The fast path is taken when nothing intervenes.
	used, err := l.recordBatch(ctx, run, []pipeline.Recorded{{Node: a, Action: pipeline.Computed}}, []rowText{mustText(t, a)}, true)
	if err != nil || !used {
		t.Fatalf("recordBatch with a missing key: used %v, %v", used, err)
	}
	// Another process writes b after this one found it missing.
	otherRun := beginRun(t, other, "r2", testClock)
	record(t, other, otherRun, a, pipeline.Reused)
	record(t, other, otherRun, b, pipeline.Computed)
	before := rowCounts(t, l)
	if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: b, Action: pipeline.Computed}}); err != nil {
		t.Fatalf("RecordNodes after another process wrote the key: %v", err)
	}
	after := rowCounts(t, l)
	if after["nodes"] != before["nodes"] || after["run_nodes"] != before["run_nodes"]+1 {
		t.Errorf("rows before %v, after %v: want one more link and no new node", before, after)
	}
	rns, err := l.RunNodes(ctx, run)
	if err != nil || len(rns) != 2 || rns[1].Key != b.Key || rns[1].Action != pipeline.Computed {
		t.Errorf("run r1 nodes: %+v, %v", rns, err)
	}
}

func mustText(t *testing.T, rec pipeline.NodeRecord) rowText {
	t.Helper()
	text, err := checkRecord(rec, pipeline.Computed, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	return text
}

// TestPackedLayoutMigration opens a ledger at migration 0016 (text values,
// tool and stage per row, a unique key index) holding a chain with its
// inputs, run links, a result and a quarantined row: migration 0017 must
// carry every row over as its readers see them (the text rows read and
// checked as before), keep the quarantine, and let a new run reuse a
// carried row and add packed ones downstream of it.
func TestPackedLayoutMigration(t *testing.T) {
	path := filepath.Join(t.TempDir(), "v16.db")
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("sqlite3", dsn(path))
	if err != nil {
		t.Fatal(err)
	}
	if err := migrate(ctx, db, ms[:16], fixedClock); err != nil {
		t.Fatal(err)
	}
	a := mkNode(t, "model", pipeline.Values{"x": num(0.25)}, pipeline.Values{"y": num(2.5), "f": pipeline.String("V = phi^2")})
	b := mkNode(t, "compare", pipeline.Values{"set": pipeline.String("demo")}, pipeline.Values{"chi2": num(1.5)}, a)
	info := runInfo("r1", testClock)
	exec := func(q string, args ...any) {
		t.Helper()
		if _, err := db.Exec(q, args...); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
	}
	exec(`INSERT INTO runs (id, started_at, finished_at, tool_version, config_path, config_text, config_hash, status, error)
		VALUES (?, ?, ?, ?, ?, ?, ?, 'succeeded', '')`,
		string(info.ID), formatTime(testClock), formatTime(testClock), info.ToolVersion, info.ConfigPath, info.ConfigText, info.ConfigHash)
	for i, n := range []pipeline.NodeRecord{a, b} {
		text, err := rowValues(n)
		if err != nil {
			t.Fatal(err)
		}
		exec(`INSERT INTO nodes (id, key, tool, stage, stage_version, params, outputs, output_hash, status, error, duration_ns, recorded_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, 'ok', '', ?, ?)`, i+1, keyArg(n.Key), testTool, n.Stage, n.Version, text.params, text.outputs,
			keyArg(pipeline.KeyID(n.OutputHash)), int64(n.Duration), formatTime(testClock))
		exec(`INSERT OR IGNORE INTO node_kinds (tool, stage, stage_version) VALUES (?, ?, ?)`, testTool, n.Stage, n.Version)
		exec(`INSERT INTO run_node_links (run_id, ordinal, node, action, duration_ns, error) VALUES ('r1', ?, ?, 'computed', 0, '')`, i, i+1)
	}
	exec(`INSERT INTO node_inputs (node, position, input) VALUES (2, 0, 1)`)
	exec(`INSERT INTO run_result_rows (run_id, ordinal, label, node) VALUES ('r1', 0, 'b', 2)`)
	exec(`INSERT INTO quarantine (node, key, params, outputs, output_hash, problem, run_id, found_at) VALUES (1, ?, 'x f 9 1\n', 'y f 9 1\n', NULL, 'edited', 'r1', ?)`,
		keyArg(a.Key), formatTime(testClock))
	db.Close()

	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	for _, n := range []pipeline.NodeRecord{a, b} {
		got, ok, err := l.Node(ctx, n.Key)
		if err != nil || !ok || !reflect.DeepEqual(got, n) {
			t.Fatalf("%s node after 0017: %v %v\n got %+v\nwant %+v", n.Stage, ok, err, got, n)
		}
	}
	if res, err := l.RunResults(ctx, "r1"); err != nil || len(res) != 1 || res[0].Key != b.Key {
		t.Errorf("RunResults after 0017: %+v, %v", res, err)
	}
	if probs, err := l.Audit(ctx); err != nil || len(probs) != 0 {
		t.Errorf("Audit after 0017: %+v, %v", probs, err)
	}
	if q, err := l.Quarantined(ctx, "r1"); err != nil || len(q) != 1 || q[0].ID != string(a.Key) {
		t.Errorf("quarantine after 0017: %+v, %v", q, err)
	}
	var shown string
	if err := l.db.QueryRow("SELECT outputs FROM nodes WHERE id = 1").Scan(&shown); err != nil || shown != "f s \"V = phi^2\"\ny f 2.5 1\n" {
		t.Errorf("nodes view of a carried row: %q, %v", shown, err)
	}
	// A new run reuses the carried row and adds a packed one after it.
	run := beginRun(t, l, "r2", testClock)
	c := mkNode(t, "compare", pipeline.Values{"set": pipeline.String("other")}, pipeline.Values{"chi2": num(0.75)}, a)
	if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: a, Action: pipeline.Reused}, {Node: c, Action: pipeline.Computed}}); err != nil {
		t.Fatal(err)
	}
	if got, ok, err := l.Node(ctx, c.Key); err != nil || !ok || !reflect.DeepEqual(got, c) {
		t.Errorf("packed node after carried ones: %+v %v %v", got, ok, err)
	}
	var shape sql.NullInt64
	if err := l.db.QueryRow("SELECT outputs_shape FROM node_rows WHERE key = ?", keyArg(c.Key)).Scan(&shape); err != nil || !shape.Valid {
		t.Errorf("the new row is not packed: %v %v", shape, err)
	}
	if probs, err := l.Audit(ctx); err != nil || len(probs) != 0 {
		t.Errorf("Audit after a new run: %+v, %v", probs, err)
	}
}

// TestAbsentKeysReadAgainOnlyWhenWritten: a scan alone on its ledger takes
// the keys of a stage the ledger held none of as absent without reading
// them again; the same key met in a later batch of the run (its flight
// forgotten) is read again and linked, not written twice; and a key of an
// unheld stage that another process wrote after the stage was found
// unheld is read again, found, and linked.
func TestAbsentKeysReadAgainOnlyWhenWritten(t *testing.T) {
	l, path := openTest(t)
	if held, err := l.HoldsStage(ctx, testTool, "model", 3); err != nil || held {
		t.Fatalf("an empty ledger holds stage model/3: %v %v", held, err)
	}
	run := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	b := mkNode(t, "model", pipeline.Values{"x": num(2)}, pipeline.Values{"y": num(3)})
	if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: a, Action: pipeline.Computed, New: true}, {Node: b, Action: pipeline.Computed, New: true}}); err != nil {
		t.Fatal(err)
	}
	if n := l.marks.checked.Load(); n != 0 {
		t.Errorf("%d keys read again in the first batch of a ledger's only writer, want 0", n)
	}
	before := rowCounts(t, l)
	if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: a, Action: pipeline.Computed, New: true}}); err != nil {
		t.Fatalf("a New node the run already recorded: %v", err)
	}
	if n := l.marks.checked.Load(); n < 1 {
		t.Errorf("a key this ledger wrote was taken as absent without being read again")
	}
	if after := rowCounts(t, l); after["nodes"] != before["nodes"] {
		t.Errorf("%d node rows written for a node the run already recorded", after["nodes"]-before["nodes"])
	}

	// Another process writes a node of a stage this ledger found unheld.
	other, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer other.Close()
	if held, err := l.HoldsStage(ctx, testTool, "canonical", 3); err != nil || held {
		t.Fatalf("stage canonical/3 held: %v %v", held, err)
	}
	c := mkNode(t, "canonical", pipeline.Values{"k": num(0.05)}, pipeline.Values{"y": num(3)}, a)
	otherRun := beginRun(t, other, "r2", testClock)
	record(t, other, otherRun, a, pipeline.Reused)
	record(t, other, otherRun, c, pipeline.Computed)
	before = rowCounts(t, l)
	checked := l.marks.checked.Load()
	if err := l.RecordNodes(ctx, run, []pipeline.Recorded{{Node: c, Action: pipeline.Computed, New: true}}); err != nil {
		t.Fatalf("a New node another process recorded meanwhile: %v", err)
	}
	if l.marks.checked.Load() == checked {
		t.Error("a key another process may have written was taken as absent without being read again")
	}
	after := rowCounts(t, l)
	if after["nodes"] != before["nodes"] || after["run_nodes"] != before["run_nodes"]+1 {
		t.Errorf("rows before %v, after %v: want one more link and no new node", before, after)
	}
}

// TestBloomSet: a key added is always found (a false negative would let a
// written key be taken as absent), across the growth of the chain; keys
// not added are found rarely (about 1% a filter at 10 bits and 7 hashes:
// Bloom 1970, false-positive rate (1-e^(-kn/m))^k, common practice).
func TestBloomSet(t *testing.T) {
	var s bloomSet
	const n = 300000
	key := func(i int) pipeline.KeyID { return pipeline.KeyID(fmt.Sprintf("sha256:%064x", i)) }
	for i := range n {
		s.add(key(i))
	}
	if len(s.filters) < 3 {
		t.Errorf("%d filters for %d keys: the chain did not grow", len(s.filters), n)
	}
	for i := range n {
		if !s.has(key(i)) {
			t.Fatalf("key %d added but not found", i)
		}
	}
	fp := 0
	for i := n; i < 2*n; i++ {
		if s.has(key(i)) {
			fp++
		}
	}
	if rate := float64(fp) / n; rate > 0.04 {
		t.Errorf("false-positive rate %.4f over %d filters, want about 0.01 each", rate, len(s.filters))
	}
}
