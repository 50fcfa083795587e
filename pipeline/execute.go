package pipeline

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strconv"
	"sync"
	"sync/atomic"
	"time"
)

// Options control Execute.
type Options struct {
	// Jobs bounds how many nodes run at once; values below 1 mean 1.
	Jobs int
	// Tool is the tool's identity, salted into every key (for example
	// "inflatrace/0.1.0"). Required.
	Tool string
	// Now is the clock (injected so that only the CLI reads real time).
	// Durations are measured with it. Required.
	Now func() time.Time
	// NoReuse bypasses the cache: every node is computed even when its key
	// is recorded (the ledger then checks the outputs agree).
	NoReuse bool
	// ReuseOnly forbids computing: every node must be found recorded, and
	// a node that is not stops the run with an error wrapping
	// ErrNotRecorded (assembling a run from recorded shards, say).
	ReuseOnly bool
	// OnNode, if set, is called after each node settles (from the
	// scheduling goroutine, never concurrently).
	OnNode func(NodeOutcome)
	// Batch, when above one and the recorder is a BatchRecorder, writes
	// nodes in transactions of up to Batch nodes from a writer goroutine
	// that lives as long as the session, so that large scans are not bound
	// by the cost of a commit. The writer also writes whatever is pending
	// once FlushEvery (default 1 s) has passed since its last write, so an
	// interrupted run loses about that much work; the scheduler waits
	// while Batch records are pending and another batch is being written,
	// so at most about two batches are held in memory. A chunk's results
	// are written after its nodes, with the first batch that follows them.
	Batch      int
	FlushEvery time.Duration
}

// ErrNotRecorded is the error of a ReuseOnly run that meets a node its
// recorder does not hold.
var ErrNotRecorded = errors.New("not recorded, and this run only reuses recorded nodes")

// NodeOutcome is what happened to one node in a run.
type NodeOutcome struct {
	Node       *Node
	Key        KeyID  // empty when skipped
	Action     Action // computed, reused or failed; empty when skipped
	Outputs    Values
	OutputHash OutputID
	Err        error // the stage's error for a failed node
	Skipped    bool  // not run because an upstream node failed
	Duration   time.Duration
}

// Report summarises a run.
type Report struct {
	Run                               RunID
	Status                            RunStatus
	Outcomes                          []NodeOutcome // indexed like Graph.Nodes
	Computed, Reused, Failed, Skipped int
}

// StageError is a node's failure, as recorded: the stage, its label and
// the error the stage returned.
type StageError struct {
	Stage, Label string
	Err          error
}

func (e *StageError) Error() string {
	return fmt.Sprintf("%s [%s]: %v", e.Stage, e.Label, e.Err)
}

func (e *StageError) Unwrap() error { return e.Err }

// Execute runs the graph as one run: it records the run, evaluates nodes in
// topological order with at most opts.Jobs at once, reuses every node whose
// key rec already holds, records each node (in its own transaction, or
// in batches when opts.Batch asks for them), marks the graph's results and
// closes the run.
//
// A stage error fails only its node (recorded as failed, never as a
// result) and skips the nodes downstream of it; the run then ends with
// status failed and Execute returns the report with a nil error. A storage
// error or a cancelled context stops the run and is returned.
func Execute(ctx context.Context, rec Recorder, info RunInfo, g *Graph, opts Options) (*Report, error) {
	sess, err := Begin(ctx, rec, info, opts)
	if err != nil {
		return nil, err
	}
	rep, runErr := sess.Execute(ctx, g)
	status, err := sess.Finish(ctx, runErr)
	if rep != nil {
		rep.Status = status
	}
	if runErr == nil {
		runErr = err
	}
	return rep, runErr
}

