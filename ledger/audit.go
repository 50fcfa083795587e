package ledger

import (
	"context"
	"errors"
	"fmt"

	"github.com/inflatrace/inflatrace/pipeline"
)

// Problem is one row that no longer matches what was written: a node
// whose key, description, parameters or outputs disagree with its hashes,
// or a run whose configuration text disagrees with its hash.
type Problem struct {
	Table string // "nodes" or "runs"
	ID    string // the node key or run id
	What  string
}

// Audit re-derives every stored hash — each node's key from its
// description, the description from its stage, version, parameters and
// inputs, each output hash from the stored outputs, each run's
// configuration hash from its text, each work's checksum and digest
// (WorkProblems) — and reports the rows edited after they
// were written. It changes nothing.
func (l *Ledger) Audit(ctx context.Context) ([]Problem, error) {
	var out []Problem
	err := l.inTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT id, kp, key FROM node_rows ORDER BY key, id")
		if err != nil {
			return err
		}
		type stored struct {
			id, kp int64
			key    []byte
		}
		var all []stored
		for rows.Next() {
			var r stored
			if err := rows.Scan(&r.id, &r.kp, &r.key); err != nil {
				rows.Close()
				return err
			}
			all = append(all, r)
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return err
		}
		for i, r := range all {
			k := digestText(r.key)
			switch {
			case r.kp != kpOf(r.key):
				// Found by its prefix, the row would be missed.
				out = append(out, Problem{Table: "nodes", ID: k, What: fmt.Sprintf("%v: row %d: the stored key prefix %d is not the key's (%d)", ErrIntegrity, r.id, r.kp, kpOf(r.key))})
			case i > 0 && string(all[i-1].key) == string(r.key):
				out = append(out, Problem{Table: "nodes", ID: k, What: fmt.Sprintf("%v: row %d holds the key of row %d again", ErrIntegrity, r.id, all[i-1].id)})
			}
			if _, err := l.loadRowByID(ctx, tx, r.id); err != nil {
				if !errors.Is(err, ErrIntegrity) {
					return err
				}
				out = append(out, Problem{Table: "nodes", ID: k, What: err.Error()})
			}
		}
		runs, err := tx.QueryContext(ctx, "SELECT id, config_text, config_hash FROM runs ORDER BY id")
		if err != nil {
			return err
		}
		defer runs.Close()
		for runs.Next() {
			var id, text, hash string
			if err := runs.Scan(&id, &text, &hash); err != nil {
				return err
			}
			if got := pipeline.Sum([]byte(text)); got != hash {
				out = append(out, Problem{Table: "runs", ID: id,
					What: fmt.Sprintf("configuration text hashes to %s, row says %s", got, hash)})
			}
		}
		return runs.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: audit: %w", err)
	}
	works, err := l.WorkProblems(ctx)
	if err != nil {
		return nil, err
	}
	return append(out, works...), nil
}
