package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// Latest is the run reference ResolveRun reads as the most recently
// started run.
const Latest = "latest"

// newestFirst orders runs by start time, later insertions first on ties.
const newestFirst = "ORDER BY r.started_at DESC, r.rowid DESC"

// Runs lists every run, newest first, with counts of what each did.
func (l *Ledger) Runs(ctx context.Context) ([]RunSummary, error) {
	out := []RunSummary{}
	err := l.inTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, `SELECT r.id, r.started_at, r.finished_at, r.status, r.tool_version, r.config_path, r.config_hash,
			(SELECT count(*) FROM run_node_links rn WHERE rn.run_id = r.id AND rn.action = 'computed') + `+workCount("'c'", "w.actions")+`,
			(SELECT count(*) FROM run_node_links rn WHERE rn.run_id = r.id AND rn.action = 'reused') + `+workCount("'r'", "w.actions")+` +
				(SELECT coalesce(sum(length(w.actions)), 0) FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = r.id AND rw.action = 'reused'),
			(SELECT count(*) FROM run_node_links rn WHERE rn.run_id = r.id AND rn.action = 'failed') + `+workCount("'f'", "w.actions")+`,
			(SELECT count(*) FROM run_result_rows rr WHERE rr.run_id = r.id) +
				(SELECT coalesce(sum(json_array_length(w.results)), 0) FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = r.id)
			FROM runs r `+newestFirst)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var (
				s          RunSummary
				id, status string
				started    string
				finished   sql.NullString
			)
			if err := rows.Scan(&id, &started, &finished, &status, &s.ToolVersion, &s.ConfigPath, &s.ConfigHash,
				&s.Computed, &s.Reused, &s.Failed, &s.Results); err != nil {
				return err
			}
			s.ID, s.Status = pipeline.RunID(id), pipeline.RunStatus(status)
			if s.Started, s.Finished, err = runTimes(started, finished); err != nil {
				return fmt.Errorf("run %s: %w", id, err)
			}
			out = append(out, s)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: list runs: %w", err)
	}
	return out, nil
}

func runTimes(started string, finished sql.NullString) (time.Time, time.Time, error) {
	s, err := parseTime(started)
	if err != nil {
		return time.Time{}, time.Time{}, err
	}
	var f time.Time
	if finished.Valid {
		if f, err = parseTime(finished.String); err != nil {
			return time.Time{}, time.Time{}, err
		}
	}
	return s, f, nil
}

// ResolveRun turns what a user typed into a run id: the word "latest" (the
// most recently started run), a full id, a tag, or a prefix of exactly one
// id. An
// unknown reference wraps ErrNotFound; a prefix of several ids wraps
// ErrAmbiguous and lists them.
func (l *Ledger) ResolveRun(ctx context.Context, ref string) (pipeline.RunID, error) {
	var id pipeline.RunID
	err := l.inTx(ctx, func(tx *qtx) error {
		var err error
		id, err = resolveRun(ctx, tx, ref)
		return err
	})
	if err != nil {
		return "", fmt.Errorf("ledger: resolve run %q: %w", ref, err)
	}
	return id, nil
}

// maxCandidates bounds how many ids an ambiguity error lists.
const maxCandidates = 10

func resolveRun(ctx context.Context, tx *qtx, ref string) (pipeline.RunID, error) {
	if ref == "" {
		return "", errors.New("empty run reference")
	}
	var id string
	if ref == Latest {
		err := tx.QueryRowContext(ctx, "SELECT r.id FROM runs r "+newestFirst+" LIMIT 1").Scan(&id)
		if errors.Is(err, sql.ErrNoRows) {
			return "", fmt.Errorf("no runs recorded: %w", ErrNotFound)
		}
		return pipeline.RunID(id), err
	}
	err := tx.QueryRowContext(ctx, "SELECT id FROM runs WHERE id = ?", ref).Scan(&id)
	if err == nil {
		return pipeline.RunID(id), nil
	}
	if !errors.Is(err, sql.ErrNoRows) {
		return "", err
	}
	if tagged, ok, err := taggedRun(ctx, tx, ref); err != nil || ok {
		return tagged, err
	}
	rows, err := tx.QueryContext(ctx, "SELECT r.id FROM runs r WHERE substr(r.id, 1, length(?1)) = ?1 "+newestFirst, ref)
	if err != nil {
		return "", err
	}
	defer rows.Close()
	var ids []string
	for rows.Next() {
		if err := rows.Scan(&id); err != nil {
			return "", err
		}
		ids = append(ids, id)
	}
	if err := rows.Err(); err != nil {
		return "", err
	}
	switch len(ids) {
	case 0:
		return "", fmt.Errorf("no run has id or id prefix %q: %w", ref, ErrNotFound)
	case 1:
		return pipeline.RunID(ids[0]), nil
	}
	shown := ids
	more := ""
	if len(ids) > maxCandidates {
		shown = ids[:maxCandidates]
		more = fmt.Sprintf(" and %d more", len(ids)-maxCandidates)
	}
	return "", fmt.Errorf("%w: prefix %q matches %d runs: %s%s", ErrAmbiguous, ref, len(ids), strings.Join(shown, ", "), more)
}

