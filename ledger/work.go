package ledger

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
)

// WorkVersion names the layout of the account a work's digest is the
// hash of.
const WorkVersion = "inflatrace-work/1"

// workNode is one node of a work's account.
type workNode struct {
	key, hash []byte // 32 bytes each; hash nil for a failed node
	status    pipeline.NodeStatus
	action    pipeline.Action
	err       string
}

// workResult is one result of a work's account.
type workResult struct {
	offset int
	label  string
	key    []byte
}

// workAccount is what a work's digest covers.
type workAccount struct {
	key     []byte // nil: not reusable
	span    int
	nodes   []workNode
	results []workResult
	summary []byte
}

// digest is the SHA-256 of the account, written in binary: the version,
// the key (or a zero length), the span, each node (key, status, action,
// output hash, error) and each result (offset, label, key), then the
// summary's own hash.
func (a *workAccount) digest() []byte {
	h := sha256.New()
	b := make([]byte, 0, 256)
	b = append(b, WorkVersion...)
	b = append(b, '\n', byte(len(a.key)))
	b = append(b, a.key...)
	b = binary.AppendUvarint(b, uint64(a.span))
	b = binary.AppendUvarint(b, uint64(len(a.nodes)))
	h.Write(b)
	for _, n := range a.nodes {
		b = append(b[:0], n.key...)
		b = append(b, n.status[0], n.action[0], byte(len(n.hash)))
		b = append(b, n.hash...)
		b = binary.AppendUvarint(b, uint64(len(n.err)))
		b = append(b, n.err...)
		h.Write(b)
	}
	b = binary.AppendUvarint(b[:0], uint64(len(a.results)))
	h.Write(b)
	for _, r := range a.results {
		b = binary.AppendUvarint(b[:0], uint64(r.offset))
		b = binary.AppendUvarint(b, uint64(len(r.label)))
		b = append(b, r.label...)
		b = append(b, r.key...)
		h.Write(b)
	}
	s := sha256.Sum256(a.summary)
	h.Write(s[:])
	return h.Sum(nil)
}

// workRow is a works row as stored.
type workRow struct {
	id                                 int64
	key                                []byte
	nodes, actions, results, errorsTxt string
	span                               int
	summary, digest, check             []byte
}

// rowCheck is the SHA-256 of a row's own columns (length-prefixed), the
// checksum a read verifies without reading the work's nodes.
func (w *workRow) rowCheck() []byte {
	h := sha256.New()
	b := make([]byte, 0, 64)
	for _, col := range [][]byte{w.key, []byte(w.nodes), []byte(w.actions), []byte(w.results), []byte(w.errorsTxt), []byte(strconv.Itoa(w.span)), w.summary, w.digest} {
		b = binary.AppendUvarint(b[:0], uint64(len(col)))
		h.Write(b)
		h.Write(col)
	}
	return h.Sum(nil)
}

const workColumns = "id, key, nodes, actions, results, errors, span, summary, digest, row_check"

func scanWork(s scanner, extra ...any) (workRow, error) {
	var w workRow
	err := s.Scan(append([]any{&w.id, &w.key, &w.nodes, &w.actions, &w.results, &w.errorsTxt, &w.span, summaryColumn{&w.summary}, &w.digest, &w.check}, extra...)...)
	return w, err
}

// checked verifies a row's checksum.
func (w *workRow) checked() error {
	if got := w.rowCheck(); string(got) != string(w.check) {
		return fmt.Errorf("%w: work %d: its row checks to %x, the row says %x: the row was edited (run \"inflatrace verify --all\")", ErrIntegrity, w.id, got, w.check)
	}
	return nil
}

