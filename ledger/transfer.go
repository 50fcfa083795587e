package ledger

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
)

// snapshot is a self-contained piece of a ledger: runs with their node
// links, results and tags, and every node they touch (upstream closure
// included), all verified as they were read.
type snapshot struct {
	runs    []RunDetail
	links   map[pipeline.RunID][]RunNode
	results map[pipeline.RunID][]pipeline.ResultRef
	tags    map[string]pipeline.RunID
	nodes   map[pipeline.KeyID]pipeline.NodeRecord
	// The per-node links and results of the earlier layout, and the works,
	// of each run: what write inserts (links and results hold both).
	direct        map[pipeline.RunID][]RunNode
	directResults map[pipeline.RunID][]pipeline.ResultRef
	works         map[pipeline.RunID][]transferWork
}

// transferWork is one work of a run, with its account (node keys) so that
// it can be written where node ids differ.
type transferWork struct {
	pos, base, nodeBase int
	action              string
	row                 workRow
	acct                workAccount
}

// MergeReport says what a merge or export wrote.
type MergeReport struct {
	Runs, RunsKept   int // runs written; runs already present (identical)
	Nodes, NodesKept int // nodes written; nodes already present (identical)
	Tags             int // tags written
	// Written are the runs written, in order.
	Written []pipeline.RunID
}

// read collects a snapshot of the given runs (all runs when ids is nil).
func (l *Ledger) read(ctx context.Context, ids []pipeline.RunID) (*snapshot, error) {
	s := &snapshot{links: map[pipeline.RunID][]RunNode{}, results: map[pipeline.RunID][]pipeline.ResultRef{},
		tags: map[string]pipeline.RunID{}, nodes: map[pipeline.KeyID]pipeline.NodeRecord{},
		direct: map[pipeline.RunID][]RunNode{}, directResults: map[pipeline.RunID][]pipeline.ResultRef{}, works: map[pipeline.RunID][]transferWork{}}
	if ids == nil {
		runs, err := l.Runs(ctx)
		if err != nil {
			return nil, err
		}
		for i := len(runs) - 1; i >= 0; i-- { // oldest first
			ids = append(ids, runs[i].ID)
		}
	}
	for _, id := range ids {
		d, err := l.Run(ctx, id)
		if err != nil {
			return nil, err
		}
		if d.Status == pipeline.RunRunning {
			return nil, fmt.Errorf("run %s is still running (or was interrupted): finish or discard it first", id)
		}
		s.runs = append(s.runs, d)
		links, err := l.RunNodes(ctx, id)
		if err != nil {
			return nil, err
		}
		s.links[id] = links
		// RunNodes gives each linked node whole and checked, so only an
		// input the run did not link itself needs its lineage read (a
		// lineage query a link made importing a 1e5-point archive take
		// minutes and gigabytes).
		for _, ln := range links {
			s.nodes[ln.Key] = ln.NodeRecord
		}
		for _, ln := range links {
			for _, in := range ln.Inputs {
				if _, ok := s.nodes[in.Key]; ok {
					continue
				}
				lin, err := l.Lineage(ctx, in.Key)
				if err != nil {
					return nil, err
				}
				for _, n := range lin {
					s.nodes[n.Key] = n
				}
			}
		}
		if s.results[id], err = l.RunResults(ctx, id); err != nil {
			return nil, err
		}
		if s.direct[id], err = l.runNodesIn(ctx, id, "run_node_links"); err != nil {
			return nil, err
		}
		if s.directResults[id], err = l.runResultsIn(ctx, id, "run_result_rows"); err != nil {
			return nil, err
		}
		if s.works[id], err = l.readWorks(ctx, id); err != nil {
			return nil, err
		}
		names, err := l.TagsOf(ctx, id)
		if err != nil {
			return nil, err
		}
		for _, n := range names {
			s.tags[n] = id
		}
	}
	return s, nil
}

