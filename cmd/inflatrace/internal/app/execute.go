package app

import (
	"context"
	"fmt"
	"github.com/inflatrace/inflatrace/ledger"

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

// Batch is the number of nodes written to the ledger per transaction (at
// most a second apart), so that an interrupted run loses at most that
// much work.
const Batch = 500

// ExecuteStudy records and runs a checked study in the ledger with the
// given parallelism. A run with failed nodes returns its outcome together
// with a *RunFailedError.
func (e *Env) ExecuteStudy(ctx context.Context, g *Globals, s *study.Study, jobs int) (*Outcome, error) {
	graph, err := s.Graph()
	if err != nil {
		return nil, Usage(fmt.Errorf("%s: %w", s.File, err))
	}
	l, err := e.OpenLedger(g)
	if err != nil {
		return nil, err
	}
	defer l.Close()
	start := e.Now()
	id, err := e.NewRunID(start)
	if err != nil {
		return nil, err
	}
	info := pipeline.RunInfo{
		ID: id, Started: start, ToolVersion: Version,
		ConfigPath: s.File, ConfigText: string(s.Text), ConfigHash: s.Hash(), Owner: e.Owner(),
	}
	if closed, err := l.CloseAbandoned(ctx, e.Alive); err != nil {
		return nil, err
	} else {
		for _, c := range closed {
			fmt.Fprintf(e.Stderr, "run %s was interrupted (its process is gone): marked failed; its recorded nodes are reused\n", c)
		}
	}
	if jobs < 1 {
		jobs = e.CPUs
	}
	onNode, endProgress := e.progress(len(graph.Nodes))
	rep, err := pipeline.Execute(ctx, l, info, graph, pipeline.Options{Jobs: jobs, Tool: ToolIdentity, Now: e.Now, Batch: Batch, OnNode: onNode})
	endProgress()
	if err != nil {
		return nil, err
	}
	out := &Outcome{Report: rep, Results: study.Results(graph, rep), Ledger: l.Path()}
	fmt.Fprintf(e.Stderr, "run %s: %d nodes: %d computed, %d reused, %d failed, %d skipped (ledger %s)\n",
		id, len(graph.Nodes), rep.Computed, rep.Reused, rep.Failed, rep.Skipped, l.Path())
	for _, r := range out.Results {
		if r.BelowBBN != nil && *r.BelowBBN && r.TRehGeV != nil {
			fmt.Fprintf(e.Stderr, "flag: %s: T_reh = %.3g GeV is below the nucleosynthesis bound (%.3g GeV unless T_bbn_GeV is set; de Salas et al. 2015, arXiv:1511.00672)\n",
				r.Label, *r.TRehGeV, reheat.DefaultBBNBoundGeV)
		}
	}
	if rep.Failed > 0 {
		var first error
		for _, o := range rep.Outcomes {
			if o.Err != nil {
				first = o.Err
				break
			}
		}
		return out, &RunFailedError{Run: id, Failed: rep.Failed, First: first}
	}
	return out, nil
}

// RecordedResults assembles a recorded run's results from the ledger,
// without recomputing anything.
func RecordedResults(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) ([]study.Result, error) {
	refs, err := l.RunResults(ctx, id)
	if err != nil {
		return nil, err
	}
	out := make([]study.Result, 0, len(refs))
	for _, ref := range refs {
		lin, err := l.Lineage(ctx, ref.Key)
		if err != nil {
			return nil, err
		}
		var so []study.StageOutputs
		firstErr := ""
		for _, n := range lin {
			so = append(so, study.StageOutputs{Stage: n.Stage, Outputs: n.Outputs})
			if n.Status == pipeline.NodeFailed && firstErr == "" {
				firstErr = n.Stage + ": " + n.Error
			}
		}
		r := study.Assemble(ref.Label, ref.Key, so)
		r.Error = firstErr
		out = append(out, r)
	}
	return out, nil
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