// LookupWork returns the complete work recorded under key, checked
// against its row checksum (pipeline.WorkRecorder). The work's nodes are
// not read: verify recomputes the digest from them.
func (l *Ledger) LookupWork(ctx context.Context, key pipeline.WorkID) (pipeline.RecordedWork, bool, error) {
	kb, err := digestBytes(string(key))
	if err != nil {
		return pipeline.RecordedWork{}, false, fmt.Errorf("ledger: look up work: %w", err)
	}
	var out pipeline.RecordedWork
	found := false
	err = l.inReadTx(ctx, func(tx *qtx) error {
		var mac []byte
		w, err := scanWork(tx.QueryRowContext(ctx, "SELECT "+workColumns+", mac FROM works WHERE key = ?", kb), &mac)
		if errors.Is(err, sql.ErrNoRows) {
			return nil
		}
		if err != nil {
			return err
		}
		if err := w.checked(); err != nil {
			return err
		}
		if l.macKey != nil && !l.workCodeMatches(mac, w.digest) {
			// Not this user's, nor vouched for: evaluated again (node by
			// node), which confirms it and gives it a code.
			return nil
		}
		found = true
		out = pipeline.RecordedWork{ID: w.id, Key: key, Nodes: len(w.actions), Span: w.span, Summary: w.summary}
		return nil
	})
	if err != nil {
		return pipeline.RecordedWork{}, false, fmt.Errorf("ledger: look up work %s: %w", key, err)
	}
	return out, found, nil
}

var _ pipeline.WorkRecorder = (*Ledger)(nil)

// RecordWorks stores batch's nodes (as RecordNodes does, without a link
// for those recorded in a work) and links the run to its works, in one
// transaction (pipeline.WorkRecorder). A computed work's nodes must be
// stored (in this batch or before) with the output hashes the work names;
// a work key already recorded by another run must have the same digest.
func (l *Ledger) RecordWorks(ctx context.Context, run pipeline.RunID, batch []pipeline.Recorded, works []pipeline.WorkLink) error {
	texts, bad, err := l.checkBatch(batch)
	if err != nil {
		return fmt.Errorf("ledger: record %s node %s in run %s: %w", batch[bad].Action, batch[bad].Node.Key, run, err)
	}
	used, err := l.recordWorks(ctx, run, batch, texts, works, true)
	if err != nil && used {
		_, err = l.recordWorks(ctx, run, batch, texts, works, false)
	}
	if err != nil {
		return fmt.Errorf("ledger: record %d nodes and %d works in run %s: %w", len(batch), len(works), run, err)
	}
	return nil
}

func (l *Ledger) recordWorks(ctx context.Context, run pipeline.RunID, batch []pipeline.Recorded, texts []rowText, works []pipeline.WorkLink, missing bool) (used bool, err error) {
	used, err = l.recordBatchWith(ctx, run, batch, texts, missing, func(tx *qtx, bs *batchState) error {
		var next sql.NullInt64
		if err := tx.QueryRowContext(ctx, "SELECT max(position) FROM run_works WHERE run_id = ?", string(run)).Scan(&next); err != nil {
			return err
		}
		pos := 0
		if next.Valid {
			pos = int(next.Int64) + 1
		}
		for _, wl := range works {
			id, action := int64(0), "reused"
			if wl.Reused != nil {
				id = wl.Reused.ID
			} else {
				action = "computed"
				if id, err = l.insertWork(ctx, tx, wl.Work, bs); err != nil {
					return err
				}
			}
			if _, err := tx.ExecContext(ctx, "INSERT INTO run_works (run_id, position, work, base, node_base, action) VALUES (?, ?, ?, ?, ?, ?)",
				string(run), pos, id, wl.Base, wl.NodeBase, action); err != nil {
				return fmt.Errorf("link work %d: %w", pos, err)
			}
			pos++
		}
		return nil
	})
	return used, err
}

