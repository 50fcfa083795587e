package ledger

import (
	"context"
	"database/sql"
	"fmt"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
)

// RecordNodes stores several nodes of one run in one transaction, with the
// same checks and semantics as RecordNode for each (pipeline.BatchRecorder):
// either every node of the batch is written or none is. Batching is what
// makes large scans affordable: one commit costs far more than one row.
func (l *Ledger) RecordNodes(ctx context.Context, run pipeline.RunID, batch []pipeline.Recorded) error {
	for _, b := range batch {
		if err := checkRecord(b.Node, b.Action); err != nil {
			return fmt.Errorf("ledger: record %s node %s in run %s: %w", b.Action, b.Node.Key, run, err)
		}
	}
	err := l.inTx(ctx, func(tx *qtx) error {
		if err := requireRunning(ctx, tx, run); err != nil {
			return err
		}
		bs := &batchState{known: map[pipeline.KeyID]storedNode{}}
		var last sql.NullInt64
		if err := tx.QueryRowContext(ctx, "SELECT max(ordinal) FROM run_nodes WHERE run_id = ?", string(run)).Scan(&last); err != nil {
			return err
		}
		if last.Valid {
			bs.ordinal = int(last.Int64) + 1
		}
		if err := prefetch(ctx, tx, batch, bs); err != nil {
			return err
		}
		for _, b := range batch {
			if err := l.recordNodeIn(ctx, tx, run, b.Node, b.Action, bs); err != nil {
				return fmt.Errorf("node %s (%s): %w", b.Node.Key, b.Action, err)
			}
		}
		for _, t := range []struct {
			head, tail string
			cols       int
			rows       [][]any
		}{
			{"INSERT INTO nodes (key, stage, stage_version, params, description, outputs, output_hash, status, error, duration_ns, recorded_at) VALUES ", "", 11, bs.nodeRows},
			{"INSERT INTO node_inputs (key, position, input_key, input_stage, input_output_hash) VALUES ", "", 5, bs.inputRows},
			// A run executed in chunks may reuse one node in several: it is
			// linked once.
			{"INSERT INTO run_nodes (run_id, key, action, duration_ns, error, ordinal) VALUES ", " ON CONFLICT (run_id, key) DO NOTHING", 6, bs.linkRows},
		} {
			if err := insertRows(ctx, tx, t.head, t.tail, t.cols, t.rows); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("ledger: record %d nodes in run %s: %w", len(batch), run, err)
	}
	return nil
}

var _ pipeline.BatchRecorder = (*Ledger)(nil)

// rowsPerStatement bounds a multi-row INSERT (11 columns x 64 rows stays
// far below SQLite's limit on bound parameters).
const rowsPerStatement = 64

// insertRows inserts rows with as few statements as possible.
func insertRows(ctx context.Context, tx *qtx, head, tail string, cols int, rows [][]any) error {
	one := "(" + strings.TrimSuffix(strings.Repeat("?, ", cols), ", ") + ")"
	for len(rows) > 0 {
		n := min(len(rows), rowsPerStatement)
		q := head + strings.TrimSuffix(strings.Repeat(one+", ", n), ", ") + tail
		args := make([]any, 0, n*cols)
		for _, r := range rows[:n] {
			args = append(args, r...)
		}
		if _, err := tx.ExecContext(ctx, q, args...); err != nil {
			return fmt.Errorf("%s...: %w", strings.Fields(head)[2], err)
		}
		rows = rows[n:]
	}
	return nil
}

// prefetch reads in a few statements which of the batch's nodes and inputs
// are already stored, so that recording a node does not query for each.
func prefetch(ctx context.Context, tx *qtx, batch []pipeline.Recorded, bs *batchState) error {
	bs.absent = map[pipeline.KeyID]bool{}
	bs.trusted = map[pipeline.KeyID]bool{}
	seen := map[pipeline.KeyID]bool{}
	var keys []pipeline.KeyID
	add := func(k pipeline.KeyID) {
		if !seen[k] {
			seen[k] = true
			keys = append(keys, k)
		}
	}
	for _, b := range batch {
		if b.Action == pipeline.Reused && b.Node.Status == pipeline.NodeOK && b.Node.OutputHash != "" {
			// A reused record is the stored node the engine just looked up
			// (and verified); the link's foreign key still requires the row.
			bs.trusted[b.Node.Key] = true
			continue
		}
		add(b.Node.Key)
		for _, in := range b.Node.Inputs {
			add(in.Key)
		}
	}
	for len(keys) > 0 {
		n := min(len(keys), 500)
		q := "SELECT key, status, output_hash, stage, description FROM nodes WHERE key IN (" + strings.TrimSuffix(strings.Repeat("?, ", n), ", ") + ")"
		args := make([]any, n)
		for i, k := range keys[:n] {
			args[i] = string(k)
			bs.absent[k] = true
		}
		rows, err := tx.QueryContext(ctx, q, args...)
		if err != nil {
			return err
		}
		for rows.Next() {
			var key, status, hash string
			var st storedNode
			if err := rows.Scan(&key, &status, &hash, &st.stage, &st.description); err != nil {
				rows.Close()
				return err
			}
			st.status, st.outputHash = pipeline.NodeStatus(status), pipeline.OutputID(hash)
			bs.known[pipeline.KeyID(key)] = st
			delete(bs.absent, pipeline.KeyID(key))
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return err
		}
		keys = keys[n:]
	}
	return nil
}

// LookupMany returns the successful nodes among keys, each fully decoded
// and verified as Lookup does, in a few queries (pipeline.BatchLookup).
func (l *Ledger) LookupMany(ctx context.Context, keys []pipeline.KeyID) (map[pipeline.KeyID]pipeline.NodeRecord, error) {
	out := make(map[pipeline.KeyID]pipeline.NodeRecord, len(keys))
	err := l.inReadTx(ctx, func(tx *qtx) error {
		for len(keys) > 0 {
			n := min(len(keys), 500)
			marks := strings.TrimSuffix(strings.Repeat("?, ", n), ", ")
			args := make([]any, n)
			for i, k := range keys[:n] {
				args[i] = string(k)
			}
			rows, err := tx.QueryContext(ctx, "SELECT "+nodeColumns+" FROM nodes n WHERE n.status = 'ok' AND n.key IN ("+marks+")", args...)
			if err != nil {
				return err
			}
			found := map[pipeline.KeyID]*pipeline.NodeRecord{}
			for rows.Next() {
				rec, err := scanNode(rows)
				if err != nil {
					rows.Close()
					return err
				}
				found[rec.Key] = &rec
			}
			rows.Close()
			if err := rows.Err(); err != nil {
				return err
			}
			in, err := tx.QueryContext(ctx, "SELECT key, position, input_key, input_stage, input_output_hash FROM node_inputs WHERE key IN ("+marks+") ORDER BY key, position", args...)
			if err != nil {
				return err
			}
			for in.Next() {
				var key, up, stage, hash string
				var pos int
				if err := in.Scan(&key, &pos, &up, &stage, &hash); err != nil {
					in.Close()
					return err
				}
				rec, ok := found[pipeline.KeyID(key)]
				if !ok {
					continue
				}
				if pos != len(rec.Inputs) {
					in.Close()
					return fmt.Errorf("%w: node %s: input positions skip to %d", ErrIntegrity, key, pos)
				}
				rec.Inputs = append(rec.Inputs, pipeline.InputRef{Stage: stage, Key: pipeline.KeyID(up), Output: pipeline.OutputID(hash)})
			}
			in.Close()
			if err := in.Err(); err != nil {
				return err
			}
			for k, rec := range found {
				if err := checkDescription(*rec, true); err != nil {
					return fmt.Errorf("stored node %s: %w", k, err)
				}
				out[k] = *rec
			}
			keys = keys[n:]
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: look up %d nodes: %w", len(keys), err)
	}
	return out, nil
}

var _ pipeline.BatchLookup = (*Ledger)(nil)