// Run returns the recorded description and state of one run. An unknown id
// wraps ErrNotFound.
func (l *Ledger) Run(ctx context.Context, id pipeline.RunID) (RunDetail, error) {
	var d RunDetail
	err := l.inTx(ctx, func(tx *qtx) error {
		var err error
		d, err = readRun(ctx, tx, id)
		return err
	})
	if err != nil {
		return RunDetail{}, fmt.Errorf("ledger: read run %s: %w", id, err)
	}
	return d, nil
}

func readRun(ctx context.Context, tx *qtx, id pipeline.RunID) (RunDetail, error) {
	var (
		d        RunDetail
		rid      string
		status   string
		started  string
		finished sql.NullString
	)
	var seal, sealSig sql.NullString
	err := tx.QueryRowContext(ctx, `SELECT id, started_at, finished_at, status, error, tool_version, config_path, config_text, config_hash, seal, seal_signature
		FROM runs WHERE id = ?`, string(id)).
		Scan(&rid, &started, &finished, &status, &d.Error, &d.ToolVersion, &d.ConfigPath, &d.ConfigText, &d.ConfigHash, &seal, &sealSig)
	d.Seal, d.SealSignature = seal.String, sealSig.String
	if errors.Is(err, sql.ErrNoRows) {
		return RunDetail{}, fmt.Errorf("run %s: %w", id, ErrNotFound)
	}
	if err != nil {
		return RunDetail{}, err
	}
	d.ID, d.Status = pipeline.RunID(rid), pipeline.RunStatus(status)
	if d.Started, d.Finished, err = runTimes(started, finished); err != nil {
		return RunDetail{}, err
	}
	if err := readLinks(ctx, tx, &d); err != nil {
		return RunDetail{}, err
	}
	return d, nil
}

// RunNodes returns the nodes a run touched, in the order it touched them,
// each with what the run did. An unknown run wraps ErrNotFound.
func (l *Ledger) RunNodes(ctx context.Context, id pipeline.RunID) ([]RunNode, error) {
	return l.runNodesIn(ctx, id, "run_nodes")
}

// runNodesIn is RunNodes reading table: the run_nodes view (every layout)
// or run_node_links (the per-node links alone).
func (l *Ledger) runNodesIn(ctx context.Context, id pipeline.RunID, table string) ([]RunNode, error) {
	out := []RunNode{}
	err := l.inTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, id); err != nil {
			return err
		}
		rows, err := tx.QueryContext(ctx, "SELECT "+nodeColumns+`, rn.ordinal, rn.action, rn.duration_ns, rn.error
			FROM `+table+` rn JOIN node_rows n ON n.id = rn.node JOIN kinds k ON k.id = n.kind WHERE rn.run_id = ? ORDER BY rn.ordinal`, string(id))
		if err != nil {
			return err
		}
		defer rows.Close()
		var stored []storedRow
		for rows.Next() {
			var (
				rn         RunNode
				action     string
				durationNS int64
			)
			row, err := scanNode(rows, &rn.Ordinal, &action, &durationNS, &rn.RunError)
			if err != nil {
				return err
			}
			rn.Action, rn.RunDuration = pipeline.Action(action), time.Duration(durationNS)
			out = append(out, rn)
			stored = append(stored, row)
		}
		if err := rows.Err(); err != nil {
			return err
		}
		rows.Close()
		// Inputs 500 nodes a query (a query a node made show of a large
		// scan take minutes).
		for lo := 0; lo < len(stored); lo += 500 {
			part := map[int64]*storedRow{}
			for i := lo; i < min(lo+500, len(stored)); i++ {
				if _, dup := part[stored[i].id]; !dup {
					part[stored[i].id] = &stored[i]
				}
			}
			if err := loadInputs(ctx, tx, part); err != nil {
				return err
			}
			for i := lo; i < min(lo+500, len(stored)); i++ {
				// A node a run linked twice (a point met in two works).
				stored[i].rec.Inputs = part[stored[i].id].rec.Inputs
				if err := l.finishNode(ctx, tx, &stored[i]); err != nil {
					return err
				}
				out[i].NodeRecord = stored[i].rec
			}
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: nodes of run %s: %w", id, err)
	}
	return out, nil
}