// insertWork writes a computed work's row and returns its id. Its nodes'
// ids come from the batch, from recent batches, or from the key index.
func (l *Ledger) insertWork(ctx context.Context, tx *qtx, w *pipeline.Work, bs *batchState) (int64, error) {
	ids, err := l.nodeIDs(ctx, tx, w, bs)
	if err != nil {
		return 0, err
	}
	acct := workAccount{span: w.Span, summary: w.Summary}
	if w.Key != "" {
		if acct.key, err = digestBytes(string(w.Key)); err != nil {
			return 0, fmt.Errorf("%w: work key: %v", ErrIntegrity, err)
		}
	}
	var nodes, results strings.Builder
	actions := make([]byte, len(w.Nodes))
	errs := map[string]string{}
	nodes.WriteByte('[')
	for i, n := range w.Nodes {
		kb, err := digestBytes(string(n.Key))
		if err != nil {
			return 0, fmt.Errorf("%w: work node %d: %v", ErrIntegrity, i, err)
		}
		wn := workNode{key: kb, status: n.Status, action: n.Action, err: n.Error}
		if n.Status == pipeline.NodeOK {
			if wn.hash, err = digestBytes(string(n.Output)); err != nil {
				return 0, fmt.Errorf("%w: work node %d output hash: %v", ErrIntegrity, i, err)
			}
		}
		acct.nodes = append(acct.nodes, wn)
		if i > 0 {
			nodes.WriteByte(',')
		}
		nodes.WriteString(strconv.FormatInt(ids[i], 10))
		switch n.Action {
		case pipeline.Computed:
			actions[i] = 'c'
		case pipeline.Reused:
			actions[i] = 'r'
		case pipeline.Failed:
			actions[i] = 'f'
			errs["n"+strconv.Itoa(i)] = n.Error
		default:
			return 0, fmt.Errorf("work node %d: action %q", i, n.Action)
		}
	}
	nodes.WriteByte(']')
	byKey := make(map[pipeline.KeyID]int64, len(w.Nodes))
	for i, n := range w.Nodes {
		byKey[n.Key] = ids[i]
	}
	results.WriteByte('[')
	for i, r := range w.Results {
		id, ok := byKey[r.Key]
		if !ok {
			return 0, fmt.Errorf("work result %d (%s) names node %s, which is not among the work's nodes", r.Ordinal, r.Label, r.Key)
		}
		kb, _ := digestBytes(string(r.Key))
		acct.results = append(acct.results, workResult{offset: r.Ordinal, label: r.Label, key: kb})
		label, err := json.Marshal(r.Label)
		if err != nil {
			return 0, err
		}
		if i > 0 {
			results.WriteByte(',')
		}
		fmt.Fprintf(&results, "[%d,%s,%d]", r.Ordinal, label, id)
	}
	results.WriteByte(']')
	errText, err := json.Marshal(errs)
	if err != nil {
		return 0, err
	}
	row := workRow{key: acct.key, nodes: nodes.String(), actions: string(actions), results: results.String(), errorsTxt: string(errText),
		span: w.Span, summary: w.Summary, digest: acct.digest()}
	if row.summary == nil {
		row.summary = []byte{}
	}
	row.check = row.rowCheck()
	if acct.key != nil {
		// Another run (or process) may have recorded the same work: it must
		// be the same account.
		var id int64
		var digest []byte
		err := tx.QueryRowContext(ctx, "SELECT id, digest FROM works WHERE key = ?", acct.key).Scan(&id, &digest)
		switch {
		case err == nil:
			if string(digest) != string(row.digest) {
				return 0, fmt.Errorf("%w: conflicting works for key %s: the ledger holds digest %x, this run's is %x", ErrIntegrity, w.Key, digest, row.digest)
			}
			// This run evaluated the work and found the same account.
			if m := l.workMAC(row.digest); m != nil {
				if _, err := tx.ExecContext(ctx, "UPDATE works SET mac = ? WHERE id = ?", m, id); err != nil {
					return 0, err
				}
			}
			return id, nil
		case !errors.Is(err, sql.ErrNoRows):
			return 0, err
		}
	}
	var keyArgV any
	if acct.key != nil {
		keyArgV = acct.key
	}
	var mac any
	if m := l.workMAC(row.digest); m != nil {
		mac = m
	}
	res, err := tx.ExecContext(ctx, "INSERT INTO works (key, nodes, actions, results, errors, span, summary, digest, row_check, recorded_at, mac) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
		keyArgV, row.nodes, row.actions, row.results, row.errorsTxt, row.span, storedSummary(row.summary), row.digest, row.check, bs.now, mac)
	if err != nil {
		return 0, fmt.Errorf("insert work: %w", err)
	}
	return res.LastInsertId()
}

