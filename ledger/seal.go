package ledger

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/binary"
	"encoding/hex"
	"fmt"
	"strconv"

	"github.com/inflatrace/inflatrace/pipeline"
)

// SealVersion names the layout of the text a seal is the hash of.
const SealVersion = "inflatrace-seal/1"

// sealOf computes the seal of a finished run from its rows: the SHA-256
// of a text that writes, one line each, the seal version, the run's id,
// tool version, configuration hash, status and error, the run it was
// derived from and the runs it assembles, every result in order (ordinal,
// node key, label) and every node it linked in order (ordinal, key, what
// the run did, the output hash as the run saw it, the run's error for the
// node; these lines in binary, see sealOf's loop) and, for a run recorded
// by works, every work in order (position, bases, action, digest). Any edit to one of these rows after the seal was written changes
// it. A node row that later changes legitimately (a failed node computed
// again by another run) does not: the run's own account is sealed.
func sealOf(ctx context.Context, tx *qtx, id pipeline.RunID) (string, error) {
	h := sha256.New()
	line := func(parts ...string) {
		for i, p := range parts {
			if i > 0 {
				h.Write([]byte{' '})
			}
			h.Write([]byte(p))
		}
		h.Write([]byte{'\n'})
	}
	d, err := readRun(ctx, tx, id)
	if err != nil {
		return "", err
	}
	line(SealVersion)
	line("run", strconv.Quote(string(d.ID)))
	line("tool", strconv.Quote(d.ToolVersion))
	line("config", d.ConfigHash)
	line("status", string(d.Status), strconv.Quote(d.Error))
	line("derived_from", strconv.Quote(string(d.DerivedFrom)))
	for i, p := range d.Parts {
		line("part", strconv.Itoa(i), strconv.Quote(string(p)))
	}
	res, err := tx.QueryContext(ctx, `SELECT rr.ordinal, n.key, rr.label FROM run_result_rows rr JOIN node_rows n ON n.id = rr.node
		WHERE rr.run_id = ? ORDER BY rr.ordinal`, string(id))
	if err != nil {
		return "", err
	}
	for res.Next() {
		var ord int
		var key []byte
		var label string
		if err := res.Scan(&ord, &key, &label); err != nil {
			res.Close()
			return "", err
		}
		line("result", strconv.Itoa(ord), hex.EncodeToString(key), strconv.Quote(label))
	}
	if err := res.Close(); err != nil {
		return "", err
	}
	ns, err := tx.QueryContext(ctx, `SELECT rn.ordinal, n.key, rn.action, n.output_hash, rn.error FROM run_node_links rn JOIN node_rows n ON n.id = rn.node
		WHERE rn.run_id = ? ORDER BY rn.ordinal`, string(id))
	if err != nil {
		return "", err
	}
	defer ns.Close()
	// Node lines are many (five a point): written in binary, the key and
	// output hash as their 32 bytes, the ordinal and lengths as varints.
	buf := make([]byte, 0, 128)
	for ns.Next() {
		var ord int64
		var key, hash, action, errText sql.RawBytes
		if err := ns.Scan(&ord, &key, &action, &hash, &errText); err != nil {
			return "", err
		}
		buf = append(buf[:0], "node "...)
		buf = binary.AppendUvarint(buf, uint64(ord))
		buf = append(buf, key...)
		buf = binary.AppendUvarint(buf, uint64(len(action)))
		buf = append(buf, action...)
		if string(action) == string(pipeline.Failed) {
			buf = append(buf, 0)
		} else {
			buf = append(buf, byte(len(hash)))
			buf = append(buf, hash...)
		}
		buf = binary.AppendUvarint(buf, uint64(len(errText)))
		buf = append(buf, errText...)
		h.Write(buf)
	}
	if err := ns.Err(); err != nil {
		return "", err
	}
	ns.Close()
	// A run recorded by works seals each by its digest (which covers its
	// nodes and results; verify recomputes it from them).
	ws, err := tx.QueryContext(ctx, `SELECT rw.position, rw.base, rw.node_base, rw.action, w.digest FROM run_works rw JOIN works w ON w.id = rw.work
		WHERE rw.run_id = ? ORDER BY rw.position`, string(id))
	if err != nil {
		return "", err
	}
	defer ws.Close()
	for ws.Next() {
		var pos, base, nodeBase int
		var action string
		var digest []byte
		if err := ws.Scan(&pos, &base, &nodeBase, &action, &digest); err != nil {
			return "", err
		}
		line("work", strconv.Itoa(pos), strconv.Itoa(base), strconv.Itoa(nodeBase), action, hex.EncodeToString(digest))
	}
	if err := ws.Err(); err != nil {
		return "", err
	}
	return "sha256:" + hex.EncodeToString(h.Sum(nil)), nil
}

// writeSeal seals a finished run, and signs the seal when the ledger has
// a signer.
func (l *Ledger) writeSeal(ctx context.Context, tx *qtx, id pipeline.RunID) error {
	seal, err := sealOf(ctx, tx, id)
	if err != nil {
		return fmt.Errorf("seal run %s: %w", id, err)
	}
	var sig any
	if l.sealSigner != nil {
		b, err := l.sealSigner(SealMessage(id, seal))
		if err != nil {
			return fmt.Errorf("sign the seal of run %s: %w", id, err)
		}
		sig = string(b)
	}
	_, err = tx.ExecContext(ctx, "UPDATE runs SET seal = ?, seal_signature = ? WHERE id = ?", seal, sig, string(id))
	return err
}

