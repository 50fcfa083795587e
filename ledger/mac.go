package ledger

import (
	"context"
	"crypto/hmac"
	"crypto/sha256"
	"fmt"
	"hash"

	"github.com/inflatrace/inflatrace/pipeline"
)

// unvouched prefixes the suspicion of a row that carries no code of this
// user's: computed again, it only gains a code if its outputs agree.
const unvouched = "unvouched: "

// WithNodeKey makes the ledger authenticate nodes: every node it writes
// carries an HMAC-SHA256 code under key, and a look-up serves a node only
// when its code matches (otherwise the node is computed again; a row whose
// outputs then differ is quarantined). Without it (the default) nodes are
// neither given codes nor checked for them.
func WithNodeKey(key []byte) Option {
	return func(l *Ledger) { l.macKey = append([]byte(nil), key...) }
}

// WithRetiredNodeKeys names the secrets of the user's retired keys: a
// node whose code matches one of them is served as if it matched the
// current key (a key rotation is routine, not an edit). New codes are
// only ever made under the current key.
func WithRetiredNodeKeys(keys [][]byte) Option {
	return func(l *Ledger) {
		for _, k := range keys {
			l.retiredMacKeys = append(l.retiredMacKeys, append([]byte(nil), k...))
		}
	}
}

// macOf is a node's code: HMAC-SHA256 of a version tag, its key, its
// status and its output hash, truncated to macBytes. nil without a node key.
func (l *Ledger) macOf(key pipeline.KeyID, status pipeline.NodeStatus, out pipeline.OutputID) []byte {
	if l.macKey == nil {
		return nil
	}
	m, _ := l.macs.Get().(hash.Hash)
	if m == nil {
		m = hmac.New(sha256.New, l.macKey)
	}
	defer l.macs.Put(m)
	m.Reset()
	return writeNodeMAC(m, key, status, out)
}

// nodeCodeMatches says whether mac is the node's code under the current
// key or one of the retired ones.
func (l *Ledger) nodeCodeMatches(mac []byte, key pipeline.KeyID, status pipeline.NodeStatus, hash pipeline.OutputID) bool {
	if hmac.Equal(mac, l.macOf(key, status, hash)) {
		return true
	}
	for _, k := range l.retiredMacKeys {
		if hmac.Equal(mac, macUnder(k, key, status, hash)) {
			return true
		}
	}
	return false
}

// workCodeMatches says whether mac is the work's code under the current
// key or one of the retired ones.
func (l *Ledger) workCodeMatches(mac, digest []byte) bool {
	if hmac.Equal(mac, l.workMAC(digest)) {
		return true
	}
	for _, k := range l.retiredMacKeys {
		if hmac.Equal(mac, workMACUnder(k, digest)) {
			return true
		}
	}
	return false
}

// macUnder is a node's code under secret.
func macUnder(secret []byte, key pipeline.KeyID, status pipeline.NodeStatus, hash pipeline.OutputID) []byte {
	return writeNodeMAC(hmac.New(sha256.New, secret), key, status, hash)
}

// writeNodeMAC writes a node's message into a fresh or reset HMAC and
// returns the truncated code.
func writeNodeMAC(m hash.Hash, key pipeline.KeyID, status pipeline.NodeStatus, out pipeline.OutputID) []byte {
	var buf [256]byte
	msg := append(buf[:0], "inflatrace-node-mac/1\n"...)
	msg = append(msg, key...)
	msg = append(msg, '\n', status[0], '\n')
	msg = append(msg, out...)
	m.Write(msg)
	var sum [sha256.Size]byte
	return append([]byte(nil), m.Sum(sum[:0])[:macBytes]...)
}

// macBytes is the length codes are truncated to: 128 bits, as RFC 2104
// (section 5) allows for HMAC (half the hash's output, and no fewer than
// 80 bits); it saves 16 bytes a node.
const macBytes = 16

// macProblem says why a row's code does not vouch for it ("" when it
// does, or when the ledger has no node key).
func (l *Ledger) macProblem(rec pipeline.NodeRecord, mac []byte) string {
	if l.macKey == nil {
		return ""
	}
	if mac == nil {
		return unvouched + "node " + string(rec.Key) + " carries no authentication code of yours (merged from a ledger you have not vouched for, or written before codes)"
	}
	if !l.nodeCodeMatches(mac, rec.Key, rec.Status, rec.OutputHash) {
		return fmt.Sprintf("%v: node %s: its authentication code does not match its row: the row was edited (its outputs and output hash rewritten together), or written under another key", ErrIntegrity, rec.Key)
	}
	return ""
}