// Session is one run executed as a sequence of graphs: the chunks of a
// large scan, each evaluated, recorded and let go before the next is built,
// so that memory does not grow with the scan. Results are numbered across
// the chunks in order. With batched writes the session's writer outlives
// each chunk, so a transaction may hold nodes of several chunks; Finish
// writes what is pending and must always be called.
type Session struct {
	rec     Recorder
	info    RunInfo
	opts    Options
	ordinal int
	// Totals accumulates the node counts of every chunk.
	Totals Report

	wr *writer // nil unless writes are batched (and once finished)
	// batched and finalUpto keep, after Finish, what the writer committed.
	batched   bool
	finalUpto int
	// flights holds the run's nodes by key, so that a key met twice is
	// evaluated and recorded once: every node of the current chunk, and
	// those of earlier chunks whose records may not be written yet (a
	// look-up in the ledger would miss them).
	flights map[KeyID]*flight
	// inWork is set while ExecuteWork evaluates a graph: nodes are
	// recorded without links of their own (the work links them), so a
	// reused node needs no record at all. nodeOrdinal counts the nodes of
	// the run's works so far.
	inWork      bool
	nodeOrdinal int
	// held caches, per stage name and version, whether the recorder held
	// a node of it when the run first met the stage (StageHolder).
	held map[string]bool
}

// Begin records a run as running and returns its session.
func Begin(ctx context.Context, rec Recorder, info RunInfo, opts Options) (*Session, error) {
	if opts.Tool == "" || opts.Now == nil {
		panic("pipeline.Begin: Options.Tool and Options.Now are required")
	}
	if err := rec.BeginRun(ctx, info); err != nil {
		return nil, fmt.Errorf("begin run %s: %w", info.ID, err)
	}
	s := &Session{rec: rec, info: info, opts: opts, Totals: Report{Run: info.ID}}
	if br, ok := rec.(BatchRecorder); ok && opts.Batch > 1 {
		// A chunk's nodes and about two batches of earlier ones.
		s.flights = make(map[KeyID]*flight, min(2*opts.Batch, 1<<16))
		every := opts.FlushEvery
		if every <= 0 {
			every = time.Second
		}
		s.wr = newWriter(context.WithoutCancel(ctx), br, info.ID, opts.Batch, every)
	} else {
		s.flights = map[KeyID]*flight{}
	}
	return s, nil
}

// Execute evaluates one graph of the run and records its results (with
// batched writes: hands them to the writer, which writes them after the
// graph's nodes). A node reused in several chunks is linked to the run
// once.
func (s *Session) Execute(ctx context.Context, g *Graph) (*Report, error) {
	if s.wr != nil {
		if err := s.wr.failed(); err != nil {
			return nil, err
		}
	}
	rep, err := s.scheduleCounted(ctx, g)
	if err != nil {
		return rep, err
	}
	var refs []ResultRef
	for i, r := range g.Results {
		// A failed node is never a result.
		if o := rep.Outcomes[r.Node]; o.Action == Computed || o.Action == Reused {
			refs = append(refs, ResultRef{Ordinal: s.ordinal + i, Label: r.Label, Key: o.Key})
		}
	}
	s.ordinal += len(g.Results)
	if s.wr != nil {
		s.wr.addResults(refs, s.ordinal)
		return rep, nil
	}
	if err := s.rec.RecordResults(ctx, s.info.ID, refs); err != nil {
		return rep, fmt.Errorf("record results of run %s: %w", s.info.ID, err)
	}
	return rep, nil
}

// scheduleCounted evaluates g and adds its counts to the session's.
func (s *Session) scheduleCounted(ctx context.Context, g *Graph) (*Report, error) {
	rep, err := s.schedule(ctx, g)
	if rep != nil {
		s.Totals.Computed += rep.Computed
		s.Totals.Reused += rep.Reused
		s.Totals.Failed += rep.Failed
		s.Totals.Skipped += rep.Skipped
	}
	return rep, err
}

// Committed is the number of the run's results, counted in order over its
// chunks (failed ones included), whose nodes and result rows are committed
// to the recorder: a front end prints a result only once it is below this
// mark, so that nothing printed can be missing from the ledger after a
// crash. Without batched writes every executed chunk is committed.
func (s *Session) Committed() int {
	switch {
	case s.wr != nil:
		return int(s.wr.committedUpto.Load())
	case s.batched:
		return s.finalUpto // after Finish: what the writer committed
	}
	return s.ordinal
}

