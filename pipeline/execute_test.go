package pipeline

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"testing"
	"time"
)

// memRecorder is an in-memory Recorder for engine tests.
type memRecorder struct {
	mu       sync.Mutex
	nodes    map[KeyID]NodeRecord
	actions  map[RunID]map[KeyID]Action
	results  map[RunID][]ResultRef
	status   map[RunID]RunStatus
	writes   int
	failNext error // returned by the next RecordNode
}

func newMem() *memRecorder {
	return &memRecorder{nodes: map[KeyID]NodeRecord{}, actions: map[RunID]map[KeyID]Action{},
		results: map[RunID][]ResultRef{}, status: map[RunID]RunStatus{}}
}

func (m *memRecorder) BeginRun(_ context.Context, info RunInfo) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	if _, ok := m.status[info.ID]; ok {
		return errors.New("duplicate run")
	}
	m.status[info.ID] = RunRunning
	m.actions[info.ID] = map[KeyID]Action{}
	return nil
}

func (m *memRecorder) Lookup(_ context.Context, k KeyID) (NodeRecord, bool, error) {
	m.mu.Lock()
	defer m.mu.Unlock()
	n, ok := m.nodes[k]
	return n, ok && n.Status == NodeOK, nil
}

func (m *memRecorder) RecordNode(_ context.Context, run RunID, n NodeRecord, a Action) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.failNext != nil {
		err := m.failNext
		m.failNext = nil
		return err
	}
	if _, dup := m.actions[run][n.Key]; dup {
		return fmt.Errorf("node %s recorded twice in run %s", n.Key, run)
	}
	m.actions[run][n.Key] = a
	if a != Reused {
		if old, ok := m.nodes[n.Key]; !ok || old.Status != NodeOK {
			m.nodes[n.Key] = n
		}
		m.writes++
	}
	return nil
}

func (m *memRecorder) RecordResults(_ context.Context, run RunID, rs []ResultRef) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	m.results[run] = rs
	return nil
}

func (m *memRecorder) FinishRun(_ context.Context, run RunID, st RunStatus, _ time.Time, _ string) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	m.status[run] = st
	return nil
}

// Toy stages: src emits y = x; scale emits y = k * input.y (ignoring its
// "note" parameter); add emits y = a.y + b.y; boom fails or panics.
type src struct{}

func (src) Spec() Spec {
	return Spec{Name: "src", Version: 1, Params: []ParamSpec{{Name: "x", Kind: KindFloat, Unit: UnitNone}}}
}
func (src) Run(_ context.Context, p Values, _ []Values) (Values, error) {
	return Values{"y": p["x"]}, nil
}

type scale struct{}

func (scale) Spec() Spec {
	return Spec{Name: "scale", Version: 1, Inputs: []string{"src"}, Params: []ParamSpec{
		{Name: "k", Kind: KindFloat, Unit: UnitNone}, {Name: "note", Kind: KindString, Optional: true}}}
}
func (scale) Run(_ context.Context, p Values, in []Values) (Values, error) {
	k, _ := p.Num("k")
	y, _ := in[0].Num("y")
	return Values{"y": Float(k*y, UnitNone)}, nil
}

type add struct{}

func (add) Spec() Spec { return Spec{Name: "add", Version: 1, Inputs: []string{"scale", "scale"}} }
func (add) Run(_ context.Context, _ Values, in []Values) (Values, error) {
	a, _ := in[0].Num("y")
	b, _ := in[1].Num("y")
	return Values{"y": Float(a+b, UnitNone)}, nil
}

type boom struct{}

func (boom) Spec() Spec {
	return Spec{Name: "boom", Version: 1, Inputs: []string{"src"}, Params: []ParamSpec{{Name: "how", Kind: KindString}}}
}
func (boom) Run(_ context.Context, p Values, _ []Values) (Values, error) {
	if how, _ := p.Text("how"); how == "panic" {
		panic("deliberate")
	}
	return nil, errors.New("inflation never ends: deliberate")
}

func f(x float64) Value { return Float(x, UnitNone) }

func mustAdd(t testing.TB, g *Graph, st Stage, p Values, inputs ...int) int {
	t.Helper()
	i, err := g.Add(st, p, fmt.Sprintf("%s%v", st.Spec().Name, inputs), inputs...)
	if err != nil {
		t.Fatal(err)
	}
	return i
}