// Vouch gives this user's code to every node run linked that has none,
// once the run's seal is checked intact: the seal binds each node's key
// and output hash, and a row's outputs are checked against its output
// hash on every read, so the code vouches for what the seal does. The
// caller vouches for the run itself (its seal signed by a trusted key, or
// verify recomputed every node). It returns how many nodes gained a code.
func (l *Ledger) Vouch(ctx context.Context, run pipeline.RunID) (int, error) {
	if l.macKey == nil {
		return 0, nil
	}
	sealed, problem, err := l.CheckSeal(ctx, run)
	if err != nil {
		return 0, err
	}
	if !sealed || problem != nil {
		return 0, fmt.Errorf("ledger: vouch for run %s: its seal is missing or broken", run)
	}
	n := 0
	err = l.inTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, `SELECT n.id, n.key, n.status, n.output_hash FROM run_nodes rn JOIN node_rows n ON n.id = rn.node
			WHERE rn.run_id = ? AND n.status = 'ok' AND n.mac IS NULL`, string(run))
		if err != nil {
			return err
		}
		type pending struct {
			id  int64
			mac []byte
		}
		var todo []pending
		for rows.Next() {
			var id int64
			var key, hash []byte
			var status string
			if err := rows.Scan(&id, &key, &status, &hash); err != nil {
				rows.Close()
				return err
			}
			todo = append(todo, pending{id, l.macOf(pipeline.KeyID(digestText(key)), pipeline.NodeStatus(status), pipeline.OutputID(digestText(hash)))})
		}
		rows.Close()
		if err := rows.Err(); err != nil {
			return err
		}
		for _, p := range todo {
			if _, err := tx.ExecContext(ctx, "UPDATE node_rows SET mac = ? WHERE id = ? AND mac IS NULL", p.mac, p.id); err != nil {
				return err
			}
		}
		n = len(todo)
		// The run's works, whose digests its seal covers.
		ws, err := tx.QueryContext(ctx, "SELECT w.id, w.digest FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = ? AND w.mac IS NULL", string(run))
		if err != nil {
			return err
		}
		var wt []pending
		for ws.Next() {
			var id int64
			var digest []byte
			if err := ws.Scan(&id, &digest); err != nil {
				ws.Close()
				return err
			}
			wt = append(wt, pending{id, l.workMAC(digest)})
		}
		ws.Close()
		for _, p := range wt {
			if _, err := tx.ExecContext(ctx, "UPDATE works SET mac = ? WHERE id = ?", p.mac, p.id); err != nil {
				return err
			}
		}
		return ws.Err()
	})
	if err != nil {
		return 0, fmt.Errorf("ledger: vouch for run %s: %w", run, err)
	}
	return n, nil
}

// MACProblems reports every ok node whose code does not match its row,
// and counts those without a code of this user's.
func (l *Ledger) MACProblems(ctx context.Context) (problems []Problem, without int, err error) {
	if l.macKey == nil {
		return nil, 0, nil
	}
	err = l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT key, status, output_hash, mac FROM node_rows WHERE status = 'ok' ORDER BY id")
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var key, hash, mac []byte
			var status string
			if err := rows.Scan(&key, &status, &hash, &mac); err != nil {
				return err
			}
			if mac == nil {
				without++
				continue
			}
			k := pipeline.KeyID(digestText(key))
			if !l.nodeCodeMatches(mac, k, pipeline.NodeStatus(status), pipeline.OutputID(digestText(hash))) {
				problems = append(problems, Problem{Table: "nodes", ID: string(k),
					What: "its authentication code does not match its row: the row was edited (its outputs and output hash rewritten together), or written under another key"})
			}
		}
		return rows.Err()
	})
	if err != nil {
		return nil, 0, fmt.Errorf("ledger: check authentication codes: %w", err)
	}
	return problems, without, nil
}

// workMAC is a work's code: HMAC-SHA256 of a version tag and its digest.
func (l *Ledger) workMAC(digest []byte) []byte {
	if l.macKey == nil {
		return nil
	}
	return workMACUnder(l.macKey, digest)
}

// workMACUnder is a work's code under secret.
func workMACUnder(secret, digest []byte) []byte {
	m := hmac.New(sha256.New, secret)
	m.Write([]byte("inflatrace-work-mac/1\n"))
	m.Write(digest)
	return m.Sum(nil)[:macBytes]
}