// Finish writes what is pending and closes the run: failed when runErr is
// set, a pending write fails, or any node failed or was skipped; succeeded
// otherwise. It closes the run even when ctx was cancelled. The error
// returned is a failed pending write's or the closing's.
func (s *Session) Finish(ctx context.Context, runErr error) (RunStatus, error) {
	var werr error
	if s.wr != nil {
		werr = s.wr.close()
		s.batched, s.finalUpto = true, int(s.wr.committedUpto.Load())
		s.wr = nil
	}
	s.flights = nil
	if runErr == nil {
		runErr = werr
	}
	status, msg := RunSucceeded, ""
	switch {
	case runErr != nil:
		status, msg = RunFailed, runErr.Error()
	case s.Totals.Failed > 0 || s.Totals.Skipped > 0:
		status, msg = RunFailed, fmt.Sprintf("%d node(s) failed, %d skipped", s.Totals.Failed, s.Totals.Skipped)
	}
	s.Totals.Status = status
	if err := s.rec.FinishRun(context.WithoutCancel(ctx), s.info.ID, status, s.opts.Now(), msg); err != nil {
		return status, errors.Join(werr, fmt.Errorf("finish run %s: %w", s.info.ID, err))
	}
	return status, werr
}

// flight is the evaluation of one key in a run, shared by every node with
// that key.
type flight struct {
	out     NodeOutcome // once settled (Node is the first node's)
	settled bool
	waiters []int  // nodes of the current graph waiting for it to settle
	seq     uint64 // the writer's number for its record; 0 when written directly
}

// writer writes batches of records in order from its own goroutine: when
// max records are pending, once every has passed since its last write, and
// when closed.
type writer struct {
	rec   BatchRecorder
	run   RunID
	ctx   context.Context
	max   int
	every time.Duration

	mu      sync.Mutex
	room    sync.Cond // broadcast when the pending batch is taken or the writer fails
	buf     []Recorded
	spare   []Recorded // the last batch written, emptied, for reuse
	results []ResultRef
	works   []WorkLink
	seq     uint64 // number of records added
	closing bool
	err     error

	committed atomic.Uint64 // records 1..committed are written
	// upto is the results mark of the last chunk queued; committedUpto
	// that of the last chunk whose records and results are written.
	upto          int
	committedUpto atomic.Int64
	kick          chan struct{}
	done          chan struct{}
}

func newWriter(ctx context.Context, rec BatchRecorder, run RunID, max int, every time.Duration) *writer {
	w := &writer{rec: rec, run: run, ctx: ctx, max: max, every: every, kick: make(chan struct{}, 1), done: make(chan struct{})}
	w.room.L = &w.mu
	go w.loop()
	return w
}

// add queues one record and returns its number; it waits while a full
// batch is pending. After a failure records are dropped.
func (w *writer) add(r Recorded) uint64 {
	w.mu.Lock()
	for len(w.buf) >= w.max && w.err == nil {
		w.room.Wait()
	}
	if w.err != nil {
		w.mu.Unlock()
		return 0
	}
	if w.buf == nil {
		// Sized once (the array is then reused batch after batch).
		w.buf = make([]Recorded, 0, min(w.max, 1<<15))
	}
	w.buf = append(w.buf, r)
	w.seq++
	seq, full := w.seq, len(w.buf) >= w.max
	w.mu.Unlock()
	if full {
		w.wake()
	}
	return seq
}

// addWork queues a work of the run, written after every record added
// before it; upto is the session's results mark after the work.
func (w *writer) addWork(link WorkLink, upto int) {
	w.mu.Lock()
	w.works = append(w.works, link)
	w.upto = upto
	w.mu.Unlock()
}

// addResults queues a chunk's results, written after every record added
// before them; upto is the session's results mark after the chunk.
func (w *writer) addResults(refs []ResultRef, upto int) {
	w.mu.Lock()
	w.results = append(w.results, refs...)
	w.upto = upto
	w.mu.Unlock()
}

func (w *writer) wake() {
	select {
	case w.kick <- struct{}{}:
	default:
	}
}

