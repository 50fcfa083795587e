package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"

	"github.com/inflatrace/inflatrace/pipeline"
)

// MarkUnverified records that run's numbers are not vouched for (an import
// accepted unsigned or from an untrusted key), with the reason.
func (l *Ledger) MarkUnverified(ctx context.Context, run pipeline.RunID, reason string) error {
	err := l.inTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, run); err != nil {
			return err
		}
		_, err := tx.ExecContext(ctx, "INSERT INTO unverified_runs (run_id, reason, since) VALUES (?, ?, ?) ON CONFLICT (run_id) DO UPDATE SET reason = excluded.reason, since = excluded.since",
			string(run), reason, formatTime(l.now()))
		return err
	})
	if err != nil {
		return fmt.Errorf("ledger: mark run %s unverified: %w", run, err)
	}
	return nil
}

// Unverified returns why run is not vouched for, if it is not.
func (l *Ledger) Unverified(ctx context.Context, run pipeline.RunID) (string, bool, error) {
	var reason string
	err := l.rdb.QueryRowContext(ctx, "SELECT reason FROM unverified_runs WHERE run_id = ?", string(run)).Scan(&reason)
	if errors.Is(err, sql.ErrNoRows) {
		return "", false, nil
	}
	if err != nil {
		return "", false, fmt.Errorf("ledger: run %s: %w", run, err)
	}
	return reason, true, nil
}

// ClearUnverified removes run's mark (verify RUN recomputed it).
func (l *Ledger) ClearUnverified(ctx context.Context, run pipeline.RunID) error {
	err := l.inTx(ctx, func(tx *qtx) error {
		_, err := tx.ExecContext(ctx, "DELETE FROM unverified_runs WHERE run_id = ?", string(run))
		return err
	})
	if err != nil {
		return fmt.Errorf("ledger: clear run %s: %w", run, err)
	}
	return nil
}
