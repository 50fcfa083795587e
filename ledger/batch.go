package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"hash/maphash"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/inflatrace/inflatrace/pipeline"
)

// RecordNodes stores several nodes of one run in one transaction, with the
// same checks and semantics as RecordNode for each (pipeline.BatchRecorder):
// either every node of the batch is written or none is. Batching is what
// makes large scans affordable: one commit costs far more than one row.
func (l *Ledger) RecordNodes(ctx context.Context, run pipeline.RunID, batch []pipeline.Recorded) error {
	texts, bad, err := l.checkBatch(batch)
	if err != nil {
		return fmt.Errorf("ledger: record %s node %s in run %s: %w", batch[bad].Action, batch[bad].Node.Key, run, err)
	}
	used, err := l.recordBatch(ctx, run, batch, texts, true)
	if err != nil && used {
		// A key LookupMany found missing was written by another process
		// since: once more, reading every key.
		_, err = l.recordBatch(ctx, run, batch, texts, false)
	}
	if err != nil {
		return fmt.Errorf("ledger: record %d nodes in run %s: %w", len(batch), run, err)
	}
	return nil
}

// recordBatch is RecordNodes' transaction. With missing set, keys that
// LookupMany found absent moments ago are taken as absent without reading
// them again; used reports whether any was.
func (l *Ledger) recordBatch(ctx context.Context, run pipeline.RunID, batch []pipeline.Recorded, texts []rowText, missing bool) (used bool, err error) {
	return l.recordBatchWith(ctx, run, batch, texts, missing, nil)
}

// recordBatchWith is recordBatch calling after, when not nil, in the same
// transaction once the batch's rows are inserted.
func (l *Ledger) recordBatchWith(ctx context.Context, run pipeline.RunID, batch []pipeline.Recorded, texts []rowText, missing bool, after func(*qtx, *batchState) error) (used bool, err error) {
	var committed *batchState
	err = l.inTx(ctx, func(tx *qtx) error {
		if err := requireRunning(ctx, tx, run); err != nil {
			return err
		}
		bs := &batchState{known: map[pipeline.KeyID]storedNode{}, absent: map[pipeline.KeyID]bool{}}
		t := l.now()
		bs.now, bs.nowUnix = formatTime(t), t.Unix()
		var err error
		if bs.ordinal, err = nextOrdinal(ctx, tx, run); err != nil {
			return err
		}
		top, err := l.nodeTop(ctx, tx)
		if err != nil {
			return err
		}
		bs.nextID = top + 1
		if used, err = l.prefetch(ctx, tx, batch, bs, missing); err != nil {
			return err
		}
		for i, b := range batch {
			bs.noLink = b.InWork
			if err := l.recordNodeIn(ctx, tx, run, b.Node, texts[i], b.Action, bs); err != nil {
				return fmt.Errorf("node %s (%s): %w", b.Node.Key, b.Action, err)
			}
		}
		for _, t := range []struct {
			head, tail string
			cols       int
			rows       [][]any
		}{
			{"INSERT INTO node_rows (" + nodeInsertColumns + ") VALUES ", "", nodeInsertCount, bs.nodeRows},
			{"INSERT INTO node_inputs (node, position, input) VALUES ", "", 3, bs.inputRows},
			// A run executed in chunks may reuse one node in several: it is
			// linked once.
			{"INSERT INTO run_node_links (run_id, ordinal, node, action, duration_ns, error) VALUES ", " ON CONFLICT (run_id, node) DO NOTHING", 6, bs.linkRows},
		} {
			if err := insertRows(ctx, tx, t.head, t.tail, t.cols, t.rows); err != nil {
				return err
			}
		}
		if after != nil {
			if err := after(tx, bs); err != nil {
				return err
			}
		}
		tx.wroteNodes(&l.marks, bs.nextID-1, bs.wrote...)
		committed = bs
		return nil
	})
	if err == nil && committed != nil {
		// What this batch wrote or read, for the next batches' inputs and
		// works (ok rows never change; ids never do).
		for k, st := range committed.known {
			l.recent.put(k, st)
		}
		for _, k := range committed.healed {
			l.suspect.take(k)
		}
	}
	return used, err
}