func (w *writer) loop() {
	defer close(w.done)
	timer := time.NewTimer(w.every)
	defer timer.Stop()
	for {
		select {
		case <-w.kick:
		case <-timer.C:
		}
		w.mu.Lock()
		batch, results, works, last, closing, upto := w.buf, w.results, w.works, w.seq, w.closing, w.upto
		w.buf, w.spare, w.results, w.works = w.spare, nil, nil, nil
		failed := w.err != nil
		w.room.Broadcast()
		w.mu.Unlock()
		if !failed && (len(batch) > 0 || len(results) > 0 || len(works) > 0) {
			err := w.write(batch, results, works)
			w.mu.Lock()
			if err != nil {
				w.err = err
				w.room.Broadcast()
			}
			w.mu.Unlock()
			if err == nil {
				w.committed.Store(last)
			}
		}
		if w.failed() == nil {
			w.committedUpto.Store(int64(upto))
		}
		// Keep the batch's array for the next one, without its records.
		clear(batch)
		w.mu.Lock()
		if w.spare == nil && cap(batch) > 0 {
			w.spare = batch[:0]
		}
		w.mu.Unlock()
		if closing {
			return
		}
		timer.Reset(w.every)
	}
}

func (w *writer) write(batch []Recorded, results []ResultRef, works []WorkLink) error {
	if len(works) > 0 {
		// The works' nodes are in this batch or in earlier ones: one
		// transaction writes the batch and the works.
		if err := w.rec.(WorkRecorder).RecordWorks(w.ctx, w.run, batch, works); err != nil {
			return fmt.Errorf("record a batch of %d nodes and %d works: %w", len(batch), len(works), err)
		}
		batch = nil
	}
	if len(batch) > 0 {
		if err := w.rec.RecordNodes(w.ctx, w.run, batch); err != nil {
			return fmt.Errorf("record a batch of %d nodes: %w", len(batch), err)
		}
	}
	if len(results) > 0 {
		if err := w.rec.RecordResults(w.ctx, w.run, results); err != nil {
			return fmt.Errorf("record results of run %s: %w", w.run, err)
		}
	}
	return nil
}

func (w *writer) failed() error {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.err
}

// close writes what is pending and waits.
func (w *writer) close() error {
	w.mu.Lock()
	w.closing = true
	w.mu.Unlock()
	w.wake()
	<-w.done
	return w.failed()
}

// probeBatch is how many ready nodes a cold run gathers before looking
// them up in one query; fewer are looked up only when a worker would
// otherwise sit idle.
const probeBatch = 512

// prepared is a node's description and key, computed in the scheduler once
// its inputs have settled.
type prepared struct {
	name    string // the stage's
	version int
	desc    string
	key     KeyID
	refs    []InputRef
	inputs  []Values
	missed  bool // a batched look-up already found no such key
	fresh   bool // of a stage version the recorder held none of: not looked up
}

// done is a worker's answer for one node.
type done struct {
	i      int
	out    NodeOutcome
	rec    Recorded
	hasRec bool // rec is to be written in a batch
	err    error
}

// chunk is the evaluation of one graph in a session.
type chunk struct {
	s    *Session
	ctx  context.Context
	g    *Graph
	rep  *Report
	prep []prepared
	// Every node's inputs, one array for the graph, cut per node.
	refs   []InputRef
	inputs []Values
	inOff  []int32 // node i's inputs start at inOff[i]
}