// diamond: a -> b (k=kb), a -> c (k=3), b + c -> d; d is a result.
func diamond(t testing.TB, kb float64, note string) *Graph {
	g := &Graph{}
	a := mustAdd(t, g, src{}, Values{"x": f(2)})
	pb := Values{"k": f(kb)}
	if note != "" {
		pb["note"] = String(note)
	}
	b := mustAdd(t, g, scale{}, pb, a)
	c := mustAdd(t, g, scale{}, Values{"k": f(3)}, a)
	d := mustAdd(t, g, add{}, Values{}, b, c)
	g.MarkResult("d", d)
	return g
}

var runCounter int

func execute(t testing.TB, rec Recorder, g *Graph, jobs int) *Report {
	t.Helper()
	runCounter++
	id := RunID(fmt.Sprintf("run-%d", runCounter))
	rep, err := Execute(context.Background(), rec, RunInfo{ID: id}, g, Options{Jobs: jobs, Tool: "test/1", Now: time.Now})
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

func actionsOf(rep *Report) []Action {
	out := make([]Action, len(rep.Outcomes))
	for i, o := range rep.Outcomes {
		out[i] = o.Action
	}
	return out
}

func TestWarmRunComputesNothing(t *testing.T) {
	rec := newMem()
	cold := execute(t, rec, diamond(t, 5, ""), 2)
	if cold.Computed != 4 || cold.Reused != 0 {
		t.Fatalf("cold run: computed %d reused %d, want 4 and 0", cold.Computed, cold.Reused)
	}
	warm := execute(t, rec, diamond(t, 5, ""), 2)
	if warm.Computed != 0 || warm.Reused != 4 {
		t.Fatalf("warm run: computed %d reused %d, want 0 and 4", warm.Computed, warm.Reused)
	}
	if y, _ := warm.Outcomes[3].Outputs.Num("y"); y != 2*5+2*3 {
		t.Fatalf("reused result y = %g, want 16", y)
	}
}

func TestOneInputChangeRecomputesExactlyDownstream(t *testing.T) {
	rec := newMem()
	execute(t, rec, diamond(t, 5, ""), 2)
	rep := execute(t, rec, diamond(t, 7, ""), 2) // b's parameter changes
	want := []Action{Reused, Computed, Reused, Computed}
	for i, a := range actionsOf(rep) {
		if a != want[i] {
			t.Fatalf("actions %v, want %v", actionsOf(rep), want)
		}
	}
}

func TestUnchangedUpstreamOutputStopsInvalidation(t *testing.T) {
	rec := newMem()
	execute(t, rec, diamond(t, 5, ""), 2)
	// The note changes b's key but not its output: d is reused.
	rep := execute(t, rec, diamond(t, 5, "a remark"), 2)
	want := []Action{Reused, Computed, Reused, Reused}
	for i, a := range actionsOf(rep) {
		if a != want[i] {
			t.Fatalf("actions %v, want %v", actionsOf(rep), want)
		}
	}
}

func wideGraph(t testing.TB) *Graph {
	g := &Graph{}
	for i := 0; i < 60; i++ {
		a := mustAdd(t, g, src{}, Values{"x": f(float64(i) / 7)})
		b := mustAdd(t, g, scale{}, Values{"k": f(1.1)}, a)
		c := mustAdd(t, g, scale{}, Values{"k": f(0.3)}, a)
		d := mustAdd(t, g, add{}, Values{}, b, c)
		g.MarkResult(fmt.Sprint(i), d)
	}
	return g
}

func TestSerialEqualsParallel(t *testing.T) {
	serial := execute(t, newMem(), wideGraph(t), 1)
	parallel := execute(t, newMem(), wideGraph(t), 8)
	if serial.Computed != 240 || parallel.Computed != 240 {
		t.Fatalf("computed %d and %d, want 240", serial.Computed, parallel.Computed)
	}
	for i := range serial.Outcomes {
		s, p := serial.Outcomes[i], parallel.Outcomes[i]
		if s.Key != p.Key || s.OutputHash != p.OutputHash {
			t.Fatalf("node %d: serial %s/%s, parallel %s/%s", i, s.Key, s.OutputHash, p.Key, p.OutputHash)
		}
	}
}

func TestFailedNodeRecordedSkippedDownstreamAndRetried(t *testing.T) {
	for _, how := range []string{"error", "panic"} {
		rec := newMem()
		g := &Graph{}
		a := mustAdd(t, g, src{}, Values{"x": f(1)})
		b := mustAdd(t, g, boom{}, Values{"how": String(how)}, a)
		g.MarkResult("b", b)
		rep := execute(t, rec, g, 2)
		if rep.Status != RunFailed || rep.Failed != 1 {
			t.Fatalf("%s: status %s failed %d", how, rep.Status, rep.Failed)
		}
		o := rep.Outcomes[b]
		stored := rec.nodes[o.Key]
		if stored.Status != NodeFailed || stored.Outputs != nil || stored.OutputHash != "" || stored.Error == "" {
			t.Fatalf("%s: failed node stored as %+v", how, stored)
		}
		var se *StageError
		if !errors.As(o.Err, &se) || se.Stage != "boom" {
			t.Fatalf("%s: error %v is not a StageError of boom", how, o.Err)
		}
		again := execute(t, rec, g, 2)
		if again.Outcomes[b].Action != Failed || again.Outcomes[a].Action != Reused {
			t.Fatalf("%s: rerun actions %v: a failed node must be retried, never reused", how, actionsOf(again))
		}
	}
}

func TestSkipsBelowFailure(t *testing.T) {
	rec := newMem()
	g := &Graph{}
	a := mustAdd(t, g, src{}, Values{"x": f(1)})
	// A scale node cannot sit under boom (declared input is src), so build
	// a graph where src feeds boom and a healthy branch.
	bm := mustAdd(t, g, boom{}, Values{"how": String("error")}, a)
	ok := mustAdd(t, g, scale{}, Values{"k": f(2)}, a)
	g.MarkResult("boom", bm)
	g.MarkResult("ok", ok)
	rep := execute(t, rec, g, 3)
	if rep.Outcomes[ok].Action != Computed || rep.Failed != 1 {
		t.Fatalf("healthy branch must still run: %v", actionsOf(rep))
	}
}

func TestDuplicateKeysInOneRunRecordedOnce(t *testing.T) {
	rec := newMem()
	g := &Graph{}
	// Two sources with different x but scales that map both to y = 0:
	// the add nodes below them have identical keys.
	a1 := mustAdd(t, g, src{}, Values{"x": f(1)})
	a2 := mustAdd(t, g, src{}, Values{"x": f(2)})
	b1 := mustAdd(t, g, scale{}, Values{"k": f(0)}, a1)
	b2 := mustAdd(t, g, scale{}, Values{"k": f(0)}, a2)
	d1 := mustAdd(t, g, add{}, Values{}, b1, b1)
	d2 := mustAdd(t, g, add{}, Values{}, b2, b2)
	rep := execute(t, rec, g, 4)
	if rep.Outcomes[d1].Key != rep.Outcomes[d2].Key {
		t.Fatal("test setup: the two add nodes should share a key")
	}
	if rep.Computed+rep.Reused != 6 || rep.Failed != 0 {
		t.Fatalf("computed %d reused %d failed %d", rep.Computed, rep.Reused, rep.Failed)
	}
}

func TestStorageErrorStopsRun(t *testing.T) {
	rec := newMem()
	rec.failNext = errors.New("disk full")
	_, err := Execute(context.Background(), rec, RunInfo{ID: "r"}, diamond(t, 5, ""), Options{Jobs: 1, Tool: "t", Now: time.Now})
	if err == nil || rec.status["r"] != RunFailed {
		t.Fatalf("err %v status %s: a storage error must stop the run and mark it failed", err, rec.status["r"])
	}
}

func TestCancelledContext(t *testing.T) {
	rec := newMem()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Execute(ctx, rec, RunInfo{ID: "c"}, diamond(t, 5, ""), Options{Jobs: 1, Tool: "t", Now: time.Now})
	if err == nil || rec.status["c"] != RunFailed {
		t.Fatalf("err %v status %s", err, rec.status["c"])
	}
}

func TestGraphChecks(t *testing.T) {
	g := &Graph{}
	a := mustAdd(t, g, src{}, Values{"x": f(1)})
	if _, err := g.Add(src{}, Values{}, "no x"); err == nil {
		t.Error("missing parameter accepted")
	}
	if _, err := g.Add(src{}, Values{"x": f(1), "z": f(2)}, "extra"); err == nil {
		t.Error("undeclared parameter accepted")
	}
	if _, err := g.Add(src{}, Values{"x": Float(1, UnitGeV)}, "unit"); err == nil {
		t.Error("wrong unit accepted")
	}
	if _, err := g.Add(scale{}, Values{"k": f(1)}, "no input"); err == nil {
		t.Error("missing input accepted")
	}
	b := mustAdd(t, g, scale{}, Values{"k": f(1)}, a)
	if _, err := g.Add(scale{}, Values{"k": f(1)}, "wrong input stage", b); err == nil {
		t.Error("input of the wrong stage accepted")
	}
	if again := mustAdd(t, g, src{}, Values{"x": f(1)}); again != a {
		t.Error("identical node not merged")
	}
}

func BenchmarkExecuteWarm(b *testing.B) {
	rec := newMem()
	g := wideGraph(b)
	execute(b, rec, g, 2)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		execute(b, rec, g, 2)
	}
}

