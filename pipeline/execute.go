package pipeline

import (
	"context"
	"errors"
	"fmt"
	"sync"
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
	// OnNode, if set, is called after each node settles (from the
	// scheduling goroutine, never concurrently).
	OnNode func(NodeOutcome)
	// Batch, when above one and the recorder is a BatchRecorder, writes
	// nodes in transactions of up to Batch nodes from a writer goroutine
	// (also flushing whatever is pending every FlushEvery, default 1 s), so
	// that large scans are not bound by the cost of a commit.
	Batch      int
	FlushEvery time.Duration
}

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

	record *Recorded // to be written in a batch
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
// key rec already holds, records each node in its own transaction, marks
// the graph's results and closes the run.
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
// the chunks in order.
type Session struct {
	rec     Recorder
	info    RunInfo
	opts    Options
	ordinal int
	// Totals accumulates the node counts of every chunk.
	Totals Report
}

// Begin records a run as running and returns its session.
func Begin(ctx context.Context, rec Recorder, info RunInfo, opts Options) (*Session, error) {
	if opts.Tool == "" || opts.Now == nil {
		panic("pipeline.Begin: Options.Tool and Options.Now are required")
	}
	if err := rec.BeginRun(ctx, info); err != nil {
		return nil, fmt.Errorf("begin run %s: %w", info.ID, err)
	}
	return &Session{rec: rec, info: info, opts: opts, Totals: Report{Run: info.ID}}, nil
}

// Execute evaluates one graph of the run and records its results. A node
// reused in several chunks is linked to the run once.
func (s *Session) Execute(ctx context.Context, g *Graph) (*Report, error) {
	rep, err := schedule(ctx, s.rec, s.info.ID, g, s.opts)
	if rep != nil {
		s.Totals.Computed += rep.Computed
		s.Totals.Reused += rep.Reused
		s.Totals.Failed += rep.Failed
		s.Totals.Skipped += rep.Skipped
	}
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
	if err := s.rec.RecordResults(ctx, s.info.ID, refs); err != nil {
		return rep, fmt.Errorf("record results of run %s: %w", s.info.ID, err)
	}
	return rep, nil
}

// Finish closes the run: failed when runErr is set or any node failed or
// was skipped, succeeded otherwise. It closes the run even when ctx was
// cancelled.
func (s *Session) Finish(ctx context.Context, runErr error) (RunStatus, error) {
	status, msg := RunSucceeded, ""
	switch {
	case runErr != nil:
		status, msg = RunFailed, runErr.Error()
	case s.Totals.Failed > 0 || s.Totals.Skipped > 0:
		status, msg = RunFailed, fmt.Sprintf("%d node(s) failed, %d skipped", s.Totals.Failed, s.Totals.Skipped)
	}
	s.Totals.Status = status
	if err := s.rec.FinishRun(context.WithoutCancel(ctx), s.info.ID, status, s.opts.Now(), msg); err != nil {
		return status, fmt.Errorf("finish run %s: %w", s.info.ID, err)
	}
	return status, nil
}

type flight struct {
	done chan struct{}
	out  NodeOutcome
}

type scheduler struct {
	ctx  context.Context
	rec  Recorder
	run  RunID
	opts Options

	mu      sync.Mutex
	flights map[KeyID]*flight // nodes of this run by key, for in-run duplicates
	batched bool              // records go to the writer, not straight to rec
	prep    []*prepared       // nodes prepared by a batched look-up, by index
}

// writer writes batches of records in order from its own goroutine.
type writer struct {
	rec  BatchRecorder
	run  RunID
	in   chan []Recorded
	done chan struct{}
	mu   sync.Mutex
	err  error
	ctx  context.Context
}

func newWriter(ctx context.Context, rec BatchRecorder, run RunID) *writer {
	w := &writer{rec: rec, run: run, in: make(chan []Recorded, 4), done: make(chan struct{}), ctx: ctx}
	go func() {
		defer close(w.done)
		for b := range w.in {
			if w.failed() != nil {
				continue
			}
			if err := rec.RecordNodes(ctx, run, b); err != nil {
				w.mu.Lock()
				w.err = fmt.Errorf("record a batch of %d nodes: %w", len(b), err)
				w.mu.Unlock()
			}
		}
	}()
	return w
}

func (w *writer) failed() error {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.err
}

// close writes what is left and waits.
func (w *writer) close() error {
	close(w.in)
	<-w.done
	return w.failed()
}