// RunResults returns a run's labelled results in ordinal order. An unknown
// run wraps ErrNotFound.
func (l *Ledger) RunResults(ctx context.Context, id pipeline.RunID) ([]pipeline.ResultRef, error) {
	return l.runResultsIn(ctx, id, "run_results")
}

// runResultsIn is RunResults reading table: the run_results view or
// run_result_rows.
func (l *Ledger) runResultsIn(ctx context.Context, id pipeline.RunID, table string) ([]pipeline.ResultRef, error) {
	out := []pipeline.ResultRef{}
	err := l.inTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, id); err != nil {
			return err
		}
		rows, err := tx.QueryContext(ctx, "SELECT rr.ordinal, rr.label, n.key FROM "+table+" rr JOIN node_rows n ON n.id = rr.node WHERE rr.run_id = ? ORDER BY rr.ordinal", string(id))
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var (
				r   pipeline.ResultRef
				key []byte
				err error
			)
			if err := rows.Scan(&r.Ordinal, &r.Label, &key); err != nil {
				return err
			}
			if r.Key, err = storedKey(key); err != nil {
				return err
			}
			out = append(out, r)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: results of run %s: %w", id, err)
	}
	return out, nil
}

// Node returns the stored node with this key, whatever its status, and
// whether there is one.
func (l *Ledger) Node(ctx context.Context, key pipeline.KeyID) (pipeline.NodeRecord, bool, error) {
	var (
		rec   pipeline.NodeRecord
		found bool
	)
	// A read: on the reader connections, not through the writer's lock.
	err := l.inReadTx(ctx, func(tx *qtx) error {
		var err error
		rec, found, err = l.loadNode(ctx, tx, key)
		return err
	})
	if err != nil {
		return pipeline.NodeRecord{}, false, fmt.Errorf("ledger: read node %s: %w", key, err)
	}
	return rec, found, nil
}

// maxLineageDepth bounds the upstream walk. Keys chain on upstream outputs,
// so node_inputs cannot hold a cycle unless the file was edited by hand;
// the bound turns that case into an error instead of an endless query.
const maxLineageDepth = 1000

// Lineage returns the node with this key and every node upstream of it,
// each once, upstream first: every node comes after all of its inputs, and
// the node itself is last. Ties are broken by key, so the order is
// deterministic. An unknown key wraps ErrNotFound.
func (l *Ledger) Lineage(ctx context.Context, key pipeline.KeyID) ([]pipeline.NodeRecord, error) {
	var out []pipeline.NodeRecord
	err := l.inTx(ctx, func(tx *qtx) error {
		var top int64
		kb := keyArg(key)
		err := tx.QueryRowContext(ctx, "SELECT min(id) FROM node_rows WHERE kp = ? AND key = ? HAVING count(*) > 0", kpOf(kb), kb).Scan(&top)
		if errors.Is(err, sql.ErrNoRows) {
			return fmt.Errorf("node %s: %w", key, ErrNotFound)
		}
		if err != nil {
			return err
		}
		// A node's longest path from the root is longer than that of any
		// node it feeds, so sorting by it, longest first, puts every input
		// before its consumers.
		rows, err := tx.QueryContext(ctx, `WITH RECURSIVE up(id, depth) AS (
				SELECT ?1, 0
				UNION
				SELECT ni.input, up.depth + 1 FROM node_inputs ni JOIN up ON ni.node = up.id
				WHERE up.depth < ?2
			)
			SELECT `+nodeColumns+`, max(up.depth) AS d FROM up JOIN node_rows n ON n.id = up.id JOIN kinds k ON k.id = n.kind
			GROUP BY up.id ORDER BY d DESC, n.key`, top, maxLineageDepth)
		if err != nil {
			return err
		}
		defer rows.Close()
		var stored []storedRow
		for rows.Next() {
			var depth int
			row, err := scanNode(rows, &depth)
			if err != nil {
				return err
			}
			if depth >= maxLineageDepth {
				return fmt.Errorf("%w: lineage deeper than %d nodes: node_inputs holds a cycle", ErrIntegrity, maxLineageDepth)
			}
			stored = append(stored, row)
		}
		if err := rows.Err(); err != nil {
			return err
		}
		rows.Close()
		for i := range stored {
			if err := l.completeNode(ctx, tx, &stored[i]); err != nil {
				return err
			}
			out = append(out, stored[i].rec)
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: lineage of %s: %w", key, err)
	}
	return out, nil
}

// ResolveKey turns a node key or a unique prefix of one (with or without
// the "sha256:" prefix, at least 6 hex digits) into a key.
func (l *Ledger) ResolveKey(ctx context.Context, ref string) (pipeline.KeyID, error) {
	hexPart := strings.TrimPrefix(ref, pipeline.HashPrefix)
	if len(hexPart) < 6 {
		return "", fmt.Errorf("ledger: node key %q: give at least 6 hex digits", ref)
	}
	full := pipeline.HashPrefix + hexPart
	lo, hi, err := keyRange(hexPart)
	if err != nil {
		return "", fmt.Errorf("ledger: node key %q: %v", ref, err)
	}
	var keys []string
	err = l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT DISTINCT key FROM node_rows WHERE kp BETWEEN ? AND ? AND key BETWEEN ? AND ? ORDER BY key LIMIT 11", kpOf(lo), kpOf(hi), lo, hi)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var k []byte
			if err := rows.Scan(&k); err != nil {
				return err
			}
			keys = append(keys, digestText(k))
		}
		return rows.Err()
	})
	switch {
	case err != nil:
		return "", fmt.Errorf("ledger: resolve key %q: %w", ref, err)
	case len(keys) == 0:
		return "", fmt.Errorf("ledger: no node key starts with %q: %w", full, ErrNotFound)
	case len(keys) > 1:
		return "", fmt.Errorf("ledger: %w: %q matches %d keys", ErrAmbiguous, full, len(keys))
	}
	return pipeline.KeyID(keys[0]), nil
}

