package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"

	"github.com/inflatrace/inflatrace/pipeline"
)

// SetDerivedFrom records that run was derived from the recorded run from
// (its configuration is from's, edited). Both runs must exist; an unknown
// one wraps ErrNotFound.
func (l *Ledger) SetDerivedFrom(ctx context.Context, run, from pipeline.RunID) error {
	err := l.inTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, from); err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx, "UPDATE runs SET derived_from = ? WHERE id = ?", string(from), string(run))
		if err != nil {
			return err
		}
		if n, err := res.RowsAffected(); err != nil {
			return err
		} else if n == 0 {
			return fmt.Errorf("run %s: %w", run, ErrNotFound)
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("ledger: record run %s as derived from %s: %w", run, from, err)
	}
	return nil
}

// DerivedFrom returns the run that run was derived from, or "" for a run
// of a configuration given directly. An unknown run wraps ErrNotFound.
func (l *Ledger) DerivedFrom(ctx context.Context, run pipeline.RunID) (pipeline.RunID, error) {
	var from sql.NullString
	err := l.inReadTx(ctx, func(tx *qtx) error {
		return tx.QueryRowContext(ctx, "SELECT derived_from FROM runs WHERE id = ?", string(run)).Scan(&from)
	})
	if errors.Is(err, sql.ErrNoRows) {
		err = fmt.Errorf("run %s: %w", run, ErrNotFound)
	}
	if err != nil {
		return "", fmt.Errorf("ledger: read run %s: %w", run, err)
	}
	return pipeline.RunID(from.String), nil
}

// AllDerivedFrom returns, in one query, the run each derived run was
// derived from, keyed by the derived run. Runs of a configuration given
// directly are absent from the map.
func (l *Ledger) AllDerivedFrom(ctx context.Context) (map[pipeline.RunID]pipeline.RunID, error) {
	out := map[pipeline.RunID]pipeline.RunID{}
	err := l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT id, derived_from FROM runs WHERE derived_from IS NOT NULL")
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var id, from string
			if err := rows.Scan(&id, &from); err != nil {
				return err
			}
			out[pipeline.RunID(id)] = pipeline.RunID(from)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: list derived runs: %w", err)
	}
	return out, nil
}

// nullRun is a run reference as a column value: NULL for none.
func nullRun(id pipeline.RunID) any {
	if id == "" {
		return nil
	}
	return string(id)
}

// insertParts records the runs run assembles, in order.
func insertParts(ctx context.Context, tx *qtx, run pipeline.RunID, parts []pipeline.RunID) error {
	for i, p := range parts {
		if _, err := tx.ExecContext(ctx, "INSERT INTO run_parts (run_id, position, part) VALUES (?, ?, ?)", string(run), i, string(p)); err != nil {
			return fmt.Errorf("run %s part %d (%s): %w", run, i, p, err)
		}
	}
	return nil
}

// readParts returns the runs run assembles, in order (nil for none).
func readParts(ctx context.Context, tx *qtx, run pipeline.RunID) ([]pipeline.RunID, error) {
	rows, err := tx.QueryContext(ctx, "SELECT part FROM run_parts WHERE run_id = ? ORDER BY position", string(run))
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []pipeline.RunID
	for rows.Next() {
		var p string
		if err := rows.Scan(&p); err != nil {
			return nil, err
		}
		out = append(out, pipeline.RunID(p))
	}
	return out, rows.Err()
}

// AllParts returns, in one query, the parts of every run that assembles
// others, keyed by the assembling run.
func (l *Ledger) AllParts(ctx context.Context) (map[pipeline.RunID][]pipeline.RunID, error) {
	out := map[pipeline.RunID][]pipeline.RunID{}
	err := l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT run_id, part FROM run_parts ORDER BY run_id, position")
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var id, p string
			if err := rows.Scan(&id, &p); err != nil {
				return err
			}
			out[pipeline.RunID(id)] = append(out[pipeline.RunID(id)], pipeline.RunID(p))
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: list assembled runs: %w", err)
	}
	return out, nil
}