func schedule(ctx context.Context, rec Recorder, run RunID, g *Graph, opts Options) (*Report, error) {
	n := len(g.Nodes)
	rep := &Report{Run: run, Outcomes: make([]NodeOutcome, n)}
	jobs := opts.Jobs
	if jobs < 1 {
		jobs = 1
	}
	s := &scheduler{ctx: ctx, rec: rec, run: run, opts: opts, flights: map[KeyID]*flight{}, prep: make([]*prepared, n)}
	bl, probing := rec.(BatchLookup)
	probing = probing && opts.Batch > 1 && !opts.NoReuse
	var wr *writer
	var buffered []Recorded
	lastFlush := opts.Now()
	flushEvery := opts.FlushEvery
	if flushEvery <= 0 {
		flushEvery = time.Second
	}
	if br, ok := rec.(BatchRecorder); ok && opts.Batch > 1 {
		s.batched = true
		wr = newWriter(context.WithoutCancel(ctx), br, run)
	}
	flush := func(force bool) {
		if wr == nil || len(buffered) == 0 {
			return
		}
		if force || len(buffered) >= opts.Batch || opts.Now().Sub(lastFlush) >= flushEvery {
			wr.in <- buffered
			buffered = nil
			lastFlush = opts.Now()
		}
	}
	pending := make([]int, n)
	dependents := make([][]int, n)
	var ready []int
	for _, nd := range g.Nodes {
		pending[nd.Index] = len(nd.Inputs)
		for _, in := range nd.Inputs {
			dependents[in] = append(dependents[in], nd.Index)
		}
		if len(nd.Inputs) == 0 {
			ready = append(ready, nd.Index)
		}
	}
	type done struct {
		out NodeOutcome
		err error
	}
	work := make(chan int)
	results := make(chan done)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range work {
				out, err := s.node(g, rep, i)
				results <- done{out, err}
			}
		}()
	}
	settled, inflight := 0, 0
	var firstErr error
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
		if o.record != nil {
			buffered = append(buffered, *o.record)
			flush(false)
		}
		if opts.OnNode != nil {
			opts.OnNode(o)
		}
	}
	// release settles node i's dependents that became ready; those with a
	// failed or skipped input are skipped at once, transitively.
	var release func(i int)
	release = func(i int) {
		for _, d := range dependents[i] {
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
				ready = append(ready, d)
				continue
			}
			settle(NodeOutcome{Node: g.Nodes[d], Skipped: true})
			release(d)
		}
	}
	probed := make([]bool, n)
	// probe looks up every ready node not yet looked up in one batch: the
	// ones found settle as reused at once (a warm run needs no worker), the
	// others go to the workers, which then skip their own look-up.
	probe := func() error {
		var idx []int
		var keys []KeyID
		for _, i := range ready {
			if probed[i] {
				continue
			}
			probed[i] = true
			p, err := s.prepare(g, rep, i)
			if err != nil {
				return err
			}
			s.prep[i] = p
			idx = append(idx, i)
			keys = append(keys, p.key)
		}
		if len(keys) == 0 {
			return nil
		}
		start := opts.Now()
		found, err := bl.LookupMany(ctx, keys)
		if err != nil {
			return fmt.Errorf("look up %d nodes: %w", len(keys), err)
		}
		d := opts.Now().Sub(start) / time.Duration(len(keys))
		var still []int
		hit := map[int]bool{}
		for _, i := range idx {
			p := s.prep[i]
			stored, ok := found[p.key]
			if !ok {
				p.missed = true
				continue
			}
			hit[i] = true
			stored.Duration = d
			o := NodeOutcome{Node: g.Nodes[i], Key: p.key, Action: Reused, Outputs: stored.Outputs, OutputHash: stored.OutputHash, Duration: d}
			if s.batched {
				o.record = &Recorded{Node: stored, Action: Reused}
			} else if err := rec.RecordNode(ctx, run, stored, Reused); err != nil {
				return err
			}
			settle(o)
		}
		for _, i := range ready {
			if !hit[i] {
				still = append(still, i)
			}
		}
		ready = still
		for _, i := range idx {
			if hit[i] {
				release(i)
			}
		}
		return nil
	}
	for settled < n {
		if probing && firstErr == nil {
			for {
				before := settled
				if err := probe(); err != nil {
					firstErr = err
					break
				}
				if settled == before {
					break // nothing found: the rest is for the workers
				}
			}
			if settled >= n {
				break
			}
		}
		for firstErr == nil && len(ready) > 0 && inflight < jobs {
			if err := ctx.Err(); err != nil {
				firstErr = fmt.Errorf("run interrupted: %w", err)
				break
			}
			work <- ready[0]
			ready = ready[1:]
			inflight++
		}
		if inflight == 0 {
			break // stopped by an error, or nothing left that can run
		}
		d := <-results
		inflight--
		if wr != nil && d.err == nil {
			if err := wr.failed(); err != nil {
				d.err = err
			}
		}
		if d.err != nil {
			if firstErr == nil {
				firstErr = d.err
			}
			continue
		}
		settle(d.out)
		release(d.out.Node.Index)
	}
	close(work)
	wg.Wait()
	if wr != nil {
		flush(true)
		if err := wr.close(); err != nil && firstErr == nil {
			firstErr = err
		}
	}
	if firstErr == nil && settled < n {
		firstErr = errors.New("graph has nodes that can never run (a cycle or a dangling input)")
	}
	return rep, firstErr
}