// batchMem is a memRecorder that also takes batches, counting them.
type batchMem struct {
	*memRecorder
	batches int
	failAt  int // fail the batch with this number (1-based); 0 never
}

func (b *batchMem) RecordNodes(ctx context.Context, run RunID, recs []Recorded) error {
	b.mu.Lock()
	b.batches++
	n := b.batches
	b.mu.Unlock()
	if n == b.failAt {
		return errors.New("disk full")
	}
	for _, r := range recs {
		if err := b.RecordNode(ctx, run, r.Node, r.Action); err != nil {
			return err
		}
	}
	return nil
}

func TestBatchedEqualsUnbatched(t *testing.T) {
	plain := execute(t, newMem(), wideGraph(t), 2)
	bm := &batchMem{memRecorder: newMem()}
	runCounter++
	rep, err := Execute(context.Background(), bm, RunInfo{ID: RunID(fmt.Sprint("b", runCounter))}, wideGraph(t),
		Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 50})
	if err != nil {
		t.Fatal(err)
	}
	if bm.batches < 240/50 || bm.writes != 240 {
		t.Fatalf("%d batches, %d nodes written; want >= 4 batches and 240 nodes", bm.batches, bm.writes)
	}
	for i := range plain.Outcomes {
		if plain.Outcomes[i].OutputHash != rep.Outcomes[i].OutputHash {
			t.Fatalf("node %d differs between batched and unbatched runs", i)
		}
	}
	// A warm batched run reuses everything.
	runCounter++
	warm, err := Execute(context.Background(), bm, RunInfo{ID: RunID(fmt.Sprint("b", runCounter))}, wideGraph(t),
		Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 50})
	if err != nil || warm.Computed != 0 || warm.Reused != 240 {
		t.Fatalf("warm batched run: %v, computed %d reused %d", err, warm.Computed, warm.Reused)
	}
}

