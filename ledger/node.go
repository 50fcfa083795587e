package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// nodeColumns are the columns scanNode reads, from nodeFrom (node_rows n
// with its kind k).
const nodeColumns = "n.id, n.key, k.tool, k.stage, k.stage_version, n.params_shape, n.params, n.description, n.outputs_shape, n.outputs, n.output_hash, n.status, n.error, n.duration_ns, n.mac"

// nodeFrom is the FROM clause nodeColumns are read from.
const nodeFrom = "node_rows n JOIN kinds k ON k.id = n.kind"

type scanner interface{ Scan(dest ...any) error }

// storedRow is a node row as read: the record, plus the row id and the
// columns that only serve to rebuild and check the description.
type storedRow struct {
	id   int64
	tool string
	// derived: the description is not stored and must be rebuilt from the
	// fields once the inputs are known.
	derived bool
	rec     pipeline.NodeRecord
	mac     []byte // the row's authentication code (nil: none)
	// The stored parameters and outputs (pack.go) and status, decoded by
	// unpackRow.
	paramsShape, outputsShape sql.NullInt64
	params, outputs           []byte
	status                    string
}

// stored is what recording the row's reuse needs of it.
func (r storedRow) stored() storedNode {
	return storedNode{id: r.id, status: r.rec.Status, outputHash: r.rec.OutputHash, stage: r.rec.Stage}
}

// scanNode reads nodeColumns (then any extra destinations). The stored
// values are decoded and the outputs checked against their hash by
// unpackRow; the inputs are filled in, and the description rebuilt and
// checked, by finishNode (which unpacks first).
func scanNode(s scanner, extra ...any) (storedRow, error) {
	var (
		row         storedRow
		key, hash   []byte
		description sql.NullString
		durationNS  int64
	)
	rec := &row.rec
	dest := append([]any{&row.id, &key, &row.tool, &rec.Stage, &rec.Version, &row.paramsShape, &row.params, &description,
		&row.outputsShape, &row.outputs, &hash, &row.status, &rec.Error, &durationNS, &row.mac}, extra...)
	if err := s.Scan(dest...); err != nil {
		return row, err
	}
	var err error
	if rec.Key, err = storedKey(key); err != nil {
		return row, fmt.Errorf("node row %d: %w", row.id, err)
	}
	rec.OutputHash = pipeline.OutputID(digestText(hash))
	rec.Status = pipeline.NodeStatus(row.status)
	rec.Duration = time.Duration(durationNS)
	rec.Description, row.derived = description.String, !description.Valid
	return row, nil
}

// unpackRow decodes a scanned row's parameters and outputs, checking the
// outputs against their hash.
func (l *Ledger) unpackRow(ctx context.Context, tx *qtx, row *storedRow) error {
	rec := &row.rec
	if row.params == nil && row.outputs == nil && rec.Params != nil {
		return nil // unpacked already
	}
	params, err := l.valuesText(ctx, tx, row.paramsShape, row.params)
	if err != nil {
		return fmt.Errorf("%w: node %s: stored parameters: %v", ErrIntegrity, rec.Key, err)
	}
	if rec.Params, err = pipeline.DecodeValues([]byte(params)); err != nil {
		return fmt.Errorf("%w: node %s: stored parameters: %v", ErrIntegrity, rec.Key, err)
	}
	switch rec.Status {
	case pipeline.NodeOK:
		outputs, err := l.valuesText(ctx, tx, row.outputsShape, row.outputs)
		if err != nil {
			return fmt.Errorf("%w: node %s: stored outputs: %v", ErrIntegrity, rec.Key, err)
		}
		if got := pipeline.OutputID(pipeline.Sum([]byte(outputs))); got != rec.OutputHash {
			return fmt.Errorf("%w: node %s: stored outputs hash to %s, row says %s", ErrIntegrity, rec.Key, got, rec.OutputHash)
		}
		if rec.Outputs, err = pipeline.DecodeValues([]byte(outputs)); err != nil {
			return fmt.Errorf("%w: node %s: stored outputs: %v", ErrIntegrity, rec.Key, err)
		}
	case pipeline.NodeFailed:
	default:
		return fmt.Errorf("%w: node %s: stored status %q", ErrIntegrity, rec.Key, row.status)
	}
	row.params, row.outputs = nil, nil
	return nil
}

