package pipeline

import (
	"context"
	"fmt"
	"sync"
	"testing"
	"time"
)

// auditMem is a batched in-memory recorder that checks the engine's
// promises: every node computed was looked up first (unless NoReuse),
// every result names a node already linked to the run, and it counts
// look-up calls and the keys they carried.
type auditMem struct {
	*lookupMem
	amu      sync.Mutex
	looked   map[KeyID]bool
	keys     int
	problems []string
}

func newAudit() *auditMem {
	return &auditMem{lookupMem: &lookupMem{batchMem: &batchMem{memRecorder: newMem()}}, looked: map[KeyID]bool{}}
}

func (a *auditMem) note(keys ...KeyID) {
	a.amu.Lock()
	defer a.amu.Unlock()
	for _, k := range keys {
		a.looked[k] = true
	}
	a.keys += len(keys)
}

func (a *auditMem) Lookup(ctx context.Context, k KeyID) (NodeRecord, bool, error) {
	a.note(k)
	return a.memRecorder.Lookup(ctx, k)
}

func (a *auditMem) LookupMany(ctx context.Context, keys []KeyID) (map[KeyID]NodeRecord, error) {
	a.note(keys...)
	return a.lookupMem.LookupMany(ctx, keys)
}

func (a *auditMem) RecordNodes(ctx context.Context, run RunID, recs []Recorded) error {
	a.amu.Lock()
	for _, r := range recs {
		if r.Action == Computed && !a.looked[r.Node.Key] {
			a.problems = append(a.problems, fmt.Sprintf("node %s computed without a look-up", r.Node.Key))
		}
	}
	a.amu.Unlock()
	return a.batchMem.RecordNodes(ctx, run, recs)
}

func (a *auditMem) RecordResults(ctx context.Context, run RunID, rs []ResultRef) error {
	a.mu.Lock()
	for _, r := range rs {
		if _, ok := a.actions[run][r.Key]; !ok {
			a.problems = append(a.problems, fmt.Sprintf("result %d names node %s before it is recorded", r.Ordinal, r.Key))
		}
	}
	a.results[run] = append(a.results[run], rs...)
	a.mu.Unlock()
	return nil
}

func (a *auditMem) check(t *testing.T) {
	t.Helper()
	for _, p := range a.problems {
		t.Error(p)
	}
}

// A cold scan looks its nodes up in a few large batches (not one query a
// ready node), still looks up every node before computing it, and a warm
// re-run settles everything by look-ups alone, with the cold run's
// outputs. The scan is run in chunks, as the CLI runs it.
func TestColdLookupsBatchedWarmEqualsCold(t *testing.T) {
	const points, per = 3000, 1000
	var chunks []*Graph
	for off := 0; off < points; off += per {
		chunks = append(chunks, scanChain(t, off, per))
	}
	a := newAudit()
	opts := Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 20000}
	var coldHashes []OutputID
	opts.OnNode = func(o NodeOutcome) { coldHashes = append(coldHashes, o.OutputHash) }
	cold := runScan(t, a, "cold", chunks, opts)
	a.check(t)
	if cold.Computed != 5*points {
		t.Fatalf("cold: computed %d, want %d", cold.Computed, 5*points)
	}
	if a.keys != 5*points {
		t.Errorf("cold: %d keys looked up, want each of the %d nodes once", a.keys, 5*points)
	}
	// A ready node per completion would mean thousands of calls; batches
	// of probeBatch, plus small ones when the workers run dry at the end
	// of each chunk, are a few dozen.
	if max := 5*points/probeBatch + 15*len(chunks); a.calls > max {
		t.Errorf("cold: %d look-up calls for %d nodes, want at most %d", a.calls, 5*points, max)
	}
	a.calls, a.keys = 0, 0
	var warmHashes []OutputID
	opts.OnNode = func(o NodeOutcome) { warmHashes = append(warmHashes, o.OutputHash) }
	warm := runScan(t, a, "warm", chunks, opts)
	a.check(t)
	if warm.Computed != 0 || warm.Reused != 5*points {
		t.Fatalf("warm: computed %d reused %d", warm.Computed, warm.Reused)
	}
	// One batch a level of each chunk: five levels.
	if a.calls != 5*len(chunks) {
		t.Errorf("warm: %d look-up calls, want %d (one a level a chunk)", a.calls, 5*len(chunks))
	}
	if len(warmHashes) != len(coldHashes) {
		t.Fatalf("%d warm outcomes, %d cold", len(warmHashes), len(coldHashes))
	}
	cold2 := map[OutputID]int{}
	for _, h := range coldHashes {
		cold2[h]++
	}
	for _, h := range warmHashes {
		cold2[h]--
	}
	for h, n := range cold2 {
		if n != 0 {
			t.Fatalf("output %s: %d more cold than warm", h, n)
		}
	}
	if len(a.results["warm"]) != points || len(a.results["cold"]) != points {
		t.Errorf("results: %d cold, %d warm, want %d", len(a.results["cold"]), len(a.results["warm"]), points)
	}
}