func (s *Session) schedule(ctx context.Context, g *Graph) (*Report, error) {
	n := len(g.Nodes)
	opts := s.opts
	rep := &Report{Run: s.info.ID, Outcomes: make([]NodeOutcome, n)}
	jobs := max(opts.Jobs, 1)
	s.prune()
	inOff := make([]int32, n)
	totalIn := 0
	for i, nd := range g.Nodes {
		inOff[i] = int32(totalIn)
		totalIn += len(nd.Inputs)
	}
	c := &chunk{s: s, ctx: ctx, g: g, rep: rep, prep: make([]prepared, n),
		refs: make([]InputRef, totalIn), inputs: make([]Values, totalIn), inOff: inOff}
	bl, probing := s.rec.(BatchLookup)
	probing = probing && opts.Batch > 1 && !opts.NoReuse
	owned := make([]flight, n) // the flights of keys first met in this graph

	// Dependents in one array: deps[depStart[i]:depStart[i+1]] are node i's.
	pending := make([]int32, n)
	depStart := make([]int32, n+1)
	for _, nd := range g.Nodes {
		pending[nd.Index] = int32(len(nd.Inputs))
		for _, in := range nd.Inputs {
			depStart[in+1]++
		}
	}
	for i := 0; i < n; i++ {
		depStart[i+1] += depStart[i]
	}
	deps := make([]int32, totalIn)
	fill := append([]int32(nil), depStart[:n]...)
	for _, nd := range g.Nodes {
		for _, in := range nd.Inputs {
			deps[fill[in]] = int32(nd.Index)
			fill[in]++
		}
	}

	work := make(chan int, jobs)
	results := make(chan done, jobs)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range work {
				results <- c.compute(i)
			}
		}()
	}

	settled, inflight := 0, 0
	var firstErr error
	var unprobed, spareProbe, runnable []int
	head := 0 // runnable[head:] are still to dispatch
	settle := func(o NodeOutcome) {
		rep.Outcomes[o.Node.Index] = o
		settled++
		switch {
		case o.Skipped:
			rep.Skipped++
		case o.Action == Computed:
			rep.Computed++
		case o.Action == Reused:
			rep.Reused++
		case o.Action == Failed:
			rep.Failed++
		}
		if opts.OnNode != nil {
			opts.OnNode(o)
		}
	}
	var release func(i int)
	// admit handles a node whose inputs all succeeded: its key is computed
	// and, unless another node of the run has the key, it is queued for a
	// look-up or a worker.
	admit := func(i int) {
		p, err := c.prepare(i)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			return
		}
		if f, ok := s.flights[p.key]; ok {
			if f.settled {
				settle(sharedOutcome(f.out, g.Nodes[i]))
				release(i)
			} else {
				f.waiters = append(f.waiters, i)
			}
			return
		}
		s.flights[p.key] = &owned[i]
		if probing {
			fresh, err := s.fresh(ctx, p.name, p.version)
			if err != nil {
				if firstErr == nil {
					firstErr = err
				}
				return
			}
			if fresh {
				p.missed, p.fresh = true, true
				runnable = append(runnable, i)
				return
			}
			unprobed = append(unprobed, i)
		} else {
			runnable = append(runnable, i)
		}
	}
	// own settles the node owning a key, records it and settles the nodes
	// waiting for the key.
	own := func(i int, o NodeOutcome, rec Recorded, hasRec bool) {
		f := &owned[i]
		f.out, f.settled = o, true
		if hasRec {
			f.seq = s.wr.add(rec)
		}
		settle(o)
		release(i)
		waiters := f.waiters
		f.waiters = nil
		for _, w := range waiters {
			settle(sharedOutcome(o, g.Nodes[w]))
			release(w)
		}
	}
	// release admits node i's dependents that became ready; those with a
	// failed or skipped input are skipped at once, transitively.
	release = func(i int) {
		for _, d32 := range deps[depStart[i]:depStart[i+1]] {
			d := int(d32)
			pending[d]--
			if pending[d] > 0 {
				continue
			}
			ok := true
			for _, in := range g.Nodes[d].Inputs {
				if o := rep.Outcomes[in]; o.Skipped || o.Action == Failed {
					ok = false
				}
			}
			if ok {
				admit(d)
				continue
			}
			settle(NodeOutcome{Node: g.Nodes[d], Skipped: true})
			release(d)
		}
	}
	var keys []KeyID
	// probe looks up every queued node in one batch: the ones found settle
	// as reused at once (a warm run needs no worker), the others go to the
	// workers, which then skip their own look-up.
	probe := func() error {
		batch := unprobed
		unprobed, spareProbe = spareProbe[:0], nil
		keys = keys[:0]
		for _, i := range batch {
			keys = append(keys, c.prep[i].key)
		}
		start := opts.Now()
		found, err := bl.LookupMany(ctx, keys)
		if err != nil {
			return fmt.Errorf("look up %d nodes: %w", len(keys), err)
		}
		d := opts.Now().Sub(start) / time.Duration(len(keys))
		for _, i := range batch {
			p := &c.prep[i]
			stored, ok := found[p.key]
			if !ok {
				p.missed = true
				runnable = append(runnable, i)
				continue
			}
			stored.Duration = d
			o := NodeOutcome{Node: g.Nodes[i], Key: p.key, Action: Reused, Outputs: stored.Outputs, OutputHash: stored.OutputHash, Duration: d}
			hasRec := s.wr != nil && !s.inWork // a work links its reused nodes itself
			if s.wr == nil {
				if err := s.rec.RecordNode(ctx, s.info.ID, stored, Reused); err != nil {
					return fmt.Errorf("record reuse of %s (%s): %w", p.key, g.Nodes[i].Label, err)
				}
			}
			own(i, o, Recorded{Node: stored, Action: Reused}, hasRec)
		}
		spareProbe = batch[:0]
		return nil
	}
	for _, nd := range g.Nodes {
		if len(nd.Inputs) == 0 {
			admit(nd.Index)
		}
	}
	dispatch := func() {
		for firstErr == nil && head < len(runnable) && inflight < jobs {
			work <- runnable[head]
			head++
			inflight++
		}
		if head == len(runnable) {
			runnable, head = runnable[:0], 0
		}
	}
	for settled < n {
		if firstErr == nil {
			if err := ctx.Err(); err != nil {
				firstErr = fmt.Errorf("run interrupted: %w", err)
			}
		}
		dispatch()
		// Look up when enough nodes are queued, or when a worker (or the
		// scheduler, with nothing in flight) would otherwise wait.
		for firstErr == nil && probing && len(unprobed) > 0 &&
			(len(unprobed) >= probeBatch || len(runnable)-head < jobs-inflight) {
			if err := probe(); err != nil {
				firstErr = err
			}
			dispatch()
		}
		if s.wr != nil && firstErr == nil {
			firstErr = s.wr.failed()
		}
		if inflight == 0 {
			break // finished, stopped by an error, or nothing left that can run
		}
		d := <-results
		inflight--
		if d.err != nil {
			if firstErr == nil {
				firstErr = d.err
			}
			continue
		}
		own(d.i, d.out, d.rec, d.hasRec)
	}
	close(work)
	wg.Wait()
	if firstErr == nil && s.wr != nil {
		firstErr = s.wr.failed()
	}
	if firstErr == nil && settled < n {
		firstErr = errors.New("graph has nodes that can never run (a cycle or a dangling input)")
	}
	return rep, firstErr
}

