package ledger

import (
	"context"
	"database/sql"
	"fmt"
	"sort"

	"github.com/inflatrace/inflatrace/pipeline"
)

// LineageNode is what a result's assembly reads of one node upstream of
// it: its stage, parameters, outputs (nil when failed), status and error.
type LineageNode struct {
	Stage   string
	Params  pipeline.Values
	Outputs pipeline.Values
	Status  pipeline.NodeStatus
	Error   string
}

// ResultLineage is one recorded result of a run with the nodes it was
// computed from, every input before the nodes it feeds.
type ResultLineage struct {
	Ref   pipeline.ResultRef
	Nodes []LineageNode
}

// RunLineages returns every recorded result of run id, in order, with its
// lineage, in one query whatever the run's size: what a table or figure
// of a scan needs, without one look-up per result. Every node's stored outputs
// are checked against their hash as they are read; re-deriving each key
// from its description is verify's job, as on the cached path of a run.
// need says, per stage, whether its parameters and outputs are decoded
// (nil: everything); what is not decoded is left nil, its hash checked
// all the same. An unknown run wraps ErrNotFound.
func (l *Ledger) RunLineages(ctx context.Context, id pipeline.RunID, need func(stage string) (params, outputs bool)) ([]ResultLineage, error) {
	var out []ResultLineage
	err := l.EachLineage(ctx, id, need, func(rl ResultLineage) error {
		out = append(out, rl)
		return nil
	})
	return out, err
}

// EachLineage is RunLineages handing each result to fn in order, so that
// a reader of a large scan holds one result's lineage at a time. It reads
// every lineage in one recursive query, sorted by result and, within a
// result, inputs first (a node's longest path from the result is longer
// than that of any node it feeds). An error from fn stops it.
func (l *Ledger) EachLineage(ctx context.Context, id pipeline.RunID, need func(stage string) (params, outputs bool), fn func(ResultLineage) error) error {
	if need == nil {
		need = func(string) (bool, bool) { return true, true }
	}
	err := l.inReadTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, id); err != nil {
			return err
		}
		// The run's results are read once (run_results is a view over
		// per-result rows and works, with no index to join on).
		rows, err := tx.QueryContext(ctx, `WITH RECURSIVE res(ord, label, node) AS MATERIALIZED (
				SELECT rr.ordinal, rr.label, rr.node FROM run_results rr WHERE rr.run_id = ?1
			), up(ord, id, depth) AS (
				SELECT res.ord, res.node, 0 FROM res
				UNION
				SELECT up.ord, ni.input, up.depth + 1 FROM node_inputs ni JOIN up ON ni.node = up.id
				WHERE up.depth < ?2
			)
			SELECT u.ord, u.d, res.label, t.key, n.key, k.stage, n.params_shape, n.params, n.outputs_shape, n.outputs, n.output_hash, n.status, n.error
			FROM (SELECT ord, id, max(depth) AS d FROM up GROUP BY ord, id) u
			JOIN node_rows n ON n.id = u.id
			JOIN kinds k ON k.id = n.kind
			JOIN res ON res.ord = u.ord
			JOIN node_rows t ON t.id = res.node
			ORDER BY u.ord`, string(id), maxLineageDepth)
		if err != nil {
			return err
		}
		defer rows.Close()
		// Within a result the rows come in any order; inputs go first (a
		// greater longest path from the result), ties by key.
		var cur *ResultLineage
		var depths []int
		var keys []string
		flush := func() error {
			if cur == nil {
				return nil
			}
			rl := *cur
			idx := make([]int, len(rl.Nodes))
			for i := range idx {
				idx[i] = i
			}
			sort.Slice(idx, func(a, b int) bool {
				if depths[idx[a]] != depths[idx[b]] {
					return depths[idx[a]] > depths[idx[b]]
				}
				return keys[idx[a]] < keys[idx[b]]
			})
			nodes := make([]LineageNode, len(idx))
			for i, j := range idx {
				nodes[i] = rl.Nodes[j]
			}
			rl.Nodes = nodes
			cur, depths, keys = nil, depths[:0], keys[:0]
			return fn(rl)
		}
		for rows.Next() {
			var (
				ord, depth             int
				label                  string
				key, nodeKey, hash     sql.RawBytes
				stage, status, errText string
				params, outputs        sql.RawBytes
				pShape, oShape         sql.NullInt64
			)
			if err := rows.Scan(&ord, &depth, &label, &key, &nodeKey, &stage, &pShape, &params, &oShape, &outputs, &hash, &status, &errText); err != nil {
				return err
			}
			if depth >= maxLineageDepth {
				return fmt.Errorf("%w: lineage deeper than %d nodes: node_inputs holds a cycle", ErrIntegrity, maxLineageDepth)
			}
			if cur == nil || cur.Ref.Ordinal != ord {
				if err := flush(); err != nil {
					return err
				}
				k, err := storedKey(key)
				if err != nil {
					return err
				}
				cur = &ResultLineage{Ref: pipeline.ResultRef{Ordinal: ord, Label: label, Key: k}}
			}
			ln := LineageNode{Stage: stage, Status: pipeline.NodeStatus(status), Error: errText}
			wantParams, wantOutputs := need(stage)
			if wantParams {
				text, err := l.valuesText(ctx, tx, pShape, params)
				if err == nil {
					ln.Params, err = pipeline.DecodeValues([]byte(text))
				}
				if err != nil {
					return fmt.Errorf("%w: a %s node: stored parameters: %v", ErrIntegrity, stage, err)
				}
			}
			if ln.Status == pipeline.NodeOK {
				text, err := l.valuesText(ctx, tx, oShape, outputs)
				if err != nil {
					return fmt.Errorf("a %s node: stored outputs: %w", stage, err)
				}
				outputs := []byte(text)
				if got, want := pipeline.OutputID(pipeline.Sum(outputs)), pipeline.OutputID(digestText(hash)); got != want {
					return fmt.Errorf("%w: a %s node: stored outputs hash to %s, row says %s", ErrIntegrity, stage, got, want)
				}
				if wantOutputs {
					if ln.Outputs, err = pipeline.DecodeValues(outputs); err != nil {
						return fmt.Errorf("%w: a %s node: stored outputs: %v", ErrIntegrity, stage, err)
					}
				}
			}
			cur.Nodes = append(cur.Nodes, ln)
			depths = append(depths, depth)
			keys = append(keys, string(nodeKey))
		}
		if err := rows.Err(); err != nil {
			return err
		}
		return flush()
	})
	if err != nil {
		return fmt.Errorf("ledger: lineages of run %s: %w", id, err)
	}
	return nil
}
