package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"strings"
	"sync"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// BeginRun records a run as running. The run id must be new, and
// info.ConfigHash must be the prefixed SHA-256 of info.ConfigText.
func (l *Ledger) BeginRun(ctx context.Context, info pipeline.RunInfo) error {
	if err := l.beginRun(ctx, info); err != nil {
		return fmt.Errorf("ledger: begin run %s: %w", info.ID, err)
	}
	return nil
}

func (l *Ledger) beginRun(ctx context.Context, info pipeline.RunInfo) error {
	if info.ID == "" || strings.TrimSpace(string(info.ID)) != string(info.ID) {
		return fmt.Errorf("run id %q is empty or has surrounding space", info.ID)
	}
	if info.Started.IsZero() {
		return errors.New("start time is zero")
	}
	if want := pipeline.Sum([]byte(info.ConfigText)); info.ConfigHash != want {
		return fmt.Errorf("%w: config hash: expected %s (hash of the configuration text), found %s", ErrIntegrity, want, info.ConfigHash)
	}
	return l.inTx(ctx, func(tx *qtx) error {
		var n int
		if err := tx.QueryRowContext(ctx, "SELECT count(*) FROM runs WHERE id = ?", string(info.ID)).Scan(&n); err != nil {
			return err
		}
		if n > 0 {
			return fmt.Errorf("run %s already exists", info.ID)
		}
		for _, ref := range append([]pipeline.RunID{info.DerivedFrom}, info.Parts...) {
			if ref == "" {
				continue
			}
			if _, err := readRun(ctx, tx, ref); err != nil {
				return err
			}
		}
		_, err := tx.ExecContext(ctx, `INSERT INTO runs
			(id, started_at, tool_version, config_path, config_text, config_hash, status, owner, heartbeat_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
			string(info.ID), formatTime(info.Started), info.ToolVersion, info.ConfigPath, info.ConfigText, info.ConfigHash,
			string(pipeline.RunRunning), info.Owner, formatTime(l.now()))
		if err != nil {
			return err
		}
		return insertLinks(ctx, tx, info.ID, info.DerivedFrom, info.Parts)
	})
}

// Lookup returns the successful node with this key, if recorded, fully
// decoded. Failed nodes are not results and are never returned. A stored
// row that no longer matches its hashes is an error wrapping ErrIntegrity,
// never a hit.
func (l *Ledger) Lookup(ctx context.Context, key pipeline.KeyID) (pipeline.NodeRecord, bool, error) {
	var (
		row   storedRow
		found bool
	)
	err := l.inReadTx(ctx, func(tx *qtx) error {
		var err error
		row, found, err = l.loadRow(ctx, tx, key)
		if errors.Is(err, ErrIntegrity) {
			// Never served: computed again, and the row rewritten.
			l.suspect.put(key, err.Error())
			found, err = false, nil
		}
		if found && row.rec.Status == pipeline.NodeOK {
			if p := l.macProblem(row.rec, row.mac); p != "" {
				l.suspect.put(key, p)
				found = false
			}
		}
		return err
	})
	if err != nil {
		return pipeline.NodeRecord{}, false, fmt.Errorf("ledger: read node %s: %w", key, err)
	}
	if !found || row.rec.Status != pipeline.NodeOK {
		return pipeline.NodeRecord{}, false, nil
	}
	l.seen.put(key, row.stored())
	return row.rec, true, nil
}

// RecordNode stores what run did with a node, in one transaction.
//
// Computed: the record is verified (key, description, output hash) and
// stored as an ok node with its inputs, each of which must be an ok node
// whose output hash is the one the record names. If the key is already ok,
// the output hash must be the same (else the call fails with "conflicting
// outputs") and the row is not written again; a failed row with the key is
// replaced.
//
// Failed: the failure is stored as a failed node row (inserted, or updated
// if the row is already failed). An ok row is never turned into a failed
// one; the failure is then recorded against the run only.
//
// Reused: the node must already be stored as ok; only the run's link is
// written. rec.Duration is stored as the time this run spent on it.
//
// In every case the run must be running and must not have touched the key
// before.
func (l *Ledger) RecordNode(ctx context.Context, run pipeline.RunID, rec pipeline.NodeRecord, action pipeline.Action) error {
	text, err := checkRecord(rec, action, nil, &l.shapes)
	if err == nil {
		err = l.inTx(ctx, func(tx *qtx) error { return l.recordNodeIn(ctx, tx, run, rec, text, action, nil) })
	}
	if err != nil {
		return fmt.Errorf("ledger: record %s node %s in run %s: %w", action, rec.Key, run, err)
	}
	return nil
}

// storedNode is the part of a node row RecordNode decides on.
type storedNode struct {
	id         int64
	status     pipeline.NodeStatus
	outputHash pipeline.OutputID
	// What the key was described from: the tool, stage, version and
	// parameters text, or the stored description of a first-layout row.
	stage, tool, params string
	version             int
	description         sql.NullString
	// packedParams, when paramsShape is set, are the stored parameters
	// not yet unpacked into params (storedParams does).
	paramsShape  sql.NullInt64
	packedParams []byte
}

// storedParams is the canonical text of the row's stored parameters.
func (l *Ledger) storedParams(ctx context.Context, tx *qtx, s storedNode) (string, error) {
	if !s.paramsShape.Valid {
		return s.params, nil
	}
	t, err := l.valuesText(ctx, tx, s.paramsShape, s.packedParams)
	if err != nil {
		return "", fmt.Errorf("%w: stored parameters: %v", ErrIntegrity, err)
	}
	return t, nil
}

// storedColumns are the columns scanStored reads, from nodeFrom.
const storedColumns = "n.id, n.status, n.output_hash, k.stage, k.tool, k.stage_version, n.params_shape, n.params, n.description"

func scanStored(s scanner, extra ...any) (storedNode, error) {
	var st storedNode
	var status string
	var hash, params []byte
	if err := s.Scan(append([]any{&st.id, &status, &hash, &st.stage, &st.tool, &st.version, &st.paramsShape, &params, &st.description}, extra...)...); err != nil {
		return st, err
	}
	if st.paramsShape.Valid {
		st.packedParams = params
	} else {
		st.params = string(params)
	}
	st.status, st.outputHash = pipeline.NodeStatus(status), pipeline.OutputID(digestText(hash))
	return st, nil
}

func readStored(ctx context.Context, tx *qtx, key pipeline.KeyID) (storedNode, bool, error) {
	kb := keyArg(key)
	s, err := scanStored(tx.QueryRowContext(ctx, "SELECT "+storedColumns+" FROM "+nodeFrom+" WHERE n.kp = ? AND n.key = ? ORDER BY n.id LIMIT 1", kpOf(kb), kb))
	if errors.Is(err, sql.ErrNoRows) {
		return s, false, nil
	}
	if err != nil {
		return s, false, fmt.Errorf("read node %s: %w", key, err)
	}
	return s, true, nil
}

// sameDescription says whether a stored row describes the record (a
// genuine one, checked by checkRecord): equal keys with different fields
// mean the row was edited, or a hash collision.
func (l *Ledger) sameDescription(ctx context.Context, tx *qtx, s storedNode, rec pipeline.NodeRecord, params string) error {
	if s.description.Valid {
		if s.description.String != rec.Description {
			return fmt.Errorf("%w: the stored description for this key differs: %s", ErrIntegrity, firstDifference(s.description.String, rec.Description))
		}
		return nil
	}
	tool, _ := describedTool(rec.Description)
	stored, err := l.storedParams(ctx, tx, s)
	if err != nil {
		return err
	}
	for _, f := range []struct{ what, stored, here string }{
		{"tool", s.tool, tool}, {"stage", s.stage, rec.Stage},
		{"stage version", fmt.Sprint(s.version), fmt.Sprint(rec.Version)}, {"parameters", stored, params},
	} {
		if f.stored != f.here {
			return fmt.Errorf("%w: the stored %s for this key differs: expected %q, found %q", ErrIntegrity, f.what, f.stored, f.here)
		}
	}
	return nil
}

// batchState carries what a batch of RecordNodes already knows: that the
// run is running, the next ordinal and node id, and the nodes it stored
// (so their consumers need not read them back).
type batchState struct {
	ordinal int
	nextID  int64
	now     string // the batch's recorded_at (works)
	nowUnix int64  // the same in Unix seconds (node rows)
	known   map[pipeline.KeyID]storedNode
	noLink  bool                    // the node being recorded belongs to a work: no link of its own
	healed  []pipeline.KeyID        // suspect rows rewritten in this batch
	absent  map[pipeline.KeyID]bool // keys known not to be stored
	wrote   []pipeline.KeyID        // keys of the node rows queued
	// Rows to insert at the end of the batch, many per statement.
	nodeRows, inputRows, linkRows [][]any
}

// recordNodeIn records one node (RecordNode) inside tx; text is its row
// text from checkRecord. In a batch (bs set) the rows are queued.
func (l *Ledger) recordNodeIn(ctx context.Context, tx *qtx, run pipeline.RunID, rec pipeline.NodeRecord, text rowText, action pipeline.Action, bs *batchState) error {
	if bs == nil {
		if err := requireRunning(ctx, tx, run); err != nil {
			return err
		}
	}
	old, exists, err := readStoredIn(ctx, tx, rec.Key, bs)
	if err != nil {
		return err
	}
	// A row a look-up found edited is not compared with what replaces it.
	suspect := ""
	if action == pipeline.Computed && exists && old.status == pipeline.NodeOK {
		// Kept until the write commits (a batch may be written twice).
		suspect, _ = l.suspect.get(rec.Key)
	}
	if action != pipeline.Reused && exists && suspect == "" {
		if err := l.sameDescription(ctx, tx, old, rec, text.params); err != nil {
			return err
		}
	}
	runErr := ""
	id := old.id
	switch action {
	case pipeline.Computed:
		switch {
		case !exists:
			if id, err = l.insertNodeIn(ctx, tx, rec, text, bs); err != nil {
				return err
			}
		case old.status == pipeline.NodeOK:
			if suspect != "" && strings.HasPrefix(suspect, unvouched) && old.outputHash == rec.OutputHash {
				// Computed again as recorded: the row earns this user's code.
				if _, err := tx.ExecContext(ctx, "UPDATE node_rows SET mac = ? WHERE id = ?", l.macOf(rec.Key, rec.Status, rec.OutputHash), old.id); err != nil {
					return err
				}
				if bs != nil {
					bs.healed = append(bs.healed, rec.Key)
				}
				break
			}
			if suspect != "" {
				// A look-up found the row edited: keep it as found, and
				// rewrite it with what this run computed.
				if err := l.quarantine(ctx, tx, run, old.id, rec, text, suspect); err != nil {
					return err
				}
				if bs != nil {
					bs.healed = append(bs.healed, rec.Key)
					old.outputHash, old.params, old.version, old.stage = rec.OutputHash, text.params, rec.Version, rec.Stage
					old.paramsShape, old.packedParams = sql.NullInt64{}, nil
					old.tool, _ = describedTool(rec.Description)
					old.description = sql.NullString{}
					bs.known[rec.Key] = old
				}
				break
			}
			if old.outputHash != rec.OutputHash {
				return fmt.Errorf("%w: conflicting outputs for key %s: the ledger holds %s, this computation produced %s (is the stage deterministic, and was its version bumped when its numerics changed?)",
					ErrIntegrity, rec.Key, old.outputHash, rec.OutputHash)
			}
		default: // failed before, ok now
			if err := l.updateNode(ctx, tx, rec, text); err != nil {
				return err
			}
		}
	case pipeline.Failed:
		runErr = rec.Error
		switch {
		case !exists:
			if id, err = l.insertNodeIn(ctx, tx, rec, text, bs); err != nil {
				return err
			}
		case old.status == pipeline.NodeFailed:
			if err := l.updateNode(ctx, tx, rec, text); err != nil {
				return err
			}
		}
		// An ok row stays ok: the failure is this run's alone.
	case pipeline.Reused:
		if !exists {
			return fmt.Errorf("node %s: %w (a reused node must already be in the ledger)", rec.Key, ErrNotFound)
		}
		if old.status != pipeline.NodeOK {
			return fmt.Errorf("node %s is recorded as %s and cannot be reused", rec.Key, old.status)
		}
		if rec.OutputHash != "" && rec.OutputHash != old.outputHash {
			return fmt.Errorf("%w: reused node output hash: expected %s (as stored), found %s", ErrIntegrity, old.outputHash, rec.OutputHash)
		}
	}
	if bs != nil {
		if action == pipeline.Computed && exists && old.status != pipeline.NodeOK {
			old.status, old.outputHash = pipeline.NodeOK, rec.OutputHash
			bs.known[rec.Key] = old
		}
		if bs.noLink {
			return nil
		}
		// A second link of the node in this run fails on the unique
		// constraint when the rows are inserted.
		bs.linkRows = append(bs.linkRows, []any{string(run), bs.ordinal, id, string(action), int64(rec.Duration), runErr})
		bs.ordinal++
		return nil
	}
	return insertRunNode(ctx, tx, run, rec.Key, id, action, rec.Duration, runErr)
}

// readStoredIn is readStored, answered from the batch when it stored the
// node itself or has read it already.
func readStoredIn(ctx context.Context, tx *qtx, key pipeline.KeyID, bs *batchState) (storedNode, bool, error) {
	if bs != nil {
		if s, ok := bs.known[key]; ok {
			return s, true, nil
		}
		if bs.absent[key] {
			return storedNode{}, false, nil
		}
	}
	return readStored(ctx, tx, key)
}

// requireRunning fails unless run exists and is still running.
func requireRunning(ctx context.Context, tx *qtx, run pipeline.RunID) error {
	var status string
	err := tx.QueryRowContext(ctx, "SELECT status FROM runs WHERE id = ?", string(run)).Scan(&status)
	if errors.Is(err, sql.ErrNoRows) {
		return fmt.Errorf("run %s: %w", run, ErrNotFound)
	}
	if err != nil {
		return fmt.Errorf("read run %s: %w", run, err)
	}
	if pipeline.RunStatus(status) != pipeline.RunRunning {
		return fmt.Errorf("run %s is already finished (%s)", run, status)
	}
	return nil
}

// rowText is the canonical text of a record's parameters and outputs, and
// the two packed as they are stored (pack.go; no outputs for a failed
// node).
type rowText struct {
	params, outputs             string
	packedParams, packedOutputs packed
	mac                         []byte // the node's code, when checkBatch computed it
}

// rowValues returns the canonical text of a record's parameters and
// outputs, and their packed form.
func rowValues(rec pipeline.NodeRecord) (rowText, error) {
	p, err := rec.Params.Encode()
	if err != nil {
		return rowText{}, fmt.Errorf("parameters: %w", err)
	}
	o, err := rec.Outputs.Encode()
	if err != nil {
		return rowText{}, fmt.Errorf("outputs: %w", err)
	}
	t := rowText{params: string(p), outputs: string(o)}
	return t, t.pack(rec, nil)
}

// pack fills in the packed forms of t's values, checking that t.params is
// the canonical text of rec.Params (the outputs text is checked against
// the output hash), and resolving the shapes book holds (book may be nil).
func (t *rowText) pack(rec pipeline.NodeRecord, book *shapeBook) error {
	var err error
	if t.packedParams, err = packText(t.params, rec.Params, true, book); err != nil {
		return fmt.Errorf("%w: description does not match the record's stage, version, parameters and inputs: parameters: %v", ErrIntegrity, err)
	}
	if rec.Status == pipeline.NodeOK {
		if t.packedOutputs, err = packText(t.outputs, rec.Outputs, false, book); err != nil {
			return fmt.Errorf("outputs: %w", err)
		}
	}
	return nil
}

// storedValues are the params_shape, params, outputs_shape and outputs
// columns of a record (text: rowValues).
func (l *Ledger) storedValues(ctx context.Context, tx *qtx, rec pipeline.NodeRecord, text rowText) ([]any, error) {
	ps, pb, err := l.packedColumns(ctx, tx, text.packedParams)
	if err != nil {
		return nil, err
	}
	if rec.Status != pipeline.NodeOK {
		return []any{ps, pb, nil, ""}, nil
	}
	os, ob, err := l.packedColumns(ctx, tx, text.packedOutputs)
	if err != nil {
		return nil, err
	}
	return []any{ps, pb, os, ob}, nil
}

// insertNode writes a new node row and its inputs and returns its id. Each
// input must be an ok node of the named stage with the output hash the
// record names.
func (l *Ledger) insertNode(ctx context.Context, tx *qtx, rec pipeline.NodeRecord) (int64, error) {
	text, err := rowValues(rec)
	if err != nil {
		return 0, err
	}
	return l.insertNodeInAs(ctx, tx, rec, text, nil, false)
}

// insertNodeIn is insertNode given the row text; in a batch the rows
// are queued and the id is the batch's next one.
func (l *Ledger) insertNodeIn(ctx context.Context, tx *qtx, rec pipeline.NodeRecord, text rowText, bs *batchState) (int64, error) {
	return l.insertNodeInAs(ctx, tx, rec, text, bs, true)
}

// insertNodeInAs is insertNodeIn; vouch gives the row this user's code (a
// node this process computed), which a node copied from another ledger
// does not get (Vouch gives it one once its run is vouched for).
func (l *Ledger) insertNodeInAs(ctx context.Context, tx *qtx, rec pipeline.NodeRecord, text rowText, bs *batchState, vouch bool) (int64, error) {
	ups := make([]int64, len(rec.Inputs))
	for i, in := range rec.Inputs {
		up, ok, err := readStoredIn(ctx, tx, in.Key, bs)
		if err != nil {
			return 0, err
		}
		switch {
		case !ok:
			return 0, fmt.Errorf("input %d (%s node %s): %w", i, in.Stage, in.Key, ErrNotFound)
		case up.status != pipeline.NodeOK:
			return 0, fmt.Errorf("input %d (%s node %s) is recorded as %s, not ok", i, in.Stage, in.Key, up.status)
		case up.stage != in.Stage:
			return 0, fmt.Errorf("%w: input %d (node %s) stage: expected %s (as stored), found %s", ErrIntegrity, i, in.Key, up.stage, in.Stage)
		case up.outputHash != in.Output:
			return 0, fmt.Errorf("%w: input %d (%s node %s) output hash: expected %s (as stored), found %s", ErrIntegrity, i, in.Stage, in.Key, up.outputHash, in.Output)
		}
		ups[i] = up.id
	}
	ra, err := l.rowArgsOf(ctx, tx, rec, text, vouch)
	if err != nil {
		return 0, err
	}
	var now int64
	if bs != nil {
		now = bs.nowUnix
	} else {
		now = l.now().Unix()
	}
	row := []any{nil, ra.kp, ra.key, ra.kind, ra.vals[0], ra.vals[1], ra.vals[2], ra.vals[3], ra.hash,
		string(rec.Status), rec.Error, int64(rec.Duration), now, ra.mac}
	var id int64
	if bs != nil {
		id = bs.nextID
		bs.nextID++
		row[0] = id
		bs.nodeRows = append(bs.nodeRows, row)
		for i := range ups {
			bs.inputRows = append(bs.inputRows, []any{id, i, ups[i]})
		}
		bs.known[rec.Key] = storedNode{id: id, status: rec.Status, outputHash: rec.OutputHash, stage: rec.Stage, tool: ra.tool, version: rec.Version, params: text.params}
		delete(bs.absent, rec.Key)
		bs.wrote = append(bs.wrote, rec.Key)
		return id, nil
	}
	if _, err := l.nodeTop(ctx, tx); err != nil {
		return 0, err
	}
	res, err := tx.ExecContext(ctx, "INSERT INTO node_rows ("+nodeInsertColumns+") VALUES ("+marks(nodeInsertCount)+")", row...)
	if err != nil {
		return 0, fmt.Errorf("insert node: %w", err)
	}
	if id, err = res.LastInsertId(); err != nil {
		return 0, fmt.Errorf("insert node: %w", err)
	}
	tx.wroteNodes(&l.marks, id, rec.Key)
	for i := range ups {
		if _, err := tx.ExecContext(ctx, "INSERT INTO node_inputs (node, position, input) VALUES (?, ?, ?)", id, i, ups[i]); err != nil {
			return 0, fmt.Errorf("insert input %d: %w", i, err)
		}
	}
	return id, nil
}

// rowArgs are the stored columns of a record that insertNodeInAs,
// updateNodeAs and quarantine write: its key and key prefix, kind (with
// the tool named in its description), packed values (params_shape,
// params, outputs_shape, outputs), output hash and code.
type rowArgs struct {
	kp   int64
	key  []byte
	tool string
	kind int64
	vals []any
	hash any
	mac  any
}

// rowArgsOf computes a record's rowArgs; vouch gives an ok record this
// user's code (the one checkBatch computed, when it did).
func (l *Ledger) rowArgsOf(ctx context.Context, tx *qtx, rec pipeline.NodeRecord, text rowText, vouch bool) (rowArgs, error) {
	var ra rowArgs
	var err error
	if ra.tool, err = describedTool(rec.Description); err != nil {
		return ra, fmt.Errorf("%w: description: %v", ErrIntegrity, err)
	}
	if ra.hash, err = outputHashArg(rec); err != nil {
		return ra, err
	}
	if ra.kind, err = l.kindID(ctx, tx, nodeKind{ra.tool, rec.Stage, rec.Version}); err != nil {
		return ra, err
	}
	if ra.vals, err = l.storedValues(ctx, tx, rec, text); err != nil {
		return ra, err
	}
	if vouch && rec.Status == pipeline.NodeOK {
		m := text.mac
		if m == nil {
			m = l.macOf(rec.Key, rec.Status, rec.OutputHash)
		}
		if m != nil {
			ra.mac = m
		}
	}
	ra.key = keyArg(rec.Key)
	ra.kp = kpOf(ra.key)
	return ra, nil
}

// outputHashArg is a record's output hash as stored: its digest, or NULL
// for a failed node.
func outputHashArg(rec pipeline.NodeRecord) (any, error) {
	if rec.Status != pipeline.NodeOK {
		return nil, nil
	}
	b, err := digestBytes(string(rec.OutputHash))
	if err != nil {
		return nil, fmt.Errorf("%w: output hash: %v", ErrIntegrity, err)
	}
	return b, nil
}

// nodeInsertColumns are the columns a new node row is written with (its
// description is re-derived when read, so it is not stored).
const nodeInsertColumns = "id, kp, key, kind, params_shape, params, outputs_shape, outputs, output_hash, status, error, duration_ns, recorded_at, mac"

// nodeInsertCount is the number of nodeInsertColumns.
const nodeInsertCount = 14

// updateNode rewrites the mutable part of a row that is currently failed:
// to ok with outputs, or to failed with a newer error. The WHERE clause
// makes "an ok row never changes" hold even if the caller got it wrong.
func (l *Ledger) updateNode(ctx context.Context, tx *qtx, rec pipeline.NodeRecord, text rowText) error {
	return l.updateNodeAs(ctx, tx, rec, text, true)
}

// updateNodeAs is updateNode; vouch gives the row this user's code.
func (l *Ledger) updateNodeAs(ctx context.Context, tx *qtx, rec pipeline.NodeRecord, text rowText, vouch bool) error {
	ra, err := l.rowArgsOf(ctx, tx, rec, text, vouch)
	if err != nil {
		return err
	}
	res, err := tx.ExecContext(ctx, `UPDATE node_rows
		SET outputs_shape = ?, outputs = ?, output_hash = ?, status = ?, error = ?, duration_ns = ?, recorded_at = ?, mac = ?
		WHERE kp = ? AND key = ? AND status = 'failed'`,
		ra.vals[2], ra.vals[3], ra.hash, string(rec.Status), rec.Error, int64(rec.Duration), l.now().Unix(), ra.mac, ra.kp, ra.key)
	if err != nil {
		return fmt.Errorf("update node: %w", err)
	}
	if n, err := res.RowsAffected(); err != nil || n != 1 {
		return fmt.Errorf("update node: %d rows changed, want 1 (%v)", n, err)
	}
	return nil
}

// insertRunNode links node id (key) to a run, as the next node the run
// touched.
func insertRunNode(ctx context.Context, tx *qtx, run pipeline.RunID, key pipeline.KeyID, id int64, action pipeline.Action, d time.Duration, errText string) error {
	var prev string
	err := tx.QueryRowContext(ctx, "SELECT action FROM run_node_links WHERE run_id = ? AND node = ?", string(run), id).Scan(&prev)
	if err == nil {
		return fmt.Errorf("run %s already recorded node %s (as %s); a run touches each key once", run, key, prev)
	}
	if !errors.Is(err, sql.ErrNoRows) {
		return fmt.Errorf("read run node: %w", err)
	}
	ordinal, err := nextOrdinal(ctx, tx, run)
	if err != nil {
		return err
	}
	if _, err := tx.ExecContext(ctx, `INSERT INTO run_node_links (run_id, ordinal, node, action, duration_ns, error)
		VALUES (?, ?, ?, ?, ?, ?)`, string(run), ordinal, id, string(action), int64(d), errText); err != nil {
		return fmt.Errorf("insert run node: %w", err)
	}
	return nil
}

// nextOrdinal is the ordinal of the next node a run touches. A bare max()
// over the primary key (run_id, ordinal) is answered from the index's last
// entry; wrapped in an expression it would scan the run.
func nextOrdinal(ctx context.Context, tx *qtx, run pipeline.RunID) (int, error) {
	var last sql.NullInt64
	if err := tx.QueryRowContext(ctx, "SELECT max(ordinal) FROM run_node_links WHERE run_id = ?", string(run)).Scan(&last); err != nil {
		return 0, fmt.Errorf("next ordinal: %w", err)
	}
	if last.Valid {
		return int(last.Int64) + 1, nil
	}
	return 0, nil
}

// RecordResults stores the run's labelled results, in one transaction.
// Each must name an ok node that the run computed or reused, and no
// ordinal may be recorded twice.
func (l *Ledger) RecordResults(ctx context.Context, run pipeline.RunID, results []pipeline.ResultRef) error {
	err := l.inTx(ctx, func(tx *qtx) error {
		if err := requireRunning(ctx, tx, run); err != nil {
			return err
		}
		type linked struct {
			id     int64
			status string
		}
		nodes := map[pipeline.KeyID]linked{}
		for rest := results; len(rest) > 0; {
			n := min(len(rest), 500)
			kbs := make([][]byte, n)
			for i, r := range rest[:n] {
				kbs[i] = keyArg(r.Key)
			}
			cond, kargs := keyMatch("n.", kbs)
			// CROSS JOIN keeps the key index first: given a long IN list,
			// the planner would otherwise walk all of the run's links.
			rows, err := tx.QueryContext(ctx, `SELECT n.key, n.id, n.status FROM node_rows n CROSS JOIN run_node_links rn ON rn.node = n.id AND rn.run_id = ?
				WHERE `+cond, append([]any{string(run)}, kargs...)...)
			if err != nil {
				return err
			}
			for rows.Next() {
				var key []byte
				var ln linked
				if err := rows.Scan(&key, &ln.id, &ln.status); err != nil {
					rows.Close()
					return err
				}
				nodes[pipeline.KeyID(digestText(key))] = ln
			}
			rows.Close()
			if err := rows.Err(); err != nil {
				return err
			}
			rest = rest[n:]
		}
		for _, r := range results {
			ln, ok := nodes[r.Key]
			if !ok {
				return fmt.Errorf("result %d %q: node %s is not part of the run: %w", r.Ordinal, r.Label, r.Key, ErrNotFound)
			}
			if pipeline.NodeStatus(ln.status) != pipeline.NodeOK {
				return fmt.Errorf("result %d %q: node %s is %s; a failed node is never a result", r.Ordinal, r.Label, r.Key, ln.status)
			}
			if _, err := tx.ExecContext(ctx, "INSERT INTO run_result_rows (run_id, ordinal, label, node) VALUES (?, ?, ?, ?)",
				string(run), r.Ordinal, r.Label, ln.id); err != nil {
				return fmt.Errorf("result %d %q: %w", r.Ordinal, r.Label, err)
			}
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("ledger: record results of run %s: %w", run, err)
	}
	return nil
}

// FinishRun closes a running run with its final status (succeeded or
// failed), finish time and error text.
func (l *Ledger) FinishRun(ctx context.Context, run pipeline.RunID, status pipeline.RunStatus, finished time.Time, errText string) error {
	err := l.finishRun(ctx, run, status, finished, errText)
	if err != nil {
		return fmt.Errorf("ledger: finish run %s: %w", run, err)
	}
	return nil
}

func (l *Ledger) finishRun(ctx context.Context, run pipeline.RunID, status pipeline.RunStatus, finished time.Time, errText string) error {
	if status != pipeline.RunSucceeded && status != pipeline.RunFailed {
		return fmt.Errorf("final status must be %q or %q, found %q", pipeline.RunSucceeded, pipeline.RunFailed, status)
	}
	if finished.IsZero() {
		return errors.New("finish time is zero")
	}
	return l.inTx(ctx, func(tx *qtx) error {
		if err := requireRunning(ctx, tx, run); err != nil {
			return err
		}
		_, err := tx.ExecContext(ctx, "UPDATE runs SET status = ?, finished_at = ?, error = ? WHERE id = ?",
			string(status), formatTime(finished), errText, string(run))
		if err != nil {
			return err
		}
		return l.writeSeal(ctx, tx, run)
	})
}

// HeartbeatEvery is how often a running run records that it is alive;
// StaleAfter is how long a run may go without a heartbeat before it is
// taken for dead (a killed process on another host, a reused PID, a hung
// machine): many heartbeats, so that a busy machine is not mistaken.
const (
	HeartbeatEvery = 30 * time.Second
	StaleAfter     = 10 * time.Minute
)

// Heartbeat records that run is alive now.
func (l *Ledger) Heartbeat(ctx context.Context, run pipeline.RunID) error {
	err := l.inTx(ctx, func(tx *qtx) error {
		_, err := tx.ExecContext(ctx, "UPDATE runs SET heartbeat_at = ? WHERE id = ? AND status = 'running'", formatTime(l.now()), string(run))
		return err
	})
	if err != nil {
		return fmt.Errorf("ledger: heartbeat of run %s: %w", run, err)
	}
	return nil
}

// CloseAbandoned marks as failed ("interrupted") every run still recorded
// as running that is gone, and returns their ids. A run's lock (see
// HoldRunLock) decides first: free, its process is gone, whatever its pid
// now names; held, it is alive, however old its heartbeat. Without a lock
// file (a run of an older version, a lock folder this host does not
// share), its owner's process decides, by alive, where it can be asked,
// and wherever it ran a heartbeat (its start when it has none) older than
// staleAfter closes it. The nodes such a run recorded stay in the ledger:
// a re-run reuses them.
func (l *Ledger) CloseAbandoned(ctx context.Context, alive func(owner string) bool, staleAfter time.Duration) ([]pipeline.RunID, error) {
	var closed []pipeline.RunID
	var freed []string // lock files of closed runs, removed once the closing is committed
	err := l.inTx(ctx, func(tx *qtx) error {
		closed, freed = nil, nil
		rows, err := tx.QueryContext(ctx, "SELECT id, owner, coalesce(heartbeat_at, started_at) FROM runs WHERE status = 'running'")
		if err != nil {
			return err
		}
		type cand struct{ id, owner, beat string }
		var cs []cand
		for rows.Next() {
			var c cand
			if err := rows.Scan(&c.id, &c.owner, &c.beat); err != nil {
				rows.Close()
				return err
			}
			cs = append(cs, c)
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return err
		}
		now := l.now()
		for _, c := range cs {
			beat, err := parseTime(c.beat)
			if err != nil {
				return fmt.Errorf("%w: run %s: heartbeat %q: %v", ErrIntegrity, c.id, c.beat, err)
			}
			why := ""
			lock := l.runLock(pipeline.RunID(c.id))
			switch {
			case lock == lockHeld:
				continue
			case lock == lockFree:
				why = "interrupted: its process (" + c.owner + ") is gone (its run lock is free)"
				freed = append(freed, l.lockPath(pipeline.RunID(c.id)))
			case c.owner != "" && !alive(c.owner):
				why = "interrupted: its process (" + c.owner + ") is gone"
			case staleAfter > 0 && now.Sub(beat) > staleAfter:
				why = fmt.Sprintf("interrupted: no sign of life from %s for %s (last at %s)", c.owner, now.Sub(beat).Round(time.Second), c.beat)
			default:
				continue
			}
			if _, err := tx.ExecContext(ctx, "UPDATE runs SET status = 'failed', finished_at = ?, error = ? WHERE id = ? AND status = 'running'",
				formatTime(now), why, c.id); err != nil {
				return err
			}
			if err := l.writeSeal(ctx, tx, pipeline.RunID(c.id)); err != nil {
				return err
			}
			closed = append(closed, pipeline.RunID(c.id))
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: close abandoned runs: %w", err)
	}
	for _, p := range freed {
		os.Remove(p)
	}
	if len(freed) > 0 {
		os.Remove(l.lockDir()) // only if empty
	}
	return closed, nil
}

// nodeKind is a node's tool, stage and version (table kinds).
type nodeKind struct {
	tool, stage string
	version     int
}

// kindBook is a ledger's memory of the kinds' ids (a kind's row never
// changes once committed).
type kindBook struct {
	mu  sync.RWMutex
	ids map[nodeKind]int64
}

// kindID returns the id of kind k, storing it when the ledger holds no
// node of that kind yet (remembered once tx commits).
func (l *Ledger) kindID(ctx context.Context, tx *qtx, k nodeKind) (int64, error) {
	l.kinds.mu.RLock()
	id, ok := l.kinds.ids[k]
	l.kinds.mu.RUnlock()
	if ok {
		return id, nil
	}
	if id, ok := tx.newKinds[k]; ok {
		return id, nil
	}
	err := tx.QueryRowContext(ctx, "SELECT id FROM kinds WHERE tool = ? AND stage = ? AND stage_version = ?", k.tool, k.stage, k.version).Scan(&id)
	if errors.Is(err, sql.ErrNoRows) {
		res, err := tx.ExecContext(ctx, "INSERT INTO kinds (tool, stage, stage_version) VALUES (?, ?, ?)", k.tool, k.stage, k.version)
		if err != nil {
			return 0, fmt.Errorf("record node kind: %w", err)
		}
		if id, err = res.LastInsertId(); err != nil {
			return 0, fmt.Errorf("record node kind: %w", err)
		}
		if tx.newKinds == nil {
			tx.newKinds = map[nodeKind]int64{}
		}
		tx.newKinds[k] = id
		tx.onCommit = append(tx.onCommit, func() { l.kinds.put(k, id) })
		return id, nil
	}
	if err != nil {
		return 0, fmt.Errorf("read node kind: %w", err)
	}
	l.kinds.put(k, id)
	return id, nil
}

func (kb *kindBook) put(k nodeKind, id int64) {
	kb.mu.Lock()
	defer kb.mu.Unlock()
	if kb.ids == nil {
		kb.ids = map[nodeKind]int64{}
	}
	kb.ids[k] = id
}

// quarantine keeps node row id as it is now, with the problem a look-up
// found with it, and rewrites it with rec (computed again by run).
func (l *Ledger) quarantine(ctx context.Context, tx *qtx, run pipeline.RunID, id int64, rec pipeline.NodeRecord, text rowText, problem string) error {
	now := formatTime(l.now())
	if _, err := tx.ExecContext(ctx, `INSERT INTO quarantine (node, key, params_shape, params, outputs_shape, outputs, output_hash, problem, run_id, found_at)
		SELECT id, key, params_shape, params, outputs_shape, outputs, output_hash, ?, ?, ? FROM node_rows WHERE id = ?`, problem, string(run), now, id); err != nil {
		return fmt.Errorf("quarantine node %s: %w", rec.Key, err)
	}
	ra, err := l.rowArgsOf(ctx, tx, rec, text, true)
	if err != nil {
		return err
	}
	if _, err := tx.ExecContext(ctx, `UPDATE node_rows SET kp = ?, key = ?, kind = ?, params_shape = ?, params = ?, description = NULL, outputs_shape = ?, outputs = ?, output_hash = ?,
		status = 'ok', error = '', recorded_at = ?, mac = ? WHERE id = ?`,
		ra.kp, ra.key, ra.kind, ra.vals[0], ra.vals[1], ra.vals[2], ra.vals[3], ra.hash, l.now().Unix(), ra.mac, id); err != nil {
		return fmt.Errorf("rewrite node %s: %w", rec.Key, err)
	}
	// Its inputs as the computation named them.
	if _, err := tx.ExecContext(ctx, "DELETE FROM node_inputs WHERE node = ?", id); err != nil {
		return fmt.Errorf("rewrite node %s inputs: %w", rec.Key, err)
	}
	for i, in := range rec.Inputs {
		ib := keyArg(in.Key)
		if _, err := tx.ExecContext(ctx, "INSERT INTO node_inputs (node, position, input) SELECT ?, ?, min(id) FROM node_rows WHERE kp = ? AND key = ?", id, i, kpOf(ib), ib); err != nil {
			return fmt.Errorf("rewrite node %s input %d: %w", rec.Key, i, err)
		}
	}
	return nil
}

// Quarantined lists the node rows run found edited and rewrote (table
// quarantine): each node's key and what was wrong with the row.
func (l *Ledger) Quarantined(ctx context.Context, run pipeline.RunID) ([]Problem, error) {
	var out []Problem
	rows, err := l.rdb.QueryContext(ctx, "SELECT key, problem FROM quarantine WHERE run_id = ? ORDER BY id", string(run))
	if err != nil {
		return nil, fmt.Errorf("ledger: quarantine of run %s: %w", run, err)
	}
	defer rows.Close()
	for rows.Next() {
		var key []byte
		var p Problem
		if err := rows.Scan(&key, &p.What); err != nil {
			return nil, err
		}
		p.Table, p.ID = "nodes", digestText(key)
		out = append(out, p)
	}
	return out, rows.Err()
}
