package ledger

import (
	"context"
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