// With a batch larger than the scan, nodes of several chunks share one
// transaction, written at Finish; a key met again in a later chunk before
// the first is written is shared, not recomputed or recorded twice (the
// in-memory recorder refuses a second link), and the results follow
// their nodes.
func TestBatchesSpanChunks(t *testing.T) {
	a := newAudit()
	opts := Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 1 << 20, FlushEvery: time.Hour}
	// Chunks 0-99 and 50-149: 50 points in common.
	tot := runScan(t, a, "span", []*Graph{scanChain(t, 0, 100), scanChain(t, 50, 100)}, opts)
	a.check(t)
	if a.batches != 1 {
		t.Errorf("%d batches, want 1", a.batches)
	}
	if tot.Computed != 5*150 || tot.Reused != 5*50 {
		t.Errorf("computed %d reused %d, want %d and %d", tot.Computed, tot.Reused, 5*150, 5*50)
	}
	if a.writes != 5*150 || len(a.results["span"]) != 200 {
		t.Errorf("%d nodes written, %d results; want 750 and 200", a.writes, len(a.results["span"]))
	}
}

// The writer writes a partial batch once FlushEvery has passed, without
// waiting for the batch to fill or the run to finish.
func TestWriterFlushesOnTime(t *testing.T) {
	a := newAudit()
	opts := Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 1 << 20, FlushEvery: 20 * time.Millisecond}
	sess, err := Begin(context.Background(), a, RunInfo{ID: "timed"}, opts)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sess.Execute(context.Background(), scanChain(t, 0, 10)); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(10 * time.Second)
	for {
		a.mu.Lock()
		written, results := a.writes, len(a.results["timed"])
		a.mu.Unlock()
		if written == 50 && results == 10 {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("after 10 s, %d of 50 nodes and %d of 10 results written with a 20 ms flush interval", written, results)
		}
		time.Sleep(5 * time.Millisecond)
	}
	if _, err := sess.Finish(context.Background(), nil); err != nil {
		t.Fatal(err)
	}
	a.check(t)
}

// gateRecorder blocks every batch until released.
type gateRecorder struct {
	*batchMem
	gate chan struct{}
}

func (g *gateRecorder) RecordNodes(ctx context.Context, run RunID, recs []Recorded) error {
	<-g.gate
	return g.batchMem.RecordNodes(ctx, run, recs)
}

// While a batch is being written and a full one is pending, adding a
// record waits: memory holds at most about two batches.
func TestWriterBoundsPending(t *testing.T) {
	g := &gateRecorder{batchMem: &batchMem{memRecorder: newMem()}, gate: make(chan struct{})}
	g.BeginRun(context.Background(), RunInfo{ID: "w"})
	w := newWriter(context.Background(), g, "w", 3, time.Hour)
	rec := func(i int) Recorded {
		return Recorded{Node: NodeRecord{Key: KeyID(fmt.Sprint("k", i)), Status: NodeOK}, Action: Computed}
	}
	for i := 0; i < 3; i++ {
		w.add(rec(i)) // a full batch: the writer takes it and blocks at the gate
	}
	// Wait for the writer to take it.
	for deadline := time.Now().Add(10 * time.Second); ; time.Sleep(time.Millisecond) {
		w.mu.Lock()
		taken := len(w.buf) == 0
		w.mu.Unlock()
		if taken {
			break
		}
		if time.Now().After(deadline) {
			t.Fatal("the writer never took a full batch")
		}
	}
	for i := 3; i < 6; i++ {
		w.add(rec(i)) // the second batch fills while the first is written
	}
	added := make(chan struct{})
	go func() { w.add(rec(6)); close(added) }()
	select {
	case <-added:
		t.Fatal("a third batch was accepted while two were held")
	case <-time.After(50 * time.Millisecond):
	}
	close(g.gate)
	<-added
	if err := w.close(); err != nil {
		t.Fatal(err)
	}
	if g.writes != 7 || g.batches != 3 {
		t.Errorf("%d records in %d batches, want 7 in 3", g.writes, g.batches)
	}
}
