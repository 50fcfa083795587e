package app

import (
	"context"
	"fmt"
	"github.com/inflatrace/inflatrace/ledger"
	"strings"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/reheat"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Outcome is the result of running a study.
type Outcome struct {
	Report  *pipeline.Report
	Results []study.Result
	Ledger  string
}

// ChunkPoints is the number of model points evaluated together: a scan is
// expanded, run and recorded this many points at a time within one run, so
// that its memory does not grow with its size.
var ChunkPoints = 1000

// Batch is the number of nodes written to the ledger per transaction (at
// most a second apart), so that an interrupted run loses at most that
// much work.
const Batch = 10000

// ExecuteStudy records and runs a checked study in the ledger with the
// given parallelism. A run with failed nodes returns its outcome together
// with a *RunFailedError.
func (e *Env) ExecuteStudy(ctx context.Context, g *Globals, s *study.Study, jobs int) (*Outcome, error) {
	out, err := e.ExecuteStudyTo(ctx, g, s, jobs, nil)
	return out, err
}

// Emit receives a run's results chunk by chunk, in order, as they are
// recorded; the run id is known before the first call.
type Emit func(run pipeline.RunID, results []study.Result) error

// ExecuteStudyTo is ExecuteStudy streaming the results to emit (when not
// nil) instead of keeping them in the Outcome, so that a large scan's
// memory does not grow with it.
func (e *Env) ExecuteStudyTo(ctx context.Context, g *Globals, s *study.Study, jobs int, emit Emit) (*Outcome, error) {
	return e.ExecuteWith(ctx, g, s, ExecOptions{Jobs: jobs, Emit: emit})
}

// ExecOptions are the choices of ExecuteWith.
type ExecOptions struct {
	Jobs int  // parallelism; below 1: one per CPU
	Emit Emit // when not nil, receives the results instead of the Outcome
	// DerivedFrom and Parts are recorded with the run (pipeline.RunInfo).
	DerivedFrom pipeline.RunID
	Parts       []pipeline.RunID
	// ReuseOnly computes nothing: every node must be in the ledger
	// (pipeline.Options.ReuseOnly).
	ReuseOnly bool
}

// ExecuteWith records and runs a checked study in the ledger.
func (e *Env) ExecuteWith(ctx context.Context, g *Globals, s *study.Study, o ExecOptions) (*Outcome, error) {
	jobs, emit := o.Jobs, o.Emit
	chunks := s.Chunks(ChunkPoints)
	graphs := make([]*pipeline.Graph, 0, 1)
	// Build the first chunk's graph before touching the ledger: a bad
	// study is refused with nothing recorded.
	first, err := chunks[0].Graph()
	if err != nil {
		return nil, Usage(fmt.Errorf("%s: %w", s.File, err))
	}
	graphs = append(graphs, first)
	l, info, closeRun, err := e.openRun(ctx, g, s, o)
	if err != nil {
		return nil, err
	}
	defer closeRun() // after sess.Finish: deferred calls run last
	id := info.ID
	if jobs < 1 {
		jobs = e.CPUs
	}
	ctx, onNode, endProgress := e.progress(ctx, s.NodeEstimate())
	sess, err := pipeline.Begin(ctx, l, info, pipeline.Options{Jobs: jobs, Tool: ToolIdentity, Now: e.Now, Batch: Batch, OnNode: onNode, ReuseOnly: o.ReuseOnly})
	if err != nil {
		endProgress()
		return nil, err
	}
	// The run says it is alive while it runs, so that a later run can
	// tell it from one whose process died on another host.
	stopBeat := startHeartbeat(ctx, l, id)
	defer stopBeat()
	out := &Outcome{Ledger: l.Path()}
	var firstErr error
	nodes := 0
	var runErr error
	// A chunk's results are handed on (printed) only once the session has
	// committed them with their nodes: what was printed is in the ledger,
	// even after a crash. Chunks wait here until then.
	type waiting struct {
		results []study.Result
		upto    int // the session's results mark after the chunk
	}
	var queue []waiting
	marked := 0
	release := func(committed int) error {
		for len(queue) > 0 && queue[0].upto <= committed {
			rs := queue[0].results
			queue = queue[1:]
			e.flagBBN(rs)
			if emit != nil {
				if err := emit(id, rs); err != nil {
					return err
				}
			} else {
				out.Results = append(out.Results, rs...)
			}
		}
		return nil
	}
	// Chunk by chunk: each chunk is one work. A work recorded whole (same
	// points, settings, stage versions and tool) is linked and its
	// recorded results reported, without building its graph; otherwise its
	// graph is evaluated (reusing recorded nodes), recorded and let go.
	// While a chunk computes, the next chunk's graph is built on the side
	// (building one is serial work, a tenth of a chunk's): a cold scan
	// then never waits for it. It is built only after a chunk that was
	// computed, so a warm run, whose chunks are all found, builds none.
	var ahead chan builtGraph
	for i, ch := range chunks {
		pre := ahead
		ahead = nil
		key, err := ch.WorkKey(ToolIdentity)
		if err != nil {
			runErr = fmt.Errorf("%s: %w", s.File, err)
			break
		}
		rw, found, err := sess.ReuseWork(ctx, key)
		if err != nil {
			runErr = err
			break
		}
		if found {
			rs, err := study.DecodeResults(rw.Summary)
			if err != nil {
				runErr = fmt.Errorf("work %s: %w", key.Short(), err)
				break
			}
			for range rw.Nodes {
				onNode(pipeline.NodeOutcome{Action: pipeline.Reused})
			}
			nodes += rw.Nodes
			marked += rw.Span
			queue = append(queue, waiting{rs, marked})
			if err := release(sess.Committed()); err != nil {
				runErr = err
				break
			}
			first = nil
			continue
		}
		graph := first
		if graph == nil {
			if pre != nil {
				b := <-pre
				graph, err = b.graph, b.err
			} else {
				graph, err = ch.Graph()
			}
			if err != nil {
				runErr = err
				break
			}
		}
		if i+1 < len(chunks) {
			ahead = buildAhead(chunks[i+1])
		}
		var rs []study.Result
		rep, err := sess.ExecuteWork(ctx, graph, key, func(rep *pipeline.Report) ([]byte, error) {
			rs = study.Results(graph, rep)
			return study.EncodeResults(rs)
		})
		if err != nil {
			runErr = err
			break
		}
		if rs == nil {
			rs = study.Results(graph, rep)
		}
		nodes += len(graph.Nodes)
		marked += len(graph.Results)
		queue = append(queue, waiting{rs, marked})
		if err := release(sess.Committed()); err != nil {
			runErr = err
			break
		}
		for _, o := range rep.Outcomes {
			if o.Err != nil && firstErr == nil {
				firstErr = o.Err
			}
		}
		first = nil
	}
	endProgress()
	stopBeat()
	status, ferr := sess.Finish(ctx, runErr)
	if runErr == nil {
		runErr = ferr
	}
	// Finish wrote what was pending: release what it committed (nothing
	// more, if a write failed).
	if err := release(sess.Committed()); err != nil && runErr == nil {
		runErr = err
	}
	if runErr != nil {
		return nil, runErr
	}
	if q, err := l.Quarantined(context.WithoutCancel(ctx), id); err == nil {
		for _, p := range q {
			fmt.Fprintf(e.Stderr, "warning: node %s was found edited (%s): computed again and its row rewritten; the row as found is kept in table quarantine (\"inflatrace verify --all\" checks the whole ledger)\n",
				pipeline.KeyID(p.ID).Short(), p.What)
		}
	}
	rep := sess.Totals
	rep.Status = status
	out.Report = &rep
	fmt.Fprintf(e.Stderr, "run %s: %d nodes: %d computed, %d reused, %d failed, %d skipped (ledger %s)\n",
		id, nodes, rep.Computed, rep.Reused, rep.Failed, rep.Skipped, l.Path())
	if rep.Failed > 0 {
		return out, &RunFailedError{Run: id, Failed: rep.Failed, First: firstErr}
	}
	return out, nil
}

// flagBBN warns of results whose reheating temperature is below the
// nucleosynthesis bound.
func (e *Env) flagBBN(results []study.Result) {
	for _, r := range results {
		if r.BelowBBN != nil && *r.BelowBBN && r.TRehGeV != nil {
			fmt.Fprintf(e.Stderr, "flag: %s: T_reh = %.3g GeV is below the nucleosynthesis bound (%.3g GeV unless T_bbn_GeV is set; de Salas et al. 2015, arXiv:1511.00672)\n",
				r.Label, *r.TRehGeV, reheat.DefaultBBNBoundGeV)
		}
	}
}

// RecordedResults assembles a recorded run's results from the ledger,
// without recomputing anything (ledger.RunLineages: a few queries,
// whatever the run's size).
func RecordedResults(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) ([]study.Result, error) {
	return RecordedResultsWith(ctx, l, id, study.AssemblyNeeds)
}

// RecordedResultsWith is RecordedResults decoding only what need names of
// each stage's nodes (a figure needs no comparison figures, say); what it
// leaves out is missing from the results.
func RecordedResultsWith(ctx context.Context, l *ledger.Ledger, id pipeline.RunID, need func(stage string) (params, outputs bool)) ([]study.Result, error) {
	works, only, err := l.RunWorks(ctx, id)
	if err != nil {
		return nil, err
	}
	if only {
		return resultsOfWorks(works)
	}
	return resultsOfLineages(ctx, l, id, need)
}

// resultsOfWorks reads a run's results from its works' summaries (the
// results assembled when each work was evaluated), without reading a
// node: the recorded ones, in order (a failed result carries its error and
// is not a recorded result).
func resultsOfWorks(works []ledger.RunWork) ([]study.Result, error) {
	var out []study.Result
	for _, w := range works {
		rs, err := study.DecodeResults(w.Summary)
		if err != nil {
			return nil, fmt.Errorf("work %d of the run: %w", w.Position, err)
		}
		if len(rs) != w.Span {
			return nil, fmt.Errorf("work %d of the run: %d results in its summary, the work spans %d", w.Position, len(rs), w.Span)
		}
		for _, r := range rs {
			if r.Error == "" {
				out = append(out, r)
			}
		}
	}
	return out, nil
}

// ResultsOfLineages is RecordedResults assembling every result from its
// lineage's nodes, whatever the run's layout (the reference its works'
// summaries are tested against).
func ResultsOfLineages(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) ([]study.Result, error) {
	return resultsOfLineages(ctx, l, id, study.AssemblyNeeds)
}

// resultsOfLineages assembles a run's results from the lineages of its
// recorded results.
func resultsOfLineages(ctx context.Context, l *ledger.Ledger, id pipeline.RunID, need func(stage string) (params, outputs bool)) ([]study.Result, error) {
	var out []study.Result
	err := l.EachLineage(ctx, id, need, func(rl ledger.ResultLineage) error {
		so := make([]study.StageOutputs, 0, len(rl.Nodes))
		firstErr := ""
		for _, n := range rl.Nodes {
			so = append(so, study.StageOutputs{Stage: n.Stage, Outputs: n.Outputs, Params: n.Params})
			if n.Status == pipeline.NodeFailed && firstErr == "" {
				firstErr = n.Stage + ": " + n.Error
			}
		}
		r := study.Assemble(rl.Ref.Label, rl.Ref.Key, so)
		r.Error = firstErr
		out = append(out, r)
		return nil
	})
	return out, err
}

// RecordedFile is the study file a run's recorded configuration path
// names, without the suffix a run may add to it (" [shard 1/4]",
// " [from RUN]", " [assembled from 4 shards]"): its directory resolves the
// configuration's relative constraint files.
func RecordedFile(configPath string) string {
	if i := strings.Index(configPath, " ["); i >= 0 {
		return configPath[:i]
	}
	return configPath
}

// LoadRun resolves a run reference (id, prefix, tag or "latest") and reads
// the run's record and its results from the ledger.
func LoadRun(ctx context.Context, l *ledger.Ledger, ref string) (ledger.RunDetail, []study.Result, error) {
	id, err := l.ResolveRun(ctx, ref)
	if err != nil {
		return ledger.RunDetail{}, nil, err
	}
	run, err := l.Run(ctx, id)
	if err != nil {
		return ledger.RunDetail{}, nil, err
	}
	results, err := RecordedResults(ctx, l, id)
	return run, results, err
}

// openRun opens the ledger for a new run of study s: its id and
// RunInfo, the runs of dead processes closed, and the run's lock held
// (until this process ends or the run is finished: a later run or runs
// --close-stale sees it held while the run lives and free once it died,
// whatever became of its pid). The returned function frees the lock and
// closes the ledger.
func (e *Env) openRun(ctx context.Context, g *Globals, s *study.Study, o ExecOptions) (*ledger.Ledger, pipeline.RunInfo, func(), error) {
	l, err := e.OpenLedger(g)
	if err != nil {
		return nil, pipeline.RunInfo{}, nil, err
	}
	start := e.Now()
	id, err := e.NewRunID(start)
	if err != nil {
		l.Close()
		return nil, pipeline.RunInfo{}, nil, err
	}
	info := pipeline.RunInfo{
		ID: id, Started: start, ToolVersion: Version,
		ConfigPath: s.File, ConfigText: string(s.Text), ConfigHash: s.Hash(), Owner: e.Owner(),
		DerivedFrom: o.DerivedFrom, Parts: o.Parts,
	}
	if err := e.closeAbandoned(ctx, l); err != nil {
		l.Close()
		return nil, pipeline.RunInfo{}, nil, err
	}
	lock, err := l.HoldRunLock(id)
	if err != nil {
		l.Close()
		return nil, pipeline.RunInfo{}, nil, err
	}
	return l, info, func() { lock.Release(); l.Close() }, nil
}

// closeAbandoned closes the runs left running by processes that are gone
// (ledger.CloseAbandoned), saying so.
func (e *Env) closeAbandoned(ctx context.Context, l *ledger.Ledger) error {
	closed, err := l.CloseAbandoned(ctx, e.Alive, ledger.StaleAfter)
	if err != nil {
		return err
	}
	for _, c := range closed {
		fmt.Fprintf(e.Stderr, "run %s was interrupted (its process is gone or silent for %s): marked failed; its recorded nodes are reused\n", c, ledger.StaleAfter)
	}
	return nil
}

// startHeartbeat records that run id is alive every ledger.HeartbeatEvery
// until the returned function is called (which may be called again).
func startHeartbeat(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) (stop func()) {
	beat := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		t := time.NewTicker(ledger.HeartbeatEvery)
		defer t.Stop()
		for {
			select {
			case <-beat:
				return
			case <-t.C:
				l.Heartbeat(context.WithoutCancel(ctx), id) // a missed beat only ages the run
			}
		}
	}()
	return func() {
		if beat != nil {
			close(beat)
			<-done
			beat = nil
		}
	}
}

// builtGraph is a chunk's graph built ahead of its turn, or the error of
// building it.
type builtGraph struct {
	graph *pipeline.Graph
	err   error
}

// buildAhead builds ch's graph on a goroutine of its own and delivers it
// on the channel returned (buffered: a graph nobody takes is let go).
func buildAhead(ch *study.Study) chan builtGraph {
	c := make(chan builtGraph, 1)
	go func() {
		g, err := ch.Graph()
		c <- builtGraph{g, err}
	}()
	return c
}