var _ pipeline.BatchRecorder = (*Ledger)(nil)

// checkShare is the smallest share of a batch worth verifying on a goroutine
// of its own.
const checkShare = 1000

// checkBatch verifies every record of a batch (checkRecord) before the
// transaction begins, sharing a large batch among the CPUs: the writer is
// a scan's one serial step, and verification needs no database. The first
// refusal in batch order is returned with its index. The same goroutines
// resolve the shapes the ledger already holds and compute the nodes'
// authentication codes, so that the writer only writes.
func (l *Ledger) checkBatch(batch []pipeline.Recorded) ([]rowText, int, error) {
	texts := make([]rowText, len(batch))
	errs := make([]error, len(batch))
	parts := min(runtime.GOMAXPROCS(0), max(1, len(batch)/checkShare))
	var wg sync.WaitGroup
	for p := range parts {
		lo, hi := p*len(batch)/parts, (p+1)*len(batch)/parts
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := lo; i < hi; i++ {
				b := batch[i]
				texts[i], errs[i] = checkRecord(b.Node, b.Action, b.OutputsText, &l.shapes)
				if errs[i] == nil && b.Action != pipeline.Reused && b.Node.Status == pipeline.NodeOK {
					texts[i].mac = l.macOf(b.Node.Key, b.Node.Status, b.Node.OutputHash)
				}
			}
		}()
	}
	wg.Wait()
	for i, err := range errs {
		if err != nil {
			return nil, i, err
		}
	}
	return texts, 0, nil
}

// insertRows inserts rows with one single-row statement, prepared once
// per transaction (measured faster here than multi-row statements, whose
// arguments cost more to bind than the statements they save).
func insertRows(ctx context.Context, tx *qtx, head, tail string, cols int, rows [][]any) error {
	if len(rows) == 0 {
		return nil
	}
	q := head + "(" + strings.TrimSuffix(strings.Repeat("?, ", cols), ", ") + ")" + tail
	st, err := tx.stmt(ctx, q)
	if err != nil {
		return fmt.Errorf("%s...: %w", strings.Fields(head)[2], err)
	}
	for _, r := range rows {
		if _, err := st.ExecContext(ctx, r...); err != nil {
			return fmt.Errorf("%s...: %w", strings.Fields(head)[2], err)
		}
	}
	return nil
}

