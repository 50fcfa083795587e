package ledger

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// A ledger opened read-only reads its runs, nodes and lineages, refuses
// every write with ErrReadOnly, and leaves no file beside it; a missing
// file, an unmerged write-ahead log and an old schema are refused with a
// message saying what to do.
func TestOpenReadOnly(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "ledger.db")
	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	run := beginRun(t, l, "20261203T060000Z-aaaaaa", testClock)
	a, b := chainAB(t, l, run)
	if err := l.RecordResults(ctx, run, []pipeline.ResultRef{{Ordinal: 0, Label: "b", Key: b.Key}}); err != nil {
		t.Fatal(err)
	}
	if err := l.FinishRun(ctx, run, pipeline.RunSucceeded, testClock.Add(time.Second), ""); err != nil {
		t.Fatal(err)
	}
	if err := l.Close(); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadDir(dir)
	ro, err := OpenReadOnly(path)
	if err != nil {
		t.Fatal(err)
	}
	if runs, err := ro.Runs(ctx); err != nil || len(runs) != 1 {
		t.Errorf("Runs: %d, %v", len(runs), err)
	}
	if n, ok, err := ro.Lookup(ctx, a.Key); err != nil || !ok || n.OutputHash != a.OutputHash {
		t.Errorf("Lookup: %v %v", ok, err)
	}
	if ls, err := ro.RunLineages(ctx, run, nil); err != nil || len(ls) != 1 || len(ls[0].Nodes) != 2 {
		t.Errorf("RunLineages: %d, %v", len(ls), err)
	}
	if err := ro.BeginRun(ctx, runInfo("20261203T060001Z-bbbbbb", testClock)); !errors.Is(err, ErrReadOnly) {
		t.Errorf("BeginRun on a read-only ledger: %v, want ErrReadOnly", err)
	}
	if err := ro.Tag(ctx, run, "v1", false); !errors.Is(err, ErrReadOnly) {
		t.Errorf("Tag on a read-only ledger: %v, want ErrReadOnly", err)
	}
	ro.Close()
	after, _ := os.ReadDir(dir)
	if len(after) != len(before) {
		t.Errorf("read-only use left files: %d entries before, %d after", len(before), len(after))
	}
	if _, err := OpenReadOnly(filepath.Join(dir, "none.db")); err == nil {
		t.Error("a missing ledger opened read-only")
	}
	os.WriteFile(path+"-wal", []byte("pending"), 0o644)
	if _, err := OpenReadOnly(path); err == nil {
		t.Error("a ledger with an unmerged WAL opened read-only")
	}
	os.Remove(path + "-wal")
}
