package ledger

import (
	"fmt"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// TestConcurrentRecordNode has 8 goroutines record nodes into one run at
// once, as the engine's workers do, while also looking nodes up.
func TestConcurrentRecordNode(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	root := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l, run, root, pipeline.Computed)

	const workers, perWorker = 8, 12
	var wg sync.WaitGroup
	errs := make(chan error, workers*perWorker*2)
	for w := range workers {
		// Each worker records a chain of its own, so every node's input is
		// a node the same worker has just recorded.
		chain := make([]pipeline.NodeRecord, perWorker)
		prev := root
		for i := range chain {
			chain[i] = mkNode(t, "slowroll", pipeline.Values{"worker": num(float64(w)), "step": num(float64(i))},
				pipeline.Values{"ns": num(0.96 + float64(i)*1e-4)}, prev)
			prev = chain[i]
		}
		wg.Go(func() {
			for i, n := range chain {
				if err := l.RecordNode(ctx, run, n, pipeline.Computed); err != nil {
					errs <- err
					return
				}
				got, ok, err := l.Lookup(ctx, n.Key)
				if err != nil || !ok || got.OutputHash != n.OutputHash {
					errs <- fmt.Errorf("worker %d step %d: Lookup = %v, %v", w, i, ok, err)
					return
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	rns, err := l.RunNodes(ctx, run)
	if err != nil {
		t.Fatal(err)
	}
	if len(rns) != 1+workers*perWorker {
		t.Fatalf("%d run nodes, want %d", len(rns), 1+workers*perWorker)
	}
	for i, rn := range rns {
		if rn.Ordinal != i {
			t.Fatalf("run node %d has ordinal %d: ordinals must be 0..n-1", i, rn.Ordinal)
		}
	}
}

// TestConcurrentSameKey has 8 runs compute the same node at once, through
// two handles on one file (as two processes would): one node row results,
// and every run is linked to it.
func TestConcurrentSameKey(t *testing.T) {
	l1, path := openTest(t)
	l2, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer l2.Close()
	shared := mkNode(t, "canonical", pipeline.Values{"k": num(0.05)}, pipeline.Values{"As": num(2.1e-9)})

	const runs = 8
	var wg sync.WaitGroup
	errs := make(chan error, runs)
	for i := range runs {
		l := l1
		if i%2 == 1 {
			l = l2
		}
		run := beginRun(t, l, fmt.Sprintf("run-%d", i), testClock.Add(time.Duration(i)*time.Second))
		wg.Go(func() {
			if err := l.RecordNode(ctx, run, shared, pipeline.Computed); err != nil {
				errs <- err
			}
		})
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	c := rowCounts(t, l1)
	if c["nodes"] != 1 || c["run_nodes"] != runs {
		t.Errorf("counts %v, want 1 node and %d run links", c, runs)
	}
}

// TestSecondHandleSeesCommittedRows checks that a write through one handle
// is visible through another on the same file once it returns.
func TestSecondHandleSeesCommittedRows(t *testing.T) {
	l1, path := openTest(t)
	l2, err := Open(filepath.Clean(path))
	if err != nil {
		t.Fatal(err)
	}
	defer l2.Close()
	run := beginRun(t, l1, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l1, run, a, pipeline.Computed)
	if _, ok, err := l2.Lookup(ctx, a.Key); !ok || err != nil {
		t.Errorf("second handle: Lookup = %v, %v", ok, err)
	}
}