// prefetch reads in a few statements which of the batch's nodes and inputs
// are already stored, so that recording a node does not query for each.
// Reused nodes the engine has just looked up here are taken from the
// look-up's memory of their rows (their link's foreign key still checks
// that the row is there); with missing set, so are the new nodes it found
// not stored (l.missing), and used reports whether any was.
func (l *Ledger) prefetch(ctx context.Context, tx *qtx, batch []pipeline.Recorded, bs *batchState, missing bool) (used bool, err error) {
	seen := map[pipeline.KeyID]bool{}
	fresh := map[pipeline.KeyID]bool{}  // new nodes of this batch
	check := map[pipeline.KeyID]int64{} // keys taken as absent, with the snapshot that found them so
	var keys []pipeline.KeyID
	add := func(k pipeline.KeyID) {
		if !seen[k] {
			seen[k] = true
			keys = append(keys, k)
		}
	}
	for _, b := range batch {
		switch {
		case b.Action == pipeline.Reused:
			if st, ok := l.seen.take(b.Node.Key); ok {
				bs.known[b.Node.Key] = st
				continue
			}
		case missing && b.New:
			snap, err := l.marks.unheldSince(b.Node)
			if err != nil {
				return used, err
			}
			seen[b.Node.Key], bs.absent[b.Node.Key], used = true, true, true
			fresh[b.Node.Key], check[b.Node.Key] = true, snap
		case missing:
			if snap, ok := l.missing.take(b.Node.Key); ok {
				seen[b.Node.Key], bs.absent[b.Node.Key], used = true, true, true
				check[b.Node.Key] = snap
			}
		}
		add(b.Node.Key)
		for _, in := range b.Node.Inputs {
			switch {
			case fresh[in.Key]:
				// Recorded earlier in this batch (a batch is in settle
				// order: inputs first).
			case bs.known[in.Key].id != 0:
			default:
				if st, ok := l.recent.get(in.Key); ok {
					bs.known[in.Key] = st
					continue
				}
				add(in.Key)
			}
		}
	}
	// The keys taken as absent that could have been written since they
	// were found absent (writeMarks) are checked in one pass of the prefix
	// index (node_rows has no unique key index to refuse a second row): a
	// key recorded meanwhile fails the batch, which is then recorded again
	// reading every key. In a scan that is the only writer of its ledger,
	// the filter's false positives alone are checked.
	var taken [][]byte
	for k, snap := range check {
		if !l.marks.unchanged(k, snap) {
			taken = append(taken, keyArg(k))
		}
	}
	l.marks.checked.Add(int64(len(taken)))
	for len(taken) > 0 {
		n := min(len(taken), 500)
		cond, args := keyMatch("", taken[:n])
		var k []byte
		err := tx.QueryRowContext(ctx, "SELECT key FROM node_rows WHERE "+cond+" LIMIT 1", args...).Scan(&k)
		if err == nil {
			return used, fmt.Errorf("node %s: %w", digestText(k), errWrittenMeanwhile)
		}
		if !errors.Is(err, sql.ErrNoRows) {
			return used, err
		}
		taken = taken[n:]
	}
	for len(keys) > 0 {
		n := min(len(keys), 500)
		kbs := make([][]byte, n)
		for i, k := range keys[:n] {
			if _, ok := bs.known[k]; ok {
				kbs[i] = []byte{}
				continue
			}
			kbs[i] = keyArg(k)
			bs.absent[k] = true
		}
		cond, args := keyMatch("n.", kbs)
		rows, err := tx.QueryContext(ctx, "SELECT "+storedColumns+", n.key FROM "+nodeFrom+" WHERE "+cond+" ORDER BY n.id DESC", args...)
		if err != nil {
			return used, err
		}
		for rows.Next() {
			var key []byte
			st, err := scanStored(rows, &key)
			if err != nil {
				rows.Close()
				return used, err
			}
			k := pipeline.KeyID(digestText(key))
			bs.known[k] = st
			delete(bs.absent, k)
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return used, err
		}
		keys = keys[n:]
	}
	return used, nil
}

// errWrittenMeanwhile is a batch's key found stored although a look-up
// found it absent moments before.
var errWrittenMeanwhile = errors.New("recorded by another writer since it was looked up")

// LookupMany returns the successful nodes among keys, each fully decoded
// and verified as Lookup does (pipeline.BatchLookup). Large sets are read
// by two reader connections at once, each in a few queries.
func (l *Ledger) LookupMany(ctx context.Context, keys []pipeline.KeyID) (map[pipeline.KeyID]pipeline.NodeRecord, error) {
	out := make(map[pipeline.KeyID]pipeline.NodeRecord, len(keys))
	parts := [][]pipeline.KeyID{keys}
	if len(keys) >= 2*lookupSplit {
		parts = [][]pipeline.KeyID{keys[:len(keys)/2], keys[len(keys)/2:]}
	}
	found := make([][]storedRow, len(parts))
	errs := make([]error, len(parts))
	var wg sync.WaitGroup
	for i, part := range parts {
		wg.Add(1)
		go func() {
			defer wg.Done()
			found[i], errs[i] = l.lookupRows(ctx, part)
		}()
	}
	wg.Wait()
	for i := range parts {
		if errs[i] != nil {
			return nil, fmt.Errorf("ledger: look up %d nodes: %w", len(keys), errs[i])
		}
		for _, row := range found[i] {
			out[row.rec.Key] = row.rec
			l.seen.put(row.rec.Key, row.stored())
		}
	}
	return out, nil
}

// lookupSplit is the smallest share of a look-up worth a second reader.
const lookupSplit = 64

