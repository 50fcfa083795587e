package ledger

import (
	"context"
	"database/sql"
	"errors"
	"path/filepath"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

func finishRun(t *testing.T, l *Ledger, run pipeline.RunID) {
	t.Helper()
	if err := l.FinishRun(context.Background(), run, pipeline.RunSucceeded, testClock.Add(time.Second), ""); err != nil {
		t.Fatal(err)
	}
}

func TestTagsResolveAndMove(t *testing.T) {
	ctx := context.Background()
	l, _ := openTest(t)
	r1 := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	r2 := beginRun(t, l, "20261202T060000Z-bbbbbb", testClock.Add(time.Hour))
	if err := l.Tag(ctx, r1, "paper-v1", false); err != nil {
		t.Fatal(err)
	}
	if got, err := l.ResolveRun(ctx, "paper-v1"); err != nil || got != r1 {
		t.Fatalf("paper-v1 resolves to %s, %v", got, err)
	}
	if err := l.Tag(ctx, r2, "paper-v1", false); err == nil {
		t.Fatal("a tag was silently moved to another run")
	}
	if err := l.Tag(ctx, r2, "paper-v1", true); err != nil {
		t.Fatal(err)
	}
	if got, _ := l.ResolveRun(ctx, "paper-v1"); got != r2 {
		t.Fatalf("moved tag resolves to %s", got)
	}
	for _, bad := range []string{"", "latest", "2026-x", "has space", "a/b"} {
		if err := l.Tag(ctx, r1, bad, false); err == nil {
			t.Errorf("tag %q accepted", bad)
		}
	}
	if err := l.Tag(ctx, "nope", "x", false); !errors.Is(err, ErrNotFound) {
		t.Errorf("tagging an unknown run: %v", err)
	}
	if names, _ := l.TagsOf(ctx, r2); len(names) != 1 || names[0] != "paper-v1" {
		t.Errorf("tags of r2: %v", names)
	}
}

func TestAuditFindsEditedRows(t *testing.T) {
	ctx := context.Background()
	l, path := openTest(t)
	run := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	a, b := chainAB(t, l, run)
	finishRun(t, l, run)
	if probs, err := l.Audit(ctx); err != nil || len(probs) != 0 {
		t.Fatalf("clean ledger: %v %v", probs, err)
	}
	// Edit b's outputs behind the ledger's back, as a hand edit would.
	db, err := sql.Open("sqlite3", "file:"+path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("UPDATE nodes SET outputs = replace(outputs, ' f ', ' f 9') WHERE key = ?", keyArg(b.Key)); err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("UPDATE runs SET config_text = config_text || ' ' WHERE id = ?", string(run)); err != nil {
		t.Fatal(err)
	}
	db.Close()
	probs, err := l.Audit(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(probs) != 2 || probs[0].ID != string(b.Key) || probs[1].Table != "runs" {
		t.Fatalf("audit found %+v, want b's node and the run", probs)
	}
	_ = a
}

func TestExportThenMergeReproducesHashes(t *testing.T) {
	ctx := context.Background()
	l, _ := openTest(t)
	run := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	a, b := chainAB(t, l, run)
	if err := l.RecordResults(ctx, run, []pipeline.ResultRef{{Ordinal: 0, Label: "b", Key: b.Key}}); err != nil {
		t.Fatal(err)
	}
	finishRun(t, l, run)
	if err := l.Tag(ctx, run, "paper-v1", false); err != nil {
		t.Fatal(err)
	}
	// A second, unrelated run must not be exported.
	other := beginRun(t, l, "20261202T060000Z-cccccc", testClock.Add(time.Hour))
	finishRun(t, l, other)

	out := filepath.Join(t.TempDir(), "one-run.db")
	if _, err := l.ExportRun(ctx, run, out); err != nil {
		t.Fatal(err)
	}
	ex, err := Open(out)
	if err != nil {
		t.Fatal(err)
	}
	runs, _ := ex.Runs(ctx)
	if len(runs) != 1 || runs[0].ID != run {
		t.Fatalf("exported ledger holds %v", runs)
	}
	ex.Close()

	fresh, _ := openTest(t)
	rep, err := fresh.Merge(ctx, out)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Runs != 1 || rep.Nodes != 2 || rep.Tags != 1 {
		t.Fatalf("merge wrote %+v", rep)
	}
	for _, want := range []pipeline.NodeRecord{a, b} {
		got, ok, err := fresh.Node(ctx, want.Key)
		if err != nil || !ok || got.OutputHash != want.OutputHash {
			t.Fatalf("node %s after import: %v %v %s", want.Key, ok, err, got.OutputHash)
		}
	}
	if id, _ := fresh.ResolveRun(ctx, "paper-v1"); id != run {
		t.Errorf("tag not imported")
	}
	// Idempotent.
	rep, err = fresh.Merge(ctx, out)
	if err != nil || rep.Runs != 0 || rep.Nodes != 0 || rep.RunsKept != 1 || rep.NodesKept != 2 {
		t.Fatalf("second merge: %+v %v", rep, err)
	}
	if _, err := l.ExportRun(ctx, run, out); err == nil {
		t.Error("export overwrote an existing file")
	}
}

func TestMergeRefusesConflictingOutputs(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	pa, pb := filepath.Join(dir, "a.db"), filepath.Join(dir, "b.db")
	la, err := Open(pa, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	lb, err := Open(pb, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	ra := beginRun(t, la, "20261202T050000Z-aaaaaa", testClock)
	rb := beginRun(t, lb, "20261202T050000Z-bbbbbb", testClock)
	x := mkNode(t, "src", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(1)})
	record(t, la, ra, x, pipeline.Computed)
	y := withOutputs(t, x, pipeline.Values{"y": num(2)}) // same key, other outputs
	record(t, lb, rb, y, pipeline.Computed)
	finishRun(t, la, ra)
	finishRun(t, lb, rb)
	lb.Close()
	before := rowCounts(t, la)
	if _, err := la.Merge(ctx, pb); !errors.Is(err, ErrIntegrity) {
		t.Fatalf("conflicting merge: %v", err)
	}
	sameCounts(t, before, rowCounts(t, la))
	la.Close()
}