// SealMessage is what a seal's signature signs: the seal version, the
// run's id and its seal.
func SealMessage(id pipeline.RunID, seal string) []byte {
	return []byte(SealVersion + "\nrun " + strconv.Quote(string(id)) + "\nseal " + seal + "\n")
}

// WithSealSigner makes the ledger sign every seal it writes with sign
// (given SealMessage, it returns the signature to store).
func WithSealSigner(sign func(msg []byte) ([]byte, error)) Option {
	return func(l *Ledger) { l.sealSigner = sign }
}

// SealedRun is a finished run's seal and its signature.
type SealedRun struct {
	Run             pipeline.RunID
	Seal, Signature string
}

// Sealed lists every sealed run with its seal's signature (empty when
// unsigned), for a verifier that knows which keys to trust.
func (l *Ledger) Sealed(ctx context.Context) ([]SealedRun, error) {
	var out []SealedRun
	err := l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT id, seal, coalesce(seal_signature, '') FROM runs WHERE seal IS NOT NULL ORDER BY id")
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var s SealedRun
			if err := rows.Scan(&s.Run, &s.Seal, &s.Signature); err != nil {
				return err
			}
			out = append(out, s)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: sealed runs: %w", err)
	}
	return out, nil
}

// SealProblems recomputes the seal of every finished run and reports the
// runs whose rows were edited after they were sealed, and lists the
// finished runs that carry no seal (finished before seals existed).
func (l *Ledger) SealProblems(ctx context.Context) (problems []Problem, unsealed []pipeline.RunID, err error) {
	err = l.inReadTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT id, seal FROM runs WHERE status <> 'running' ORDER BY id")
		if err != nil {
			return err
		}
		type run struct {
			id   string
			seal sql.NullString
		}
		var runs []run
		for rows.Next() {
			var r run
			if err := rows.Scan(&r.id, &r.seal); err != nil {
				rows.Close()
				return err
			}
			runs = append(runs, r)
		}
		if err := rows.Close(); err != nil {
			return err
		}
		for _, r := range runs {
			if !r.seal.Valid {
				unsealed = append(unsealed, pipeline.RunID(r.id))
				continue
			}
			got, err := sealOf(ctx, tx, pipeline.RunID(r.id))
			if err != nil {
				return err
			}
			if got != r.seal.String {
				problems = append(problems, Problem{Table: "runs", ID: r.id,
					What: fmt.Sprintf("the run's rows (configuration hash, status, results, node links) seal to %s, the seal written at its end is %s: a row was edited after the run finished", got, r.seal.String)})
			}
		}
		return nil
	})
	if err != nil {
		return nil, nil, fmt.Errorf("ledger: check seals: %w", err)
	}
	return problems, unsealed, nil
}

// CheckSeal recomputes one run's seal: sealed is false for a run without
// one (running, or finished before seals); a seal that no longer matches
// the run's rows is returned as a Problem.
func (l *Ledger) CheckSeal(ctx context.Context, id pipeline.RunID) (sealed bool, problem *Problem, err error) {
	err = l.inReadTx(ctx, func(tx *qtx) error {
		d, err := readRun(ctx, tx, id)
		if err != nil {
			return err
		}
		if d.Seal == "" {
			return nil
		}
		sealed = true
		got, err := sealOf(ctx, tx, id)
		if err != nil {
			return err
		}
		if got != d.Seal {
			problem = &Problem{Table: "runs", ID: string(id),
				What: fmt.Sprintf("the run's rows seal to %s, the seal written at its end is %s: a row was edited after the run finished", got, d.Seal)}
			return nil
		}
		// The seal covers each work by its digest: the works themselves are
		// checked against their rows and nodes.
		problem, err = runWorkProblem(ctx, tx, id)
		return err
	})
	if err != nil {
		return false, nil, fmt.Errorf("ledger: check the seal of run %s: %w", id, err)
	}
	return sealed, problem, nil
}

// runWorkProblem checks each work of a run against its row checksum and
// its digest, and returns the first problem.
func runWorkProblem(ctx context.Context, tx *qtx, id pipeline.RunID) (*Problem, error) {
	rows, err := tx.QueryContext(ctx, "SELECT "+prefixed("w.", workColumns)+" FROM run_works rw JOIN works w ON w.id = rw.work WHERE rw.run_id = ? ORDER BY rw.position", string(id))
	if err != nil {
		return nil, err
	}
	var ws []workRow
	for rows.Next() {
		w, err := scanWork(rows)
		if err != nil {
			rows.Close()
			return nil, err
		}
		ws = append(ws, w)
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return nil, err
	}
	for _, w := range ws {
		if err := w.checked(); err != nil {
			return &Problem{Table: "works", ID: strconv.FormatInt(w.id, 10), What: err.Error()}, nil
		}
		acct, err := storedAccount(ctx, tx, w)
		if err != nil {
			return &Problem{Table: "works", ID: strconv.FormatInt(w.id, 10), What: err.Error()}, nil
		}
		if got := acct.digest(); string(got) != string(w.digest) {
			return &Problem{Table: "works", ID: strconv.FormatInt(w.id, 10),
				What: fmt.Sprintf("work %d of the run: its nodes and results give digest %x, the row says %x: a row was edited after the run finished", w.id, got, w.digest)}, nil
		}
	}
	return nil, nil
}
