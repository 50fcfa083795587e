package ledger

import (
	"context"
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
		for _, b := range batch {
			if err := l.recordNode(ctx, tx, run, b.Node, b.Action); err != nil {
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