// lookupRows reads the ok rows among keys in one read transaction, 500
// keys at a time: their ids from the key index alone, then the rows in id
// order (the order a scan wrote them, so neighbouring rows share pages)
// and their inputs, each verified as it is finished.
func (l *Ledger) lookupRows(ctx context.Context, keys []pipeline.KeyID) ([]storedRow, error) {
	var out []storedRow
	err := l.inReadTx(ctx, func(tx *qtx) error {
		var snapshot sql.NullInt64
		if err := tx.QueryRowContext(ctx, "SELECT max(id) FROM node_rows").Scan(&snapshot); err != nil {
			return err
		}
		for len(keys) > 0 {
			n := min(len(keys), 500)
			args := make([]any, n)
			for i, k := range keys[:n] {
				args[i] = keyArg(k)
			}
			part := keys[:n]
			keys = keys[n:]
			ids, err := l.existing(ctx, tx, part, args, snapshot.Int64)
			if err != nil {
				return err
			}
			if len(ids) == 0 {
				continue
			}
			rows, err := tx.QueryContext(ctx, "SELECT "+nodeColumns+" FROM "+nodeFrom+" WHERE n.status = 'ok' AND n.id IN ("+marks(len(ids))+") ORDER BY n.id", ids...)
			if err != nil {
				return err
			}
			found := map[int64]*storedRow{}
			start := len(out)
			for rows.Next() {
				row, err := scanNode(rows)
				if errors.Is(err, ErrIntegrity) && row.rec.Key != "" {
					// An edited row is never served: the node is computed
					// again and its row rewritten (see suspect).
					l.suspect.put(row.rec.Key, err.Error())
					continue
				}
				if err != nil {
					rows.Close()
					return err
				}
				out = append(out, row)
			}
			rows.Close()
			if err := rows.Err(); err != nil {
				return err
			}
			for i := start; i < len(out); i++ {
				found[out[i].id] = &out[i]
			}
			if len(found) == 0 {
				continue
			}
			if err := loadInputs(ctx, tx, found); err != nil {
				return err
			}
			kept := out[:start]
			for i := start; i < len(out); i++ {
				if err := l.finishNode(ctx, tx, &out[i]); err != nil {
					if !errors.Is(err, ErrIntegrity) {
						return err
					}
					l.suspect.put(out[i].rec.Key, err.Error())
					continue
				}
				if p := l.macProblem(out[i].rec, out[i].mac); p != "" {
					l.suspect.put(out[i].rec.Key, p)
					continue
				}
				kept = append(kept, out[i])
			}
			out = kept
		}
		return nil
	})
	return out, err
}

// marks is n comma-separated placeholders.
func marks(n int) string { return strings.TrimSuffix(strings.Repeat("?, ", n), ", ") }