// loadInputs reads the inputs of the given rows (by id) in one query, in
// declared order, checking that each row's positions run 0, 1, 2...
func loadInputs(ctx context.Context, tx *qtx, rows map[int64]*storedRow) error {
	ids := make([]any, 0, len(rows))
	for id, row := range rows {
		ids = append(ids, id)
		row.rec.Inputs = nil
	}
	in, err := tx.QueryContext(ctx, "SELECT ni.node, ni.position, u.key, uk.stage, u.output_hash FROM node_inputs ni JOIN node_rows u ON u.id = ni.input JOIN kinds uk ON uk.id = u.kind"+
		" WHERE ni.node IN ("+marks(len(ids))+") ORDER BY ni.node, ni.position", ids...)
	if err != nil {
		return fmt.Errorf("read inputs: %w", err)
	}
	defer in.Close()
	for in.Next() {
		var (
			node      int64
			pos       int
			key, hash []byte
			stage     string
		)
		if err := in.Scan(&node, &pos, &key, &stage, &hash); err != nil {
			return fmt.Errorf("read inputs: %w", err)
		}
		rec := &rows[node].rec
		if pos != len(rec.Inputs) {
			return fmt.Errorf("%w: node %s: input positions skip from %d to %d", ErrIntegrity, rec.Key, len(rec.Inputs)-1, pos)
		}
		k, err := storedKey(key)
		if err != nil {
			return fmt.Errorf("node %s: input %d: %w", rec.Key, pos, err)
		}
		rec.Inputs = append(rec.Inputs, pipeline.InputRef{Stage: stage, Key: k, Output: pipeline.OutputID(digestText(hash))})
	}
	if err := in.Err(); err != nil {
		return fmt.Errorf("read inputs: %w", err)
	}
	return nil
}

// completeNode loads a scanned node's inputs and finishes it.
func (l *Ledger) completeNode(ctx context.Context, tx *qtx, row *storedRow) error {
	if err := loadInputs(ctx, tx, map[int64]*storedRow{row.id: row}); err != nil {
		return fmt.Errorf("node %s: %w", row.rec.Key, err)
	}
	return l.finishNode(ctx, tx, row)
}

// finishNode rebuilds the description of a row that does not store one
// and checks that the key is its hash; a stored description (a row copied
// from the first layout) is checked against the fields as before. Either
// way a row edited after it was written fails with ErrIntegrity.
func (l *Ledger) finishNode(ctx context.Context, tx *qtx, row *storedRow) error {
	if err := l.unpackRow(ctx, tx, row); err != nil {
		return err
	}
	rec := &row.rec
	if !row.derived {
		if err := checkDescription(*rec, true); err != nil {
			return fmt.Errorf("stored node %s: %w", rec.Key, err)
		}
		return nil
	}
	desc, err := pipeline.Describe(row.tool, rec.Stage, rec.Version, rec.Params, rec.Inputs)
	if err != nil {
		return fmt.Errorf("stored node %s: %w: describe the stored fields: %v", rec.Key, ErrIntegrity, err)
	}
	if got := pipeline.KeyOf(desc); got != rec.Key {
		return fmt.Errorf("stored node %s: %w: the stored fields describe key %s", rec.Key, ErrIntegrity, got)
	}
	rec.Description = desc
	return nil
}

// loadNode reads one node of any status, with its inputs.
func (l *Ledger) loadNode(ctx context.Context, tx *qtx, key pipeline.KeyID) (pipeline.NodeRecord, bool, error) {
	row, found, err := l.loadRow(ctx, tx, key)
	return row.rec, found, err
}

// loadRow is loadNode, keeping the row id.
func (l *Ledger) loadRow(ctx context.Context, tx *qtx, key pipeline.KeyID) (storedRow, bool, error) {
	kb := keyArg(key)
	r := tx.QueryRowContext(ctx, "SELECT "+nodeColumns+" FROM "+nodeFrom+" WHERE n.kp = ? AND n.key = ? ORDER BY n.id LIMIT 1", kpOf(kb), kb)
	row, err := scanNode(r)
	if errors.Is(err, sql.ErrNoRows) {
		return storedRow{}, false, nil
	}
	if err != nil {
		return storedRow{}, false, fmt.Errorf("read node %s: %w", key, err)
	}
	if err := l.completeNode(ctx, tx, &row); err != nil {
		return storedRow{}, false, err
	}
	return row, true, nil
}

// loadRowByID reads one node row of any status by its id, with its inputs.
func (l *Ledger) loadRowByID(ctx context.Context, tx *qtx, id int64) (storedRow, error) {
	row, err := scanNode(tx.QueryRowContext(ctx, "SELECT "+nodeColumns+" FROM "+nodeFrom+" WHERE n.id = ?", id))
	if err != nil {
		return storedRow{}, fmt.Errorf("read node row %d: %w", id, err)
	}
	if err := l.completeNode(ctx, tx, &row); err != nil {
		return storedRow{}, err
	}
	return row, nil
}