// nodeIDs resolves a work's node keys to row ids, and checks that each
// stored row has the status and output hash the work names.
func (l *Ledger) nodeIDs(ctx context.Context, tx *qtx, w *pipeline.Work, bs *batchState) ([]int64, error) {
	ids := make([]int64, len(w.Nodes))
	var rest []int
	for i, n := range w.Nodes {
		if st, ok := bs.known[n.Key]; ok {
			if st.status == pipeline.NodeOK && n.Status == pipeline.NodeOK && st.outputHash != n.Output {
				return nil, fmt.Errorf("%w: work node %s: output hash %s, the ledger holds %s", ErrIntegrity, n.Key, n.Output, st.outputHash)
			}
			ids[i] = st.id
			continue
		}
		if st, ok := l.recent.get(n.Key); ok && (st.status != pipeline.NodeOK || n.Status != pipeline.NodeOK || st.outputHash == n.Output) {
			ids[i] = st.id
			continue
		}
		rest = append(rest, i)
	}
	for len(rest) > 0 {
		part := rest[:min(len(rest), 500)]
		rest = rest[len(part):]
		kbs := make([][]byte, len(part))
		for j, i := range part {
			kbs[j] = keyArg(w.Nodes[i].Key)
		}
		cond, args := keyMatch("", kbs)
		rows, err := tx.QueryContext(ctx, "SELECT key, id, status, output_hash FROM node_rows WHERE "+cond+" ORDER BY id DESC", args...)
		if err != nil {
			return nil, err
		}
		type got struct {
			id     int64
			status string
			hash   []byte
		}
		found := map[pipeline.KeyID]got{}
		for rows.Next() {
			var key []byte
			var g got
			if err := rows.Scan(&key, &g.id, &g.status, &g.hash); err != nil {
				rows.Close()
				return nil, err
			}
			found[pipeline.KeyID(digestText(key))] = g
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return nil, err
		}
		for _, i := range part {
			n := w.Nodes[i]
			g, ok := found[n.Key]
			if !ok {
				return nil, fmt.Errorf("work node %s: %w (a work's nodes are recorded before it)", n.Key, ErrNotFound)
			}
			if n.Status == pipeline.NodeOK && (g.status != string(pipeline.NodeOK) || digestText(g.hash) != string(n.Output)) {
				return nil, fmt.Errorf("%w: work node %s: output hash %s, the ledger holds %s (%s)", ErrIntegrity, n.Key, n.Output, digestText(g.hash), g.status)
			}
			ids[i] = g.id
		}
	}
	return ids, nil
}

// storedAccount re-derives a stored work's account from its row and the
// node rows it names.
func storedAccount(ctx context.Context, tx *qtx, w workRow) (workAccount, error) {
	acct := workAccount{key: w.key, span: w.span, summary: w.summary}
	var ids []int64
	if err := json.Unmarshal([]byte(w.nodes), &ids); err != nil {
		return acct, fmt.Errorf("work %d nodes: %w", w.id, err)
	}
	if len(ids) != len(w.actions) {
		return acct, fmt.Errorf("work %d: %d nodes, %d actions", w.id, len(ids), len(w.actions))
	}
	var errs map[string]string
	if err := json.Unmarshal([]byte(w.errorsTxt), &errs); err != nil {
		return acct, fmt.Errorf("work %d errors: %w", w.id, err)
	}
	rows, err := tx.QueryContext(ctx, "SELECT j.key, n.key, n.status, n.output_hash FROM json_each(?) j JOIN node_rows n ON n.id = j.value ORDER BY j.key", w.nodes)
	if err != nil {
		return acct, err
	}
	for rows.Next() {
		var pos int
		var key, hash []byte
		var status string
		if err := rows.Scan(&pos, &key, &status, &hash); err != nil {
			rows.Close()
			return acct, err
		}
		if pos != len(acct.nodes) {
			rows.Close()
			return acct, fmt.Errorf("work %d: node %d is missing", w.id, len(acct.nodes))
		}
		wn := workNode{key: key, hash: hash}
		switch w.actions[pos] {
		case 'c':
			wn.action = pipeline.Computed
		case 'r':
			wn.action = pipeline.Reused
		case 'f':
			wn.action = pipeline.Failed
			wn.err = errs["n"+strconv.Itoa(pos)]
		default:
			rows.Close()
			return acct, fmt.Errorf("work %d: node %d action %q", w.id, pos, w.actions[pos])
		}
		// The work saw the node as it was then: a failed node may have been
		// computed since by another run.
		wn.status = pipeline.NodeOK
		if wn.action == pipeline.Failed {
			wn.status, wn.hash = pipeline.NodeFailed, nil
		} else if status != string(pipeline.NodeOK) {
			wn.hash = nil // an ok node never turns failed: the digest will say so
		}
		acct.nodes = append(acct.nodes, wn)
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return acct, err
	}
	if len(acct.nodes) != len(ids) {
		return acct, fmt.Errorf("work %d: %d of its %d nodes are in the ledger", w.id, len(acct.nodes), len(ids))
	}
	var res [][3]json.RawMessage
	if err := json.Unmarshal([]byte(w.results), &res); err != nil {
		return acct, fmt.Errorf("work %d results: %w", w.id, err)
	}
	pos := make(map[int64]int, len(ids))
	for i, id := range ids {
		pos[id] = i
	}
	for _, r := range res {
		var off int
		var label string
		var id int64
		if json.Unmarshal(r[0], &off) != nil || json.Unmarshal(r[1], &label) != nil || json.Unmarshal(r[2], &id) != nil {
			return acct, fmt.Errorf("work %d: a result is not [offset, label, node]", w.id)
		}
		i, ok := pos[id]
		if !ok {
			return acct, fmt.Errorf("work %d: result %d names node %d, not among its nodes", w.id, off, id)
		}
		acct.results = append(acct.results, workResult{offset: off, label: label, key: acct.nodes[i].key})
	}
	return acct, nil
}

