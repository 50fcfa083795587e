package pipeline

import (
	"context"
	"errors"
	"fmt"
)

// WorkID identifies a unit of work: a part of a run (a chunk of a study's
// model points, say) whose whole graph is fixed by a description the
// front end writes without computing or reading anything (the points'
// parameters, the settings, every stage's version and the tool identity).
// It is a prefixed SHA-256 like a key. Where node keys chain on upstream
// outputs and so can only be known node by node, a work key is known
// before the work starts: a warm run looks up a few work keys instead of
// every node.
type WorkID string

// Short returns the prefix and the first 12 hex digits, for tables.
func (w WorkID) Short() string { return shortHash(string(w)) }

// WorkNode is one node of a recorded work, in graph order.
type WorkNode struct {
	Key    KeyID
	Output OutputID // empty for a failed node
	Status NodeStatus
	Action Action // what the run that computed the work did with the node
	Error  string // the stage's error, for a failed node
}

// Work is a unit of work as recorded by the run that evaluated it: its
// nodes (each node of its graph that settled, once, in graph order), its
// results (ordinals counted from the work's first result) and a summary
// of them that the front end writes (its assembled results), so that a run
// reusing the work can report them without reading its nodes.
type Work struct {
	// Key is empty when the work cannot be reused whole: a node failed or
	// was skipped (failed nodes are always computed again).
	Key     WorkID
	Nodes   []WorkNode
	Results []ResultRef
	// Span is the number of result ordinals the work takes in a run,
	// failed results included (len of the graph's results).
	Span    int
	Summary []byte
}

// RecordedWork is a complete work found in the recorder.
type RecordedWork struct {
	ID      int64 // the recorder's handle for it
	Key     WorkID
	Nodes   int // how many nodes it links
	Span    int
	Summary []byte
}

// WorkLink is one work of a run, in run order: a work the run evaluated
// (Work set) or a recorded one it reused (Reused set). Base is the run's
// ordinal of the work's first result, NodeBase that of its first node.
type WorkLink struct {
	Work     *Work
	Reused   *RecordedWork
	Base     int
	NodeBase int
}

// WorkRecorder is a BatchRecorder that stores runs as sequences of works:
// a work's nodes are stored without a link each, and the run links the
// work once, so that a run's membership costs a row per work, not per
// node.
type WorkRecorder interface {
	BatchRecorder
	// LookupWork returns the complete work recorded under key, if any,
	// checked against its own digest.
	LookupWork(ctx context.Context, key WorkID) (RecordedWork, bool, error)
	// RecordWorks stores, in one transaction, batch's nodes (records with
	// InWork set get no link of their own) and the run's works, in order.
	RecordWorks(ctx context.Context, run RunID, batch []Recorded, works []WorkLink) error
}

// ReuseWork links the complete work recorded under key, if there is one,
// to the run as its next work, and returns it: its results take the next
// rec.Span ordinals. Without a WorkRecorder (or with NoReuse) it finds
// nothing. It needs batched writes.
func (s *Session) ReuseWork(ctx context.Context, key WorkID) (RecordedWork, bool, error) {
	wr, ok := s.rec.(WorkRecorder)
	if !ok || s.wr == nil || s.opts.NoReuse || key == "" {
		return RecordedWork{}, false, nil
	}
	if err := s.wr.failed(); err != nil {
		return RecordedWork{}, false, err
	}
	rw, found, err := wr.LookupWork(ctx, key)
	if err != nil {
		return RecordedWork{}, false, fmt.Errorf("look up work %s: %w", key, err)
	}
	if !found {
		return RecordedWork{}, false, nil
	}
	link := WorkLink{Reused: &rw, Base: s.ordinal, NodeBase: s.nodeOrdinal}
	s.ordinal += rw.Span
	s.nodeOrdinal += rw.Nodes
	s.Totals.Reused += rw.Nodes
	s.wr.addWork(link, s.ordinal)
	return rw, true, nil
}

// ExecuteWork evaluates g as one work under key, like Execute, except that
// the graph's nodes and results are recorded as one work (WorkRecorder):
// summarize, called once the graph is evaluated, gives the work's
// summary. A work with a failed or skipped node is recorded without its
// key (it is never reused whole). Without a WorkRecorder and batched
// writes it is Execute.
func (s *Session) ExecuteWork(ctx context.Context, g *Graph, key WorkID, summarize func(*Report) ([]byte, error)) (*Report, error) {
	if _, ok := s.rec.(WorkRecorder); !ok || s.wr == nil {
		return s.Execute(ctx, g)
	}
	if err := s.wr.failed(); err != nil {
		return nil, err
	}
	s.inWork = true
	rep, err := s.scheduleCounted(ctx, g)
	s.inWork = false
	if err != nil {
		return rep, err
	}
	w := &Work{Key: key, Span: len(g.Results)}
	if rep.Failed > 0 || rep.Skipped > 0 {
		w.Key = ""
	}
	seen := make(map[KeyID]bool, len(g.Nodes))
	for _, o := range rep.Outcomes {
		if o.Skipped || o.Key == "" || seen[o.Key] {
			continue
		}
		seen[o.Key] = true
		wn := WorkNode{Key: o.Key, Output: o.OutputHash, Status: NodeOK, Action: o.Action}
		if o.Action == Failed {
			wn.Status, wn.Error = NodeFailed, o.Err.Error()
			var se *StageError
			if errors.As(o.Err, &se) {
				wn.Error = se.Err.Error() // as the node's row records it
			}
		}
		w.Nodes = append(w.Nodes, wn)
	}
	for i, r := range g.Results {
		if o := rep.Outcomes[r.Node]; o.Action == Computed || o.Action == Reused {
			w.Results = append(w.Results, ResultRef{Ordinal: i, Label: r.Label, Key: o.Key})
		}
	}
	if summarize != nil {
		if w.Summary, err = summarize(rep); err != nil {
			return rep, fmt.Errorf("summarise work: %w", err)
		}
	}
	link := WorkLink{Work: w, Base: s.ordinal, NodeBase: s.nodeOrdinal}
	s.ordinal += len(g.Results)
	s.nodeOrdinal += len(w.Nodes)
	s.wr.addWork(link, s.ordinal)
	return rep, nil
}