// NodeHead is a node's stage, stage version and parameters: what a
// comparison of two runs' assumptions reads of each node.
type NodeHead struct {
	Stage   string
	Version int
	Params  pipeline.Values
}

// RunNodeHeads lists the stage, version and parameters of every node run
// id linked, in the order it touched them, in one query: none of the
// outputs, inputs or description checks of RunNodes (verify does those).
func (l *Ledger) RunNodeHeads(ctx context.Context, id pipeline.RunID) ([]NodeHead, error) {
	var out []NodeHead
	err := l.inReadTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, id); err != nil {
			return err
		}
		rows, err := tx.QueryContext(ctx, `SELECT k.stage, k.stage_version, n.params_shape, n.params
			FROM run_nodes rn JOIN node_rows n ON n.id = rn.node JOIN kinds k ON k.id = n.kind WHERE rn.run_id = ? ORDER BY rn.ordinal`, string(id))
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var h NodeHead
			var shape sql.NullInt64
			var raw []byte
			if err := rows.Scan(&h.Stage, &h.Version, &shape, &raw); err != nil {
				return err
			}
			params, err := l.valuesText(ctx, tx, shape, raw)
			if err == nil {
				h.Params, err = pipeline.DecodeValues([]byte(params))
			}
			if err != nil {
				return fmt.Errorf("%w: a node of run %s: stored parameters: %v", ErrIntegrity, id, err)
			}
			out = append(out, h)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: nodes of run %s: %w", id, err)
	}
	return out, nil
}

// RunStageParams returns the distinct parameter sets of the nodes of one
// stage that run id linked, in the order the run first touched them (the
// constraint sets a run's comparisons used, say), in one query.
func (l *Ledger) RunStageParams(ctx context.Context, id pipeline.RunID, stage string) ([]pipeline.Values, error) {
	var out []pipeline.Values
	err := l.inReadTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, id); err != nil {
			return err
		}
		rows, err := tx.QueryContext(ctx, `SELECT n.params_shape, n.params, min(rn.ordinal) AS first FROM run_nodes rn JOIN node_rows n ON n.id = rn.node JOIN kinds k ON k.id = n.kind
			WHERE rn.run_id = ? AND k.stage = ? GROUP BY n.params_shape, n.params ORDER BY first`, string(id), stage)
		if err != nil {
			return err
		}
		defer rows.Close()
		seen := map[string]bool{} // a set stored as text and packed is one set
		for rows.Next() {
			var shape sql.NullInt64
			var raw []byte
			var first int
			if err := rows.Scan(&shape, &raw, &first); err != nil {
				return err
			}
			params, err := l.valuesText(ctx, tx, shape, raw)
			if err != nil {
				return fmt.Errorf("a %s node of run %s: stored parameters: %w", stage, id, err)
			}
			if seen[params] {
				continue
			}
			seen[params] = true
			vs, err := pipeline.DecodeValues([]byte(params))
			if err != nil {
				return fmt.Errorf("%w: a %s node of run %s: stored parameters: %v", ErrIntegrity, stage, id, err)
			}
			out = append(out, vs)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: %s nodes of run %s: %w", stage, id, err)
	}
	return out, nil
}

// workCount is the SQL for how many nodes of a run's computed works have
// the action letter (a quoted SQL literal) in their actions.
func workCount(letter, col string) string {
	return "(SELECT coalesce(sum(length(" + col + ") - length(replace(" + col + ", " + letter + ", ''))), 0) FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = r.id AND rw.action = 'computed')"
}