// write applies a snapshot in one transaction: nodes not yet present are
// inserted (a failed row is replaced by an ok one), identical ones kept;
// a node with the same key and a different output hash, a run id with a
// different content, or a tag naming another run is a conflict and
// nothing is written.
func (l *Ledger) write(ctx context.Context, s *snapshot) (MergeReport, error) {
	var rep MergeReport
	err := l.inTx(ctx, func(tx *qtx) error {
		// Inputs refer to nodes inserted in the same transaction, in any
		// order: check foreign keys at commit.
		if _, err := tx.ExecContext(ctx, "PRAGMA defer_foreign_keys = ON"); err != nil {
			return err
		}
		order, err := s.topological()
		if err != nil {
			return err
		}
		ids := make(map[pipeline.KeyID]int64, len(order))
		for _, rec := range order {
			old, exists, err := readStored(ctx, tx, rec.Key)
			if err != nil {
				return err
			}
			ids[rec.Key] = old.id
			switch {
			case !exists:
				if ids[rec.Key], err = l.insertNode(ctx, tx, rec); err != nil {
					return err
				}
				rep.Nodes++
			case old.status == pipeline.NodeOK && rec.Status == pipeline.NodeOK:
				if old.outputHash != rec.OutputHash {
					return fmt.Errorf("%w: conflicting outputs for key %s: here %s, incoming %s", ErrIntegrity, rec.Key, old.outputHash, rec.OutputHash)
				}
				rep.NodesKept++
			case old.status == pipeline.NodeFailed && rec.Status == pipeline.NodeOK:
				text, err := rowValues(rec)
				if err != nil {
					return err
				}
				if err := l.updateNodeAs(ctx, tx, rec, text, false); err != nil {
					return err
				}
				rep.Nodes++
			default: // an incoming failure never replaces what is here
				rep.NodesKept++
			}
		}
		for _, run := range s.runs {
			here, err := readRun(ctx, tx, run.ID)
			switch {
			case err == nil:
				if here.ConfigHash != run.ConfigHash || here.Status != run.Status || !here.Started.Equal(run.Started) {
					return fmt.Errorf("%w: run %s exists here with different content", ErrIntegrity, run.ID)
				}
				rep.RunsKept++
				continue
			case !errors.Is(err, ErrNotFound):
				return err
			}
			if err := insertFinishedRun(ctx, tx, run); err != nil {
				return err
			}
			if err := l.writeWorks(ctx, tx, run.ID, s.works[run.ID], ids); err != nil {
				return err
			}
			for _, ln := range s.direct[run.ID] {
				if _, err := tx.ExecContext(ctx, `INSERT INTO run_node_links (run_id, ordinal, node, action, duration_ns, error)
					VALUES (?, ?, ?, ?, ?, ?)`, string(run.ID), ln.Ordinal, ids[ln.Key], string(ln.Action), int64(ln.RunDuration), ln.RunError); err != nil {
					return fmt.Errorf("run %s node %s: %w", run.ID, ln.Key, err)
				}
			}
			for _, r := range s.directResults[run.ID] {
				if _, err := tx.ExecContext(ctx, "INSERT INTO run_result_rows (run_id, ordinal, label, node) VALUES (?, ?, ?, ?)",
					string(run.ID), r.Ordinal, r.Label, ids[r.Key]); err != nil {
					return fmt.Errorf("run %s result %d: %w", run.ID, r.Ordinal, err)
				}
			}
			// The incoming run's rows must give the seal it carries; a run
			// without one (finished before seals) stays unsealed here.
			if run.Seal != "" {
				got, err := sealOf(ctx, tx, run.ID)
				if err != nil {
					return err
				}
				if got != run.Seal {
					return fmt.Errorf("%w: run %s: its rows seal to %s, but it was sealed %s: a row was edited after the run finished", ErrIntegrity, run.ID, got, run.Seal)
				}
				var sig any
				if run.SealSignature != "" {
					sig = run.SealSignature // travels with the run: checked by verify against trusted keys
				}
				if _, err := tx.ExecContext(ctx, "UPDATE runs SET seal = ?, seal_signature = ? WHERE id = ?", run.Seal, sig, string(run.ID)); err != nil {
					return err
				}
			}
			rep.Runs++
			rep.Written = append(rep.Written, run.ID)
		}
		names := make([]string, 0, len(s.tags))
		for n := range s.tags {
			names = append(names, n)
		}
		sort.Strings(names)
		for _, n := range names {
			cur, ok, err := taggedRun(ctx, tx, n)
			if err != nil {
				return err
			}
			if ok {
				if cur != s.tags[n] {
					return fmt.Errorf("%w: tag %q names run %s here and %s incoming", ErrIntegrity, n, cur, s.tags[n])
				}
				continue
			}
			if _, err := tx.ExecContext(ctx, "INSERT INTO tags (name, run_id, created_at) VALUES (?, ?, ?)", n, string(s.tags[n]), formatTime(l.now())); err != nil {
				return err
			}
			rep.Tags++
		}
		return nil
	})
	return rep, err
}

