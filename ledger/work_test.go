package ledger

import (
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

// recordWork records a run of one work of two chained nodes (a, b; b the
// result) under key, and returns the run, the nodes and the work.
func recordWork(t *testing.T, l *Ledger, id string, key pipeline.WorkID) (pipeline.RunID, *pipeline.Work) {
	t.Helper()
	ctx := context.Background()
	run := beginRun(t, l, id, testClock)
	a := mkNode(t, "model", pipeline.Values{"alpha": num(1)}, pipeline.Values{"V0": num(2)})
	b := mkNode(t, "compare", pipeline.Values{"set": num(3)}, pipeline.Values{"dchi2": num(4)}, a)
	w := &pipeline.Work{Key: key, Span: 1, Summary: []byte("the front end's results"),
		Nodes: []pipeline.WorkNode{
			{Key: a.Key, Output: a.OutputHash, Status: pipeline.NodeOK, Action: pipeline.Computed},
			{Key: b.Key, Output: b.OutputHash, Status: pipeline.NodeOK, Action: pipeline.Computed},
		},
		Results: []pipeline.ResultRef{{Ordinal: 0, Label: "point", Key: b.Key}}}
	batch := []pipeline.Recorded{{Node: a, Action: pipeline.Computed, InWork: true}, {Node: b, Action: pipeline.Computed, InWork: true}}
	if err := l.RecordWorks(ctx, run, batch, []pipeline.WorkLink{{Work: w}}); err != nil {
		t.Fatal(err)
	}
	if err := l.FinishRun(ctx, run, pipeline.RunSucceeded, testClock, ""); err != nil {
		t.Fatal(err)
	}
	return run, w
}

const testWorkKey = pipeline.WorkID("sha256:1111111111111111111111111111111111111111111111111111111111111111")

// A recorded work is found by its key, linked by a second run without a
// row per node, and shown through the run_nodes and run_results views.
func TestWorkRecordedAndReused(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	run, w := recordWork(t, l, "r1", testWorkKey)
	rw, found, err := l.LookupWork(ctx, testWorkKey)
	if err != nil || !found || rw.Nodes != 2 || rw.Span != 1 || string(rw.Summary) != string(w.Summary) {
		t.Fatalf("LookupWork: %+v %v %v", rw, found, err)
	}
	run2 := beginRun(t, l, "r2", testClock.Add(1))
	before := rowCounts(t, l)
	if err := l.RecordWorks(ctx, run2, nil, []pipeline.WorkLink{{Reused: &rw}}); err != nil {
		t.Fatal(err)
	}
	if err := l.FinishRun(ctx, run2, pipeline.RunSucceeded, testClock, ""); err != nil {
		t.Fatal(err)
	}
	after := rowCounts(t, l)
	if after["nodes"] != before["nodes"] {
		t.Errorf("reusing a work wrote %d node rows", after["nodes"]-before["nodes"])
	}
	for _, r := range []pipeline.RunID{run, run2} {
		nodes, err := l.RunNodes(ctx, r)
		if err != nil {
			t.Fatal(err)
		}
		res, err := l.RunResults(ctx, r)
		if err != nil {
			t.Fatal(err)
		}
		want := pipeline.Computed
		if r == run2 {
			want = pipeline.Reused
		}
		if len(nodes) != 2 || nodes[0].Key != w.Nodes[0].Key || nodes[1].Action != want || len(res) != 1 || res[0].Label != "point" || res[0].Key != w.Nodes[1].Key {
			t.Errorf("run %s through the views: %d nodes (%v), results %+v", r, len(nodes), nodes[1].Action, res)
		}
	}
	if probs, err := l.WorkProblems(ctx); err != nil || len(probs) != 0 {
		t.Errorf("WorkProblems of an untouched ledger: %v %v", probs, err)
	}
	if probs, _, err := l.SealProblems(ctx); err != nil || len(probs) != 0 {
		t.Errorf("SealProblems of an untouched ledger: %v %v", probs, err)
	}
}

// Edits of a work, from careless to consistent, are each caught by the
// layer above: a bare edit by the row checksum (on every read), an edit
// with the checksum recomputed by the digest (verify, from the node rows),
// an edit with digest and checksum recomputed by the run's seal.
func TestWorkEditsAreCaught(t *testing.T) {
	ctx := context.Background()
	edit := func(t *testing.T, l *Ledger, fn func(w *workRow)) {
		t.Helper()
		w, err := scanWork(l.db.QueryRowContext(ctx, "SELECT "+workColumns+" FROM works"))
		if err != nil {
			t.Fatal(err)
		}
		fn(&w)
		if _, err := l.db.ExecContext(ctx, "UPDATE works SET results = ?, summary = ?, digest = ?, row_check = ? WHERE id = ?", w.results, w.summary, w.digest, w.check, w.id); err != nil {
			t.Fatal(err)
		}
	}
	t.Run("bare", func(t *testing.T) {
		l, _ := openTest(t)
		recordWork(t, l, "r1", testWorkKey)
		edit(t, l, func(w *workRow) { w.summary = []byte("edited results") })
		if _, _, err := l.LookupWork(ctx, testWorkKey); !errors.Is(err, ErrIntegrity) {
			t.Errorf("LookupWork of an edited row: %v, want ErrIntegrity", err)
		}
		if probs, _ := l.WorkProblems(ctx); len(probs) != 1 {
			t.Errorf("WorkProblems: %v", probs)
		}
	})
	t.Run("checksum recomputed", func(t *testing.T) {
		l, _ := openTest(t)
		recordWork(t, l, "r1", testWorkKey)
		edit(t, l, func(w *workRow) {
			w.results = strings.Replace(w.results, `"point"`, `"edited"`, 1)
			w.check = w.rowCheck()
		})
		probs, err := l.WorkProblems(ctx)
		if err != nil || len(probs) != 1 || !strings.Contains(probs[0].What, "digest") {
			t.Errorf("WorkProblems: %v %v; want the digest mismatch", probs, err)
		}
	})
	t.Run("digest and checksum recomputed", func(t *testing.T) {
		l, _ := openTest(t)
		run, _ := recordWork(t, l, "r1", testWorkKey)
		edit(t, l, func(w *workRow) {
			w.results = strings.Replace(w.results, `"point"`, `"edited"`, 1)
			err := l.inReadTx(ctx, func(q *qtx) error {
				acct, err := storedAccount(ctx, q, *w)
				w.digest = acct.digest()
				return err
			})
			if err != nil {
				t.Fatal(err)
			}
			w.check = w.rowCheck()
		})
		if probs, _ := l.WorkProblems(ctx); len(probs) != 0 {
			t.Errorf("WorkProblems: %v (a consistent work edit passes; the seal must catch it)", probs)
		}
		probs, _, err := l.SealProblems(ctx)
		if err != nil || len(probs) != 1 || probs[0].ID != string(run) {
			t.Errorf("SealProblems: %v %v; want run %s's seal broken", probs, err, run)
		}
	})
}

// A work whose key is already recorded by another run is linked, not
// written twice; a different account under the same key is a conflict.
func TestWorkKeyConflict(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	recordWork(t, l, "r1", testWorkKey)
	recordWork(t, l, "r2", testWorkKey)
	var n int
	if err := l.db.QueryRow("SELECT count(*) FROM works").Scan(&n); err != nil || n != 1 {
		t.Errorf("%d work rows after two runs of one work (%v), want 1", n, err)
	}
	run := beginRun(t, l, "r3", testClock)
	a := mkNode(t, "model", pipeline.Values{"alpha": num(1)}, pipeline.Values{"V0": num(2)})
	w := &pipeline.Work{Key: testWorkKey, Span: 1, Summary: []byte("different results"),
		Nodes: []pipeline.WorkNode{{Key: a.Key, Output: a.OutputHash, Status: pipeline.NodeOK, Action: pipeline.Reused}}}
	err := l.RecordWorks(ctx, run, nil, []pipeline.WorkLink{{Work: w}})
	if !errors.Is(err, ErrIntegrity) || !strings.Contains(err.Error(), "conflicting works") {
		t.Errorf("a different work under a recorded key: %v", err)
	}
}

// A node marked New (its stage version was not held when the run began)
// that another run has recorded since is written once: the batch fails on
// the key, is written again reading every key, and keeps the stored row.
func TestNewNodeAlreadyRecorded(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	held, err := l.HoldsStage(ctx, testTool, "model", 3)
	if err != nil || held {
		t.Fatalf("an empty ledger holds stage model/3: %v %v", held, err)
	}
	run1 := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"alpha": num(1)}, pipeline.Values{"V0": num(2)})
	if err := l.RecordNodes(ctx, run1, []pipeline.Recorded{{Node: a, Action: pipeline.Computed}}); err != nil {
		t.Fatal(err)
	}
	if held, _ := l.HoldsStage(ctx, testTool, "model", 3); !held {
		t.Error("after recording a model/3 node the ledger does not hold the stage")
	}
	run2 := beginRun(t, l, "r2", testClock)
	before := rowCounts(t, l)
	if err := l.RecordNodes(ctx, run2, []pipeline.Recorded{{Node: a, Action: pipeline.Computed, New: true}}); err != nil {
		t.Fatalf("a New node already recorded: %v", err)
	}
	after := rowCounts(t, l)
	if after["nodes"] != before["nodes"] {
		t.Errorf("%d node rows written for a node already recorded", after["nodes"]-before["nodes"])
	}
}
