package ledger

import (
	"context"
	"database/sql"
	"fmt"

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
		for _, b := range batch {
			if err := l.recordNodeIn(ctx, tx, run, b.Node, b.Action, bs); err != nil {
				return fmt.Errorf("node %s (%s): %w", b.Node.Key, b.Action, err)
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
