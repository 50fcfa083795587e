package ledger

import (
	"context"
	"errors"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// A running run whose process is alive (or on another host, so that its
// process cannot be asked) is kept while its heartbeat is recent and
// closed, sealed, as interrupted once it is older than the stale limit; a
// run whose process is gone is closed at once.
func TestCloseAbandonedByHeartbeat(t *testing.T) {
	now := testClock
	l, _ := openTest(t)
	l.now = func() time.Time { return now }
	ctx := context.Background()
	elsewhere := runInfo("20261203T070000Z-aaaaaa", now)
	elsewhere.Owner = "other-host:123"
	if err := l.BeginRun(ctx, elsewhere); err != nil {
		t.Fatal(err)
	}
	gone := runInfo("20261203T070001Z-bbbbbb", now)
	gone.Owner = "this-host:999"
	if err := l.BeginRun(ctx, gone); err != nil {
		t.Fatal(err)
	}
	alive := func(owner string) bool { return owner != "this-host:999" }
	closed, err := l.CloseAbandoned(ctx, alive, StaleAfter)
	if err != nil || len(closed) != 1 || closed[0] != gone.ID {
		t.Fatalf("closed %v (%v), want only the run whose process is gone", closed, err)
	}
	now = now.Add(StaleAfter - time.Minute)
	if err := l.Heartbeat(ctx, elsewhere.ID); err != nil {
		t.Fatal(err)
	}
	now = now.Add(StaleAfter - time.Second)
	if closed, _ := l.CloseAbandoned(ctx, alive, StaleAfter); len(closed) != 0 {
		t.Fatalf("closed %v with a heartbeat %s old", closed, StaleAfter-time.Second)
	}
	now = now.Add(2 * time.Second)
	closed, err = l.CloseAbandoned(ctx, alive, StaleAfter)
	if err != nil || len(closed) != 1 || closed[0] != elsewhere.ID {
		t.Fatalf("closed %v (%v), want the run silent for longer than %s", closed, err, StaleAfter)
	}
	d, _ := l.Run(ctx, elsewhere.ID)
	if d.Status != pipeline.RunFailed || d.Seal == "" {
		t.Errorf("stale run: status %s, seal %q; want failed and sealed", d.Status, d.Seal)
	}
	if sealed, p, err := l.CheckSeal(ctx, elsewhere.ID); !sealed || p != nil || err != nil {
		t.Errorf("seal of the closed run: %v %v %v", sealed, p, err)
	}
}

// A run's lock decides before its pid and its heartbeat: a run whose pid
// now names another, live process (a reused pid) and whose heartbeat is
// fresh is closed at once when its lock is free (its process died and the
// system let the lock go); a run whose lock is held is kept even with a
// dead pid and a heartbeat older than the stale limit. Without a lock
// file, the pid and the heartbeat decide as before.
func TestCloseAbandonedByRunLock(t *testing.T) {
	now := testClock
	l, _ := openTest(t)
	l.now = func() time.Time { return now }
	ctx := context.Background()
	reused := runInfo("20261203T070000Z-cccccc", now)
	reused.Owner = "this-host:4242" // the pid is alive: another process has it now
	held := runInfo("20261203T070001Z-dddddd", now)
	held.Owner = "this-host:999" // gone, by the pid; but its lock is held
	for _, r := range []pipeline.RunInfo{reused, held} {
		if err := l.BeginRun(ctx, r); err != nil {
			t.Fatal(err)
		}
	}
	// reused: its process died holding the lock; the system released it
	// and left the file.
	dead, err := l.HoldRunLock(reused.ID)
	if err != nil {
		t.Fatal(err)
	}
	dead.f.Close()
	live, err := l.HoldRunLock(held.ID)
	if err != nil {
		t.Fatal(err)
	}
	defer live.Release()
	if _, err := l.HoldRunLock(held.ID); err == nil {
		t.Fatal("a second hold of a held run lock succeeded")
	}
	alive := func(owner string) bool { return owner != "this-host:999" }
	closed, err := l.CloseAbandoned(ctx, alive, StaleAfter)
	if err != nil || len(closed) != 1 || closed[0] != reused.ID {
		t.Fatalf("closed %v (%v), want only the run whose lock is free", closed, err)
	}
	now = now.Add(StaleAfter + time.Minute)
	if closed, err := l.CloseAbandoned(ctx, alive, StaleAfter); err != nil || len(closed) != 0 {
		t.Fatalf("closed %v (%v): a held lock keeps its run whatever its heartbeat", closed, err)
	}
	d, _ := l.Run(ctx, reused.ID)
	if d.Status != pipeline.RunFailed || !strings.Contains(d.Error, "run lock is free") {
		t.Errorf("run with a free lock: status %s, error %q", d.Status, d.Error)
	}
	if _, err := os.Stat(l.lockPath(reused.ID)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the free lock file of the closed run is still there: %v", err)
	}
	// Released (its run finished), the lock is gone and the pid decides.
	live.Release()
	if _, err := os.Stat(l.lockPath(held.ID)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("a released lock left its file: %v", err)
	}
	closed, err = l.CloseAbandoned(ctx, alive, StaleAfter)
	if err != nil || len(closed) != 1 || closed[0] != held.ID {
		t.Fatalf("closed %v (%v), want the run without a lock whose pid is gone", closed, err)
	}
}
