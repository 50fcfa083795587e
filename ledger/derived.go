package ledger

import (
	"context"
	"fmt"

	"github.com/inflatrace/inflatrace/pipeline"
)

// Kinds of run link (table run_links).
const (
	linkDerivedFrom = "derived_from"
	linkPart        = "part"
)

// DerivedFrom returns the run that run was derived from, or "" for a run
// of a configuration given directly. An unknown run wraps ErrNotFound.
// The run named need not be in this ledger (an imported run names the
// run it was derived from wherever that is).
func (l *Ledger) DerivedFrom(ctx context.Context, run pipeline.RunID) (pipeline.RunID, error) {
	var d RunDetail
	err := l.inReadTx(ctx, func(tx *qtx) error {
		var err error
		d, err = readRun(ctx, tx, run)
		return err
	})
	if err != nil {
		return "", fmt.Errorf("ledger: read run %s: %w", run, err)
	}
	return d.DerivedFrom, nil
}

// AllDerivedFrom returns, in one query, the run each derived run was
// derived from, keyed by the derived run. Runs of a configuration given
// directly are absent from the map.
func (l *Ledger) AllDerivedFrom(ctx context.Context) (map[pipeline.RunID]pipeline.RunID, error) {
	all, err := l.allLinks(ctx, linkDerivedFrom)
	out := map[pipeline.RunID]pipeline.RunID{}
	for id, ls := range all {
		out[id] = ls[0]
	}
	return out, err
}

// AllParts returns, in one query, the parts of every run that assembles
// others, keyed by the assembling run.
func (l *Ledger) AllParts(ctx context.Context) (map[pipeline.RunID][]pipeline.RunID, error) {
	return l.allLinks(ctx, linkPart)
}

func (l *Ledger) allLinks(ctx context.Context, kind string) (map[pipeline.RunID][]pipeline.RunID, error) {
	out := map[pipeline.RunID][]pipeline.RunID{}
	err := l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT run_id, other FROM run_links WHERE kind = ? ORDER BY run_id, position", kind)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var id, other string
			if err := rows.Scan(&id, &other); err != nil {
				return err
			}
			out[pipeline.RunID(id)] = append(out[pipeline.RunID(id)], pipeline.RunID(other))
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: list run links: %w", err)
	}
	return out, nil
}

// insertLinks records where run came from: the run it was derived from
// (none when empty) and the runs it assembles, in order.
func insertLinks(ctx context.Context, tx *qtx, run, from pipeline.RunID, parts []pipeline.RunID) error {
	if from != "" {
		if _, err := tx.ExecContext(ctx, "INSERT INTO run_links (run_id, kind, position, other) VALUES (?, ?, 0, ?)", string(run), linkDerivedFrom, string(from)); err != nil {
			return fmt.Errorf("run %s derived from %s: %w", run, from, err)
		}
	}
	for i, p := range parts {
		if _, err := tx.ExecContext(ctx, "INSERT INTO run_links (run_id, kind, position, other) VALUES (?, ?, ?, ?)", string(run), linkPart, i, string(p)); err != nil {
			return fmt.Errorf("run %s part %d (%s): %w", run, i, p, err)
		}
	}
	return nil
}

// readLinks fills d.DerivedFrom and d.Parts.
func readLinks(ctx context.Context, tx *qtx, d *RunDetail) error {
	rows, err := tx.QueryContext(ctx, "SELECT kind, other FROM run_links WHERE run_id = ? ORDER BY kind, position", string(d.ID))
	if err != nil {
		return err
	}
	defer rows.Close()
	for rows.Next() {
		var kind, other string
		if err := rows.Scan(&kind, &other); err != nil {
			return err
		}
		if kind == linkDerivedFrom {
			d.DerivedFrom = pipeline.RunID(other)
		} else {
			d.Parts = append(d.Parts, pipeline.RunID(other))
		}
	}
	return rows.Err()
}
