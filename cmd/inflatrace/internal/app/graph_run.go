package app

import (
	"context"
	"fmt"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
)

// GraphOutcome is the result of recording a study's graph as one run.
type GraphOutcome struct {
	Run    pipeline.RunID
	Report *pipeline.Report
	// Outputs of each result node, in the graph's result order (nil for
	// a failed one).
	Outputs []pipeline.Values
	Ledger  string
}

// ExecuteGraph records and runs graph (built from study s, whose text the
// run records) as one run in the ledger: for the graphs whose nodes each
// carry a whole computation (the study's inferences), with no chunks or
// works. A node recorded before is reused, so a re-run computes nothing.
func (e *Env) ExecuteGraph(ctx context.Context, g *Globals, s *study.Study, graph *pipeline.Graph, jobs int) (*GraphOutcome, error) {
	l, info, closeRun, err := e.openRun(ctx, g, s, ExecOptions{})
	if err != nil {
		return nil, err
	}
	defer closeRun()
	id := info.ID
	if jobs < 1 {
		jobs = e.CPUs
	}
	ctx, onNode, endProgress := e.progress(ctx, len(graph.Nodes))
	sess, err := pipeline.Begin(ctx, l, info, pipeline.Options{Jobs: jobs, Tool: ToolIdentity, Now: e.Now, OnNode: onNode})
	if err != nil {
		endProgress()
		return nil, err
	}
	stopBeat := startHeartbeat(ctx, l, id)
	defer stopBeat()
	rep, runErr := sess.Execute(ctx, graph)
	endProgress()
	stopBeat()
	status, ferr := sess.Finish(ctx, runErr)
	if runErr == nil {
		runErr = ferr
	}
	if runErr != nil {
		return nil, runErr
	}
	out := &GraphOutcome{Run: id, Ledger: l.Path()}
	var firstErr error
	for _, r := range graph.Results {
		o := rep.Outcomes[r.Node]
		if o.Err != nil {
			out.Outputs = append(out.Outputs, nil)
			if firstErr == nil {
				firstErr = o.Err
			}
			continue
		}
		out.Outputs = append(out.Outputs, o.Outputs)
	}
	tot := sess.Totals
	tot.Status = status
	out.Report = &tot
	fmt.Fprintf(e.Stderr, "run %s: %d nodes: %d computed, %d reused, %d failed, %d skipped (ledger %s)\n",
		id, len(graph.Nodes), tot.Computed, tot.Reused, tot.Failed, tot.Skipped, l.Path())
	if tot.Failed > 0 {
		return out, &RunFailedError{Run: id, Failed: tot.Failed, First: firstErr}
	}
	return out, nil
}