// topological returns the snapshot's nodes with every node after its
// inputs (ties in key order, so the order is deterministic).
func (s *snapshot) topological() ([]pipeline.NodeRecord, error) {
	keys := make([]string, 0, len(s.nodes))
	for k := range s.nodes {
		keys = append(keys, string(k))
	}
	sort.Strings(keys)
	state := map[pipeline.KeyID]int{} // 1 visiting, 2 done
	var out []pipeline.NodeRecord
	var visit func(k pipeline.KeyID) error
	visit = func(k pipeline.KeyID) error {
		switch state[k] {
		case 1:
			return fmt.Errorf("%w: node %s is its own ancestor", ErrIntegrity, k)
		case 2:
			return nil
		}
		rec, ok := s.nodes[k]
		if !ok {
			return fmt.Errorf("node %s is an input but not in the snapshot: %w", k, ErrNotFound)
		}
		state[k] = 1
		for _, in := range rec.Inputs {
			if err := visit(in.Key); err != nil {
				return err
			}
		}
		state[k] = 2
		out = append(out, rec)
		return nil
	}
	for _, k := range keys {
		if err := visit(pipeline.KeyID(k)); err != nil {
			return nil, err
		}
	}
	return out, nil
}

func insertFinishedRun(ctx context.Context, tx *qtx, d RunDetail) error {
	if want := pipeline.Sum([]byte(d.ConfigText)); d.ConfigHash != want {
		return fmt.Errorf("%w: run %s: configuration hashes to %s, record says %s", ErrIntegrity, d.ID, want, d.ConfigHash)
	}
	_, err := tx.ExecContext(ctx, `INSERT INTO runs
		(id, started_at, finished_at, tool_version, config_path, config_text, config_hash, status, error)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		string(d.ID), formatTime(d.Started), formatTime(d.Finished), d.ToolVersion, d.ConfigPath, d.ConfigText, d.ConfigHash,
		string(d.Status), d.Error)
	if err != nil {
		return fmt.Errorf("insert run %s: %w", d.ID, err)
	}
	// Where the run came from travels with it, whether or not this ledger
	// holds the runs named.
	return insertLinks(ctx, tx, d.ID, d.DerivedFrom, d.Parts)
}

// ExportRun writes a new, self-contained ledger at path holding exactly
// one run: its row, its node links and results, its tags, and every node
// it touched with their upstream closure. The file must not exist.
func (l *Ledger) ExportRun(ctx context.Context, id pipeline.RunID, path string) (MergeReport, error) {
	if _, err := os.Stat(path); err == nil {
		return MergeReport{}, fmt.Errorf("ledger: export run %s: %s already exists", id, path)
	}
	s, err := l.read(ctx, []pipeline.RunID{id})
	if err != nil {
		return MergeReport{}, fmt.Errorf("ledger: export run %s: %w", id, err)
	}
	dst, err := Open(path, WithClock(l.now))
	if err != nil {
		return MergeReport{}, fmt.Errorf("ledger: export run %s: %w", id, err)
	}
	rep, werr := dst.write(ctx, s)
	if cerr := dst.Close(); werr == nil {
		werr = cerr
	}
	if werr != nil {
		os.Remove(path)
		return rep, fmt.Errorf("ledger: export run %s: %w", id, werr)
	}
	return rep, nil
}

// Merge copies every finished run of the ledger at path, with its nodes,
// results and tags, into this one, in one transaction. It is idempotent:
// merging the same ledger twice writes nothing the second time. Every
// incoming row is verified against its hashes as it is read; conflicting
// outputs for one key refuse the whole merge.
func (l *Ledger) Merge(ctx context.Context, path string) (MergeReport, error) {
	if _, err := os.Stat(path); err != nil {
		return MergeReport{}, fmt.Errorf("ledger: merge %s: %w", path, err)
	}
	src, err := Open(path, WithClock(l.now))
	if err != nil {
		return MergeReport{}, fmt.Errorf("ledger: merge: %w", err)
	}
	defer src.Close()
	s, err := src.read(ctx, nil)
	if err != nil {
		return MergeReport{}, fmt.Errorf("ledger: merge %s: %w", path, err)
	}
	rep, err := l.write(ctx, s)
	if err != nil {
		return rep, fmt.Errorf("ledger: merge %s: %w", path, err)
	}
	return rep, nil
}

// readWorks reads a run's works with their accounts, each checked against
// its row checksum and its digest.
func (l *Ledger) readWorks(ctx context.Context, id pipeline.RunID) ([]transferWork, error) {
	var out []transferWork
	err := l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT rw.position, rw.base, rw.node_base, rw.action, "+prefixed("w.", workColumns)+
			" FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = ? ORDER BY rw.position", string(id))
		if err != nil {
			return err
		}
		for rows.Next() {
			var t transferWork
			w := &t.row
			if err := rows.Scan(&t.pos, &t.base, &t.nodeBase, &t.action,
				&w.id, &w.key, &w.nodes, &w.actions, &w.results, &w.errorsTxt, &w.span, summaryColumn{&w.summary}, &w.digest, &w.check); err != nil {
				rows.Close()
				return err
			}
			out = append(out, t)
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return err
		}
		for i := range out {
			t := &out[i]
			if err := t.row.checked(); err != nil {
				return err
			}
			if t.acct, err = storedAccount(ctx, tx, t.row); err != nil {
				return err
			}
			if got := t.acct.digest(); string(got) != string(t.row.digest) {
				return fmt.Errorf("%w: work %d of run %s: its nodes and results give digest %x, the row says %x", ErrIntegrity, t.row.id, id, got, t.row.digest)
			}
		}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("works of run %s: %w", id, err)
	}
	return out, nil
}

// writeWorks writes a run's works where node ids are those of ids (by
// key): a work whose key is already recorded must have the same digest.
func (l *Ledger) writeWorks(ctx context.Context, tx *qtx, run pipeline.RunID, works []transferWork, ids map[pipeline.KeyID]int64) error {
	for _, t := range works {
		row := t.row
		var nodes strings.Builder
		byKey := map[string]int64{}
		nodes.WriteByte('[')
		for i, n := range t.acct.nodes {
			id, ok := ids[pipeline.KeyID(digestText(n.key))]
			if !ok {
				return fmt.Errorf("work %d of run %s: node %s: %w", t.pos, run, digestText(n.key), ErrNotFound)
			}
			if i > 0 {
				nodes.WriteByte(',')
			}
			nodes.WriteString(strconv.FormatInt(id, 10))
			byKey[string(n.key)] = id
		}
		nodes.WriteByte(']')
		var results strings.Builder
		results.WriteByte('[')
		for i, r := range t.acct.results {
			label, err := json.Marshal(r.label)
			if err != nil {
				return err
			}
			if i > 0 {
				results.WriteByte(',')
			}
			fmt.Fprintf(&results, "[%d,%s,%d]", r.offset, label, byKey[string(r.key)])
		}
		results.WriteByte(']')
		row.nodes, row.results = nodes.String(), results.String()
		row.check = row.rowCheck()
		var id int64
		found := false
		if row.key != nil {
			var digest []byte
			err := tx.QueryRowContext(ctx, "SELECT id, digest FROM works WHERE key = ?", row.key).Scan(&id, &digest)
			switch {
			case err == nil:
				if string(digest) != string(row.digest) {
					return fmt.Errorf("%w: conflicting works for key %s: here digest %x, incoming %x", ErrIntegrity, digestText(row.key), digest, row.digest)
				}
				found = true
			case !errors.Is(err, sql.ErrNoRows):
				return err
			}
		}
		if !found {
			var key any
			if row.key != nil {
				key = row.key
			}
			res, err := tx.ExecContext(ctx, "INSERT INTO works (key, nodes, actions, results, errors, span, summary, digest, row_check, recorded_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
				key, row.nodes, row.actions, row.results, row.errorsTxt, row.span, storedSummary(row.summary), row.digest, row.check, formatTime(l.now()))
			if err != nil {
				return fmt.Errorf("insert work: %w", err)
			}
			if id, err = res.LastInsertId(); err != nil {
				return err
			}
		}
		if _, err := tx.ExecContext(ctx, "INSERT INTO run_works (run_id, position, work, base, node_base, action) VALUES (?, ?, ?, ?, ?, ?)",
			string(run), t.pos, id, t.base, t.nodeBase, t.action); err != nil {
			return fmt.Errorf("run %s work %d: %w", run, t.pos, err)
		}
	}
	return nil
}