func TestBatchStorageErrorStopsRun(t *testing.T) {
	bm := &batchMem{memRecorder: newMem(), failAt: 1}
	_, err := Execute(context.Background(), bm, RunInfo{ID: "bf"}, wideGraph(t), Options{Jobs: 2, Tool: "t", Now: time.Now, Batch: 10})
	if err == nil || bm.status["bf"] != RunFailed {
		t.Fatalf("err %v, status %s", err, bm.status["bf"])
	}
}

// lookupMem also looks up in batches, counting the calls.
type lookupMem struct {
	*batchMem
	calls int
}

func (l *lookupMem) LookupMany(ctx context.Context, keys []KeyID) (map[KeyID]NodeRecord, error) {
	l.mu.Lock()
	l.calls++
	l.mu.Unlock()
	out := map[KeyID]NodeRecord{}
	for _, k := range keys {
		if n, ok, _ := l.Lookup(ctx, k); ok {
			out[k] = n
		}
	}
	return out, nil
}

// With batched look-ups a warm run finds every node by waves of ready
// nodes (one call per level of the graph, not one per node) and gives the
// same outputs; a one-input change still recomputes exactly its
// downstream nodes.
func TestBatchedLookups(t *testing.T) {
	lm := &lookupMem{batchMem: &batchMem{memRecorder: newMem()}}
	opts := Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 50}
	cold, err := Execute(context.Background(), lm, RunInfo{ID: "l1"}, wideGraph(t), opts)
	if err != nil || cold.Computed != 240 {
		t.Fatalf("cold: %v computed %d", err, cold.Computed)
	}
	lm.calls = 0
	warm, err := Execute(context.Background(), lm, RunInfo{ID: "l2"}, wideGraph(t), opts)
	if err != nil || warm.Computed != 0 || warm.Reused != 240 {
		t.Fatalf("warm: %v computed %d reused %d", err, warm.Computed, warm.Reused)
	}
	// src, then the two scales, then add: three levels.
	if lm.calls > 4 {
		t.Errorf("%d batched look-ups for a three-level graph", lm.calls)
	}
	for i := range cold.Outcomes {
		if cold.Outcomes[i].OutputHash != warm.Outcomes[i].OutputHash {
			t.Fatalf("node %d differs warm", i)
		}
	}
	execute(t, lm, diamond(t, 5, ""), 2)
	rep, err := Execute(context.Background(), lm, RunInfo{ID: "l3"}, diamond(t, 7, ""), opts)
	if err != nil {
		t.Fatal(err)
	}
	want := []Action{Reused, Computed, Reused, Computed}
	for i, a := range actionsOf(rep) {
		if a != want[i] {
			t.Fatalf("actions %v, want %v", actionsOf(rep), want)
		}
	}
}