// fresh says whether the recorder held no node of the stage version when
// the run first met it (StageHolder); a recorder that cannot say holds
// everything.
func (s *Session) fresh(ctx context.Context, stage string, version int) (bool, error) {
	sh, ok := s.rec.(StageHolder)
	if !ok || s.opts.ReuseOnly {
		return false, nil
	}
	k := stage + "/" + strconv.Itoa(version)
	held, ok := s.held[k]
	if !ok {
		var err error
		if held, err = sh.HoldsStage(ctx, s.opts.Tool, stage, version); err != nil {
			return false, fmt.Errorf("look up stage %s: %w", k, err)
		}
		if s.held == nil {
			s.held = map[string]bool{}
		}
		s.held[k] = held
	}
	return !held, nil
}

// prune forgets the flights of earlier chunks that the ledger now holds
// (all of them when nodes are written directly), and any left unsettled
// by an error.
func (s *Session) prune() {
	committed := uint64(math.MaxUint64)
	if s.wr != nil {
		committed = s.wr.committed.Load()
	}
	for k, f := range s.flights {
		if !f.settled || f.seq <= committed {
			delete(s.flights, k)
		}
	}
}

// sharedOutcome is the outcome of node nd whose key another node of the
// run evaluated: reused (or failed) in no time, recorded once.
func sharedOutcome(o NodeOutcome, nd *Node) NodeOutcome {
	o.Node = nd
	if o.Action == Computed {
		o.Action = Reused
	}
	o.Duration = 0
	return o
}