// WorkProblems checks every work: its row against its checksum, and its
// digest against the account re-derived from the node rows it names.
func (l *Ledger) WorkProblems(ctx context.Context) ([]Problem, error) {
	var out []Problem
	err := l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT "+workColumns+" FROM works ORDER BY id")
		if err != nil {
			return err
		}
		var ws []workRow
		for rows.Next() {
			w, err := scanWork(rows)
			if err != nil {
				rows.Close()
				return err
			}
			ws = append(ws, w)
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return err
		}
		for _, w := range ws {
			id := strconv.FormatInt(w.id, 10)
			if err := w.checked(); err != nil {
				out = append(out, Problem{Table: "works", ID: id, What: err.Error()})
				continue
			}
			acct, err := storedAccount(ctx, tx, w)
			if err != nil {
				out = append(out, Problem{Table: "works", ID: id, What: err.Error()})
				continue
			}
			if got := acct.digest(); string(got) != string(w.digest) {
				out = append(out, Problem{Table: "works", ID: id,
					What: fmt.Sprintf("the work's nodes and results give digest %x, the row says %x: a node row or the work was edited after it was recorded", got, w.digest)})
			}
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: check works: %w", err)
	}
	return out, nil
}

// RunWork is one work of a run, for readers that use the works' summaries.
type RunWork struct {
	Position, Base, NodeBase int
	Action                   pipeline.Action
	Key                      pipeline.WorkID // empty: not reusable
	Span                     int
	Summary                  []byte
}

// RunWorks returns a run's works in order, each row checked against its
// checksum, and whether the run is recorded by works alone (no per-node
// or per-result links of the earlier layout).
func (l *Ledger) RunWorks(ctx context.Context, id pipeline.RunID) (works []RunWork, only bool, err error) {
	err = l.inReadTx(ctx, func(tx *qtx) error {
		works, only = nil, false
		if _, err := readRun(ctx, tx, id); err != nil {
			return err
		}
		rows, err := tx.QueryContext(ctx, "SELECT rw.position, rw.base, rw.node_base, rw.action, "+prefixed("w.", workColumns)+
			" FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = ? ORDER BY rw.position", string(id))
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var rw RunWork
			var action string
			var w workRow
			if err := rows.Scan(&rw.Position, &rw.Base, &rw.NodeBase, &action,
				&w.id, &w.key, &w.nodes, &w.actions, &w.results, &w.errorsTxt, &w.span, summaryColumn{&w.summary}, &w.digest, &w.check); err != nil {
				return err
			}
			if err := w.checked(); err != nil {
				return err
			}
			rw.Action, rw.Span, rw.Summary = pipeline.Action(action), w.span, w.summary
			if w.key != nil {
				rw.Key = pipeline.WorkID(digestText(w.key))
			}
			works = append(works, rw)
		}
		if err := rows.Err(); err != nil {
			return err
		}
		var direct int
		if err := tx.QueryRowContext(ctx, `SELECT (SELECT count(*) FROM run_node_links WHERE run_id = ?1) + (SELECT count(*) FROM run_result_rows WHERE run_id = ?1)`, string(id)).Scan(&direct); err != nil {
			return err
		}
		only = len(works) > 0 && direct == 0
		return nil
	})
	if err != nil {
		return nil, false, fmt.Errorf("ledger: read the works of run %s: %w", id, err)
	}
	return works, only, nil
}

// prefixed qualifies each of a comma-separated column list.
func prefixed(p, cols string) string {
	parts := strings.Split(cols, ", ")
	for i := range parts {
		parts[i] = p + parts[i]
	}
	return strings.Join(parts, ", ")
}