// A ReuseOnly run reuses every recorded node and stops at the first node
// it would have to compute, with ErrNotRecorded, computing nothing.
func TestReuseOnly(t *testing.T) {
	rec := newMem()
	execute(t, rec, diamond(t, 5, ""), 2)
	opts := Options{Jobs: 2, Tool: "test/1", Now: time.Now, ReuseOnly: true}
	warm, err := Execute(context.Background(), rec, RunInfo{ID: "reuse-only-1"}, diamond(t, 5, ""), opts)
	if err != nil || warm.Reused != 4 || warm.Computed != 0 {
		t.Fatalf("recorded graph: %v, reused %d, computed %d; want 4 and 0", err, warm.Reused, warm.Computed)
	}
	before := len(rec.nodes)
	_, err = Execute(context.Background(), rec, RunInfo{ID: "reuse-only-2"}, diamond(t, 7, ""), opts)
	if !errors.Is(err, ErrNotRecorded) {
		t.Fatalf("changed graph: %v, want ErrNotRecorded", err)
	}
	if len(rec.nodes) != before {
		t.Errorf("%d nodes recorded by a reuse-only run that failed", len(rec.nodes)-before)
	}
}

// slowBatch is a BatchRecorder that takes a while to write a batch and
// counts the results it has written.
type slowBatch struct {
	*memRecorder
	mu      sync.Mutex
	written int
	fail    bool
}

func (b *slowBatch) RecordNodes(ctx context.Context, run RunID, recs []Recorded) error {
	time.Sleep(20 * time.Millisecond)
	if b.fail {
		return errors.New("disk full")
	}
	for _, r := range recs {
		if err := b.memRecorder.RecordNode(ctx, run, r.Node, r.Action); err != nil {
			return err
		}
	}
	return nil
}

func (b *slowBatch) RecordResults(ctx context.Context, run RunID, rs []ResultRef) error {
	b.mu.Lock()
	b.written += len(rs)
	b.mu.Unlock()
	return b.memRecorder.RecordResults(ctx, run, rs)
}

// Session.Committed never runs ahead of what the recorder wrote: after
// every chunk, the results below the mark are written; after Finish all
// are, unless a write failed, when none past the failure are.
func TestCommittedNeverAheadOfTheRecorder(t *testing.T) {
	for _, fail := range []bool{false, true} {
		rec := &slowBatch{memRecorder: newMem(), fail: fail}
		opts := Options{Jobs: 2, Tool: "test/1", Now: time.Now, Batch: 3, FlushEvery: 5 * time.Millisecond}
		s, err := Begin(context.Background(), rec, RunInfo{ID: RunID(fmt.Sprintf("committed-%v", fail))}, opts)
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k < 6; k++ {
			g := &Graph{}
			g.MarkResult("r", mustAdd(t, g, src{}, Values{"x": f(float64(100 + k))}))
			if _, err := s.Execute(context.Background(), g); err != nil && !fail {
				t.Fatal(err)
			}
			rec.mu.Lock()
			w := rec.written
			rec.mu.Unlock()
			if c := s.Committed(); c > w {
				t.Fatalf("fail=%v chunk %d: %d results marked committed, %d written", fail, k, c, w)
			}
		}
		s.Finish(context.Background(), nil)
		if c := s.Committed(); !fail && c != 6 || fail && c != 0 {
			t.Errorf("fail=%v: %d committed after Finish, want %d", fail, c, map[bool]int{false: 6, true: 0}[fail])
		}
	}
}