// node evaluates one node whose inputs have all succeeded. It returns an
// error only for storage failures.
// prepared is a node's description and key, computed once its inputs
// have settled.
type prepared struct {
	desc   string
	key    KeyID
	refs   []InputRef
	inputs []Values
	missed bool // a batched look-up already found no such key
}

func (s *scheduler) prepare(g *Graph, rep *Report, i int) (*prepared, error) {
	nd := g.Nodes[i]
	spec := nd.Stage.Spec()
	p := &prepared{refs: make([]InputRef, len(nd.Inputs)), inputs: make([]Values, len(nd.Inputs))}
	for k, in := range nd.Inputs {
		o := rep.Outcomes[in] // settled before this node was released
		p.refs[k] = InputRef{Stage: g.Nodes[in].Stage.Spec().Name, Key: o.Key, Output: o.OutputHash}
		p.inputs[k] = o.Outputs
	}
	desc, err := Describe(s.opts.Tool, spec.Name, spec.Version, nd.Params, p.refs)
	if err != nil {
		return nil, fmt.Errorf("node %d (%s): %w", i, nd.Label, err)
	}
	p.desc, p.key = desc, KeyOf(desc)
	return p, nil
}

func (s *scheduler) node(g *Graph, rep *Report, i int) (NodeOutcome, error) {
	nd := g.Nodes[i]
	spec := nd.Stage.Spec()
	out := NodeOutcome{Node: nd}
	p := s.prep[i]
	if p == nil {
		var err error
		if p, err = s.prepare(g, rep, i); err != nil {
			return out, err
		}
	}
	desc, key, refs, inputs := p.desc, p.key, p.refs, p.inputs
	out.Key = key

	// Two nodes of one run with the same key: the second waits for the
	// first and shares its outcome, recording nothing twice.
	s.mu.Lock()
	if f, ok := s.flights[key]; ok {
		s.mu.Unlock()
		<-f.done
		shared := f.out
		shared.Node = nd
		if shared.Action == Computed {
			shared.Action = Reused
		}
		shared.Duration = 0
		return shared, nil
	}
	f := &flight{done: make(chan struct{})}
	s.flights[key] = f
	s.mu.Unlock()
	defer close(f.done)

	if !s.opts.NoReuse && !p.missed {
		lookStart := s.opts.Now()
		stored, found, err := s.rec.Lookup(s.ctx, key)
		if err != nil {
			return out, fmt.Errorf("look up %s (%s): %w", key, nd.Label, err)
		}
		if found {
			out.Action, out.Outputs, out.OutputHash = Reused, stored.Outputs, stored.OutputHash
			// The run's own time for a reused node is the look-up's.
			stored.Duration = s.opts.Now().Sub(lookStart)
			out.Duration = stored.Duration
			if s.batched {
				out.record = &Recorded{Node: stored, Action: Reused}
			} else if err := s.rec.RecordNode(s.ctx, s.run, stored, Reused); err != nil {
				return out, fmt.Errorf("record reuse of %s (%s): %w", key, nd.Label, err)
			}
			f.out = out
			f.out.record = nil
			return out, nil
		}
	}
	nr := NodeRecord{Key: key, Stage: spec.Name, Version: spec.Version, Params: nd.Params, Inputs: refs, Description: desc}
	start := s.opts.Now()
	outputs, runErr := runStage(s.ctx, nd.Stage, nd.Params, inputs)
	var hash OutputID
	if runErr == nil {
		hash, _, runErr = OutputHash(outputs)
		if runErr != nil {
			runErr = fmt.Errorf("stage produced unrecordable outputs: %w", runErr)
		}
	}
	out.Duration = s.opts.Now().Sub(start)
	nr.Duration = out.Duration
	if runErr != nil {
		out.Action, out.Err = Failed, &StageError{Stage: spec.Name, Label: nd.Label, Err: runErr}
		nr.Status, nr.Error = NodeFailed, runErr.Error()
	} else {
		out.Action, out.Outputs, out.OutputHash = Computed, outputs, hash
		nr.Status, nr.Outputs, nr.OutputHash = NodeOK, outputs, hash
	}
	if s.batched {
		out.record = &Recorded{Node: nr, Action: out.Action}
	} else if err := s.rec.RecordNode(s.ctx, s.run, nr, out.Action); err != nil {
		return out, fmt.Errorf("record %s (%s): %w", key, nd.Label, err)
	}
	f.out = out
	f.out.record = nil
	return out, nil
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