// existing returns the ids of the stored rows among keys (args are the
// keys as query arguments), from the key index alone, and remembers the
// keys not stored at all (l.missing), with snapshot, the largest node id
// tx sees, for recording them a moment later.
func (l *Ledger) existing(ctx context.Context, tx *qtx, keys []pipeline.KeyID, args []any, snapshot int64) ([]any, error) {
	kbs := make([][]byte, len(args))
	for i, a := range args {
		kbs[i] = a.([]byte)
	}
	cond, kargs := keyMatch("", kbs)
	rows, err := tx.QueryContext(ctx, "SELECT key, id FROM node_rows WHERE "+cond, kargs...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var ids []any
	stored := make(map[pipeline.KeyID]bool, len(keys))
	for rows.Next() {
		var key []byte
		var id int64
		if err := rows.Scan(&key, &id); err != nil {
			return nil, err
		}
		stored[pipeline.KeyID(digestText(key))] = true
		ids = append(ids, id)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	for _, k := range keys {
		if !stored[k] {
			l.missing.put(k, snapshot)
		}
	}
	return ids, nil
}

var _ pipeline.BatchLookup = (*Ledger)(nil)

// keyMemo is a small memory of keys a look-up has just answered, for the
// writer a moment later: entries are taken when used, and the memory is
// emptied when it grows past memoLimit (a miss only costs a read).
type keyMemo[V any] struct {
	mu sync.Mutex
	m  map[pipeline.KeyID]V
}

const memoLimit = 1 << 17

func (km *keyMemo[V]) put(k pipeline.KeyID, v V) {
	km.mu.Lock()
	defer km.mu.Unlock()
	if km.m == nil || len(km.m) >= memoLimit {
		km.m = map[pipeline.KeyID]V{}
	}
	km.m[k] = v
}

// get returns k's entry, keeping it.
func (km *keyMemo[V]) get(k pipeline.KeyID) (V, bool) {
	km.mu.Lock()
	defer km.mu.Unlock()
	v, ok := km.m[k]
	return v, ok
}

func (km *keyMemo[V]) take(k pipeline.KeyID) (V, bool) {
	km.mu.Lock()
	defer km.mu.Unlock()
	v, ok := km.m[k]
	if ok {
		delete(km.m, k)
	}
	return v, ok
}

// HoldsStage says whether the ledger holds any node of the stage version
// described with tool (pipeline.StageHolder), from node_kinds.
// A kind found not held is remembered with the largest node id of the
// same snapshot (writeMarks.unheldSince).
func (l *Ledger) HoldsStage(ctx context.Context, tool, stage string, version int) (bool, error) {
	var n int
	var top sql.NullInt64
	err := l.inReadTx(ctx, func(tx *qtx) error {
		if err := tx.QueryRowContext(ctx, "SELECT count(*) FROM kinds WHERE tool = ? AND stage = ? AND stage_version = ?", tool, stage, version).Scan(&n); err != nil {
			return err
		}
		return tx.QueryRowContext(ctx, "SELECT max(id) FROM node_rows").Scan(&top)
	})
	if err != nil {
		return false, fmt.Errorf("ledger: node kinds: %w", err)
	}
	if n == 0 {
		l.marks.unheld(nodeKind{tool, stage, version}, top.Int64)
	}
	return n > 0, nil
}

var _ pipeline.StageHolder = (*Ledger)(nil)

// writeMarks lets a batch tell whether a key it takes as absent could
// have been written since the snapshot that found it absent (a look-up of
// the key, or HoldsStage finding no node of its kind), without reading
// the key again. Node ids only grow and a row is never deleted nor given a
// key it did not have, so a row written after a snapshot has an id above
// the snapshot's largest. Every node row this Ledger writes is noted with
// its key (written, a Bloom filter); every row above own that a write
// transaction meets (which no other connection can interleave) was
// written by another connection, and foreign is the largest id such rows
// can have. A key found absent at a snapshot at or above foreign, and not
// in written, is still absent; any other is read again (prefetch).
type writeMarks struct {
	mu      sync.Mutex
	own     int64 // every node id up to own has been attributed
	foreign int64 // no row above it was written by another connection
	written bloomSet
	kinds   map[nodeKind]int64 // kinds found not held, with the snapshot's largest node id
	checked atomic.Int64       // keys taken as absent and read again (for tests)
}

// start reads the largest node id at Open: the rows up to it count as
// another connection's.
func (m *writeMarks) start(ctx context.Context, db *sql.DB) error {
	var top sql.NullInt64
	if err := db.QueryRowContext(ctx, "SELECT max(id) FROM node_rows").Scan(&top); err != nil {
		return fmt.Errorf("read the largest node id: %w", err)
	}
	m.mu.Lock()
	m.own, m.foreign = top.Int64, top.Int64
	m.mu.Unlock()
	return nil
}

// observe is told the largest node id read inside a write transaction:
// the rows above own were written by another connection.
func (m *writeMarks) observe(top int64) {
	m.mu.Lock()
	defer m.mu.Unlock()
	if top > m.own {
		m.own, m.foreign = top, top
	}
}

// wrote notes rows up to top written by this Ledger with keys.
func (m *writeMarks) wrote(top int64, keys []pipeline.KeyID) {
	m.mu.Lock()
	defer m.mu.Unlock()
	for _, k := range keys {
		m.written.add(k)
	}
	m.own = max(m.own, top)
}

// unchanged says whether key k, found absent by a snapshot whose largest
// node id was snapshot, can only be absent still.
func (m *writeMarks) unchanged(k pipeline.KeyID, snapshot int64) bool {
	m.mu.Lock()
	defer m.mu.Unlock()
	return snapshot >= m.foreign && !m.written.has(k)
}

// unheld notes that a snapshot whose largest node id was top held no node
// of kind k (HoldsStage).
func (m *writeMarks) unheld(k nodeKind, top int64) {
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.kinds == nil {
		m.kinds = map[nodeKind]int64{}
	}
	if old, ok := m.kinds[k]; !ok || top > old {
		m.kinds[k] = top
	}
}

// unheldSince returns the largest node id of the latest snapshot found to
// hold no node of rec's kind (-1 when none was: never unchanged).
func (m *writeMarks) unheldSince(rec pipeline.NodeRecord) (int64, error) {
	tool, err := describedTool(rec.Description)
	if err != nil {
		return 0, fmt.Errorf("%w: node %s: description: %v", ErrIntegrity, rec.Key, err)
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	if top, ok := m.kinds[nodeKind{tool, rec.Stage, rec.Version}]; ok {
		return top, nil
	}
	return -1, nil
}

// nodeTop returns the largest node id inside write transaction tx (read
// once, before tx writes a node row), attributing the rows above what this
// Ledger has seen to another connection.
func (l *Ledger) nodeTop(ctx context.Context, tx *qtx) (int64, error) {
	if !tx.topRead {
		var t sql.NullInt64
		if err := tx.QueryRowContext(ctx, "SELECT max(id) FROM node_rows").Scan(&t); err != nil {
			return 0, err
		}
		tx.topRead, tx.nodeTop = true, t.Int64
		l.marks.observe(t.Int64)
	}
	return tx.nodeTop, nil
}

// wroteNodes notes that tx wrote node rows with keys, up to id; they are
// noted in m once tx commits. nodeTop must have been called in tx first.
func (tx *qtx) wroteNodes(m *writeMarks, id int64, keys ...pipeline.KeyID) {
	if !tx.topRead || len(keys) == 0 {
		return
	}
	tx.onCommit = append(tx.onCommit, func() { m.wrote(id, keys) })
}

// bloomSet is a growing Bloom filter of keys: a chain of filters of
// doubling capacity, about 1% false positives each.
type bloomSet struct {
	filters []bloom
}

// bloom is one filter of bloomSet.
type bloom struct {
	bits        []uint64
	n, capacity int
}

const (
	bloomFirst  = 1 << 16 // capacity of the first filter
	bloomBits   = 10      // bits per key
	bloomHashes = 7
)

var bloomSeed = maphash.MakeSeed()

func bloomHash(k pipeline.KeyID) (uint64, uint64) {
	h := maphash.String(bloomSeed, string(k))
	return h, h>>32 | h<<32 | 1
}

func (s *bloomSet) add(k pipeline.KeyID) {
	if len(s.filters) == 0 || s.filters[len(s.filters)-1].n >= s.filters[len(s.filters)-1].capacity {
		c := bloomFirst << len(s.filters)
		s.filters = append(s.filters, bloom{bits: make([]uint64, (c*bloomBits+63)/64), capacity: c})
	}
	f := &s.filters[len(s.filters)-1]
	h1, h2 := bloomHash(k)
	m := uint64(len(f.bits) * 64)
	for i := range uint64(bloomHashes) {
		b := (h1 + i*h2) % m
		f.bits[b/64] |= 1 << (b % 64)
	}
	f.n++
}

func (s *bloomSet) has(k pipeline.KeyID) bool {
	h1, h2 := bloomHash(k)
	for fi := range s.filters {
		f := &s.filters[fi]
		m := uint64(len(f.bits) * 64)
		in := true
		for i := range uint64(bloomHashes) {
			b := (h1 + i*h2) % m
			if f.bits[b/64]&(1<<(b%64)) == 0 {
				in = false
				break
			}
		}
		if in {
			return true
		}
	}
	return false
}