// prepare computes node i's description and key from its settled inputs.
func (c *chunk) prepare(i int) (*prepared, error) {
	nd := c.g.Nodes[i]
	spec := nd.Stage.Spec()
	p := &c.prep[i]
	p.name, p.version = spec.Name, spec.Version
	// The node's slots in the graph's input arrays.
	off := int(c.inOff[i])
	p.refs = c.refs[off : off+len(nd.Inputs) : off+len(nd.Inputs)]
	p.inputs = c.inputs[off : off+len(nd.Inputs) : off+len(nd.Inputs)]
	for k, in := range nd.Inputs {
		o := c.rep.Outcomes[in] // settled before this node was released
		p.refs[k] = InputRef{Stage: c.prep[in].name, Key: o.Key, Output: o.OutputHash}
		p.inputs[k] = o.Outputs
	}
	desc, key, err := describe(c.s.opts.Tool, spec.Name, spec.Version, nd.Params, p.refs, true)
	if err != nil {
		return nil, fmt.Errorf("node %d (%s): %w", i, nd.Label, err)
	}
	p.desc, p.key = desc, key
	return p, nil
}

// compute evaluates node i in a worker: a look-up first (unless one was
// made already or reuse is off), then the stage. It returns an error only
// for storage failures.
func (c *chunk) compute(i int) done {
	s := c.s
	nd := c.g.Nodes[i]
	p := &c.prep[i]
	out := NodeOutcome{Node: nd, Key: p.key}
	batched := s.wr != nil
	if !s.opts.NoReuse && !p.missed {
		lookStart := s.opts.Now()
		stored, found, err := s.rec.Lookup(c.ctx, p.key)
		if err != nil {
			return done{i: i, err: fmt.Errorf("look up %s (%s): %w", p.key, nd.Label, err)}
		}
		if found {
			out.Action, out.Outputs, out.OutputHash = Reused, stored.Outputs, stored.OutputHash
			// The run's own time for a reused node is the look-up's.
			stored.Duration = s.opts.Now().Sub(lookStart)
			out.Duration = stored.Duration
			if batched {
				return done{i: i, out: out, rec: Recorded{Node: stored, Action: Reused}, hasRec: !s.inWork}
			}
			if err := s.rec.RecordNode(c.ctx, s.info.ID, stored, Reused); err != nil {
				return done{i: i, err: fmt.Errorf("record reuse of %s (%s): %w", p.key, nd.Label, err)}
			}
			return done{i: i, out: out}
		}
	}
	if s.opts.ReuseOnly {
		return done{i: i, err: fmt.Errorf("%s (%s): %w", p.key, nd.Label, ErrNotRecorded)}
	}
	nr := NodeRecord{Key: p.key, Stage: p.name, Version: p.version, Params: nd.Params, Inputs: p.refs, Description: p.desc}
	start := s.opts.Now()
	outputs, runErr := runStage(c.ctx, nd.Stage, nd.Params, p.inputs)
	var hash OutputID
	var enc []byte
	if runErr == nil {
		hash, enc, runErr = OutputHash(outputs)
		if runErr != nil {
			runErr = fmt.Errorf("stage produced unrecordable outputs: %w", runErr)
		}
	}
	out.Duration = s.opts.Now().Sub(start)
	nr.Duration = out.Duration
	if runErr != nil {
		out.Action, out.Err = Failed, &StageError{Stage: p.name, Label: nd.Label, Err: runErr}
		nr.Status, nr.Error = NodeFailed, runErr.Error()
	} else {
		out.Action, out.Outputs, out.OutputHash = Computed, outputs, hash
		nr.Status, nr.Outputs, nr.OutputHash = NodeOK, outputs, hash
	}
	if batched {
		return done{i: i, out: out, rec: Recorded{Node: nr, Action: out.Action, OutputsText: enc, InWork: s.inWork, New: p.fresh}, hasRec: true}
	}
	if err := s.rec.RecordNode(c.ctx, s.info.ID, nr, out.Action); err != nil {
		return done{i: i, err: fmt.Errorf("record %s (%s): %w", p.key, nd.Label, err)}
	}
	return done{i: i, out: out}
}

// runStage calls the stage, turning a panic into an error so that one bad
// node cannot take down the run (panics are programmer errors, reported
// with the stage's name).
func runStage(ctx context.Context, st Stage, params Values, inputs []Values) (out Values, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("stage %s panicked: %v", st.Spec().Name, r)
		}
	}()
	return st.Run(ctx, params, inputs)
}
