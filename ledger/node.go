package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// nodeColumns are the columns scanNode reads, from table alias n.
const nodeColumns = "n.key, n.stage, n.stage_version, n.params, n.description, n.outputs, n.output_hash, n.status, n.error, n.duration_ns"

type scanner interface{ Scan(dest ...any) error }

// scanNode reads nodeColumns (then any extra destinations) into a record
// and decodes its values. The inputs are filled in by completeNode.
func scanNode(s scanner, extra ...any) (pipeline.NodeRecord, error) {
	var (
		rec             pipeline.NodeRecord
		key, hash       string
		params, outputs string
		status          string
		durationNS      int64
	)
	dest := append([]any{&key, &rec.Stage, &rec.Version, &params, &rec.Description, &outputs, &hash, &status, &rec.Error, &durationNS}, extra...)
	if err := s.Scan(dest...); err != nil {
		return rec, err
	}
	rec.Key = pipeline.KeyID(key)
	rec.OutputHash = pipeline.OutputID(hash)
	rec.Status = pipeline.NodeStatus(status)
	rec.Duration = time.Duration(durationNS)
	var err error
	if rec.Params, err = pipeline.DecodeValues([]byte(params)); err != nil {
		return rec, fmt.Errorf("%w: node %s: stored parameters: %v", ErrIntegrity, rec.Key, err)
	}
	switch rec.Status {
	case pipeline.NodeOK:
		if got := pipeline.OutputID(pipeline.Sum([]byte(outputs))); got != rec.OutputHash {
			return rec, fmt.Errorf("%w: node %s: stored outputs hash to %s, row says %s", ErrIntegrity, rec.Key, got, rec.OutputHash)
		}
		if rec.Outputs, err = pipeline.DecodeValues([]byte(outputs)); err != nil {
			return rec, fmt.Errorf("%w: node %s: stored outputs: %v", ErrIntegrity, rec.Key, err)
		}
	case pipeline.NodeFailed:
	default:
		return rec, fmt.Errorf("%w: node %s: stored status %q", ErrIntegrity, rec.Key, status)
	}
	return rec, nil
}

// completeNode loads a scanned node's inputs and checks that the stored
// description is still the one its key and fields say.
func completeNode(ctx context.Context, tx *qtx, rec *pipeline.NodeRecord) error {
	rows, err := tx.QueryContext(ctx,
		"SELECT position, input_key, input_stage, input_output_hash FROM node_inputs WHERE key = ? ORDER BY position", string(rec.Key))
	if err != nil {
		return fmt.Errorf("node %s: read inputs: %w", rec.Key, err)
	}
	defer rows.Close()
	rec.Inputs = nil
	for rows.Next() {
		var (
			pos              int
			key, stage, hash string
		)
		if err := rows.Scan(&pos, &key, &stage, &hash); err != nil {
			return fmt.Errorf("node %s: read inputs: %w", rec.Key, err)
		}
		if pos != len(rec.Inputs) {
			return fmt.Errorf("%w: node %s: input positions skip from %d to %d", ErrIntegrity, rec.Key, len(rec.Inputs)-1, pos)
		}
		rec.Inputs = append(rec.Inputs, pipeline.InputRef{Stage: stage, Key: pipeline.KeyID(key), Output: pipeline.OutputID(hash)})
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("node %s: read inputs: %w", rec.Key, err)
	}
	if err := checkDescription(*rec, true); err != nil {
		return fmt.Errorf("stored node %s: %w", rec.Key, err)
	}
	return nil
}

// loadNode reads one node of any status, with its inputs.
func loadNode(ctx context.Context, tx *qtx, key pipeline.KeyID) (pipeline.NodeRecord, bool, error) {
	row := tx.QueryRowContext(ctx, "SELECT "+nodeColumns+" FROM nodes n WHERE n.key = ?", string(key))
	rec, err := scanNode(row)
	if errors.Is(err, sql.ErrNoRows) {
		return pipeline.NodeRecord{}, false, nil
	}
	if err != nil {
		return pipeline.NodeRecord{}, false, fmt.Errorf("read node %s: %w", key, err)
	}
	if err := completeNode(ctx, tx, &rec); err != nil {
		return pipeline.NodeRecord{}, false, err
	}
	return rec, true, nil
}
