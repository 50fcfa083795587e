package ledger

import (
	"context"
	"database/sql"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"

	"github.com/inflatrace/inflatrace/pipeline"
)

// Packed values (migration 0017). A node's parameters and its outputs are
// each stored as a shape and a blob: the shape (table shapes) is the
// canonical text of the values with every float written as a slot
// reference "$k", the blob the slots' float64 bits, 8 bytes each, big
// endian. The nodes of one stage mostly share a few shapes (names, units,
// strings and small integers are the same from point to point), so a row
// stores only its floats. The canonical text, which the output hash and
// the key are taken of, is the shape with each slot written back in its
// shortest round-trip form: packing loses nothing.
//
// A float that is an integer of magnitude at most packInline is written
// into the shape itself (a counter, a sign, an exponent of 2 or 0), and
// equal floats of one set share a slot.

// packInline is the largest magnitude of an integral float written into a
// shape rather than a slot.
const packInline = 64

// packed is a set of values split into its shape and its slots.
type packed struct {
	shape string
	slots []uint64 // float64 bits
	id    int64    // the shape's id when the ledger had it committed (else 0; shape is then set)
}

// packText splits vs into a shape and slots, given its canonical text
// (Values.Encode), which it rewrites line by line: a float line's number becomes a slot
// reference unless it is a small integer, every other byte is copied.
// With strict set it also checks that text is exactly the canonical text
// of vs (each value once, in name order, floats in shortest form), as
// cheaply as writing it. A shape the ledger has committed is resolved
// from book (when not nil) without keeping a copy of its text.
func packText(text string, vs pipeline.Values, strict bool, book *shapeBook) (packed, error) {
	var p packed
	var arr [512]byte
	b := arr[:0]
	if len(text) > len(arr) {
		b = make([]byte, 0, len(text))
	}
	lines, prev := 0, ""
	for pos := 0; pos < len(text); {
		end := strings.IndexByte(text[pos:], '\n')
		if end < 0 {
			return p, fmt.Errorf("canonical text: line %q has no newline", text[pos:])
		}
		line := text[pos : pos+end+1]
		pos += end + 1
		sp := strings.IndexByte(line, ' ')
		lines++
		if strict {
			if sp <= 0 || line[:sp] <= prev {
				return p, fmt.Errorf("line %q: names not in order after %q", strings.TrimSuffix(line, "\n"), prev)
			}
			prev = line[:sp]
		}
		if sp <= 0 || !strings.HasPrefix(line[sp:], " f ") {
			if strict {
				v, ok := vs[line[:sp]]
				if !ok || v.Kind != pipeline.KindString || !strings.HasPrefix(line[sp:], " s ") ||
					line[sp+len(" s "):len(line)-1] != strconv.Quote(v.Str) {
					return p, fmt.Errorf("line %q is not the canonical line of a value of the record (%v)", strings.TrimSuffix(line, "\n"), v)
				}
			}
			b = append(b, line...) // a string line
			continue
		}
		numStart := sp + len(" f ")
		numEnd := numStart + strings.IndexByte(line[numStart:], ' ')
		if numEnd < numStart {
			return p, fmt.Errorf("canonical text: float line %q has no unit", line)
		}
		v, ok := vs[line[:sp]]
		if !ok || v.Kind != pipeline.KindFloat {
			return p, fmt.Errorf("canonical text: line %q is not one of the values", line)
		}
		x := v.Float
		if strict {
			if f := pipeline.FormatFloat(x); line[numStart:numEnd] != f || line[numEnd+1:len(line)-1] != v.Unit {
				return p, fmt.Errorf("line %q, the value's canonical line is %q", strings.TrimSuffix(line, "\n"), line[:sp]+" f "+f+" "+v.Unit)
			}
		}
		b = append(b, line[:numStart]...)
		if x == math.Trunc(x) && math.Abs(x) <= packInline {
			b = append(b, line[numStart:numEnd]...)
		} else {
			bits := math.Float64bits(x)
			k := slices.Index(p.slots, bits)
			if k < 0 {
				k = len(p.slots)
				p.slots = append(p.slots, bits)
			}
			b = append(b, '$')
			b = strconv.AppendInt(b, int64(k), 10)
		}
		b = append(b, line[numEnd:]...)
	}
	if strict && lines != len(vs) {
		return p, fmt.Errorf("%d lines for %d values", lines, len(vs))
	}
	if book != nil {
		if id, ok := book.lookupBytes(b); ok {
			p.id = id
			return p, nil
		}
	}
	p.shape = string(b)
	return p, nil
}

// slotBytes is the stored blob of p's slots.
func (p packed) slotBytes() []byte {
	b := make([]byte, 8*len(p.slots))
	for i, s := range p.slots {
		binary.BigEndian.PutUint64(b[8*i:], s)
	}
	return b
}

// shape is a stored shape, parsed for unpacking.
type shape struct {
	text  string
	parts []shapePart // the text between slots, and the slot after each
	slots int
}

// shapePart is a piece of literal text followed by slot (or -1: none).
type shapePart struct {
	lit  string
	slot int
}

// parseShape splits a shape's text at its slot references: a line
// "<name> f $<k> <unit>" takes slot k (a name holds no space, and a
// string line, "<name> s <quoted>", is always literal).
func parseShape(text string) (*shape, error) {
	sh := &shape{text: text}
	lit := 0 // start of the literal text not yet in a part
	for pos := 0; pos < len(text); {
		end := strings.IndexByte(text[pos:], '\n')
		if end < 0 {
			return nil, fmt.Errorf("shape: line %q has no newline", text[pos:])
		}
		line := text[pos : pos+end]
		if i := strings.IndexByte(line, ' '); i > 0 && strings.HasPrefix(line[i:], " f $") {
			j := i + len(" f $")
			k := j
			for k < len(line) && line[k] >= '0' && line[k] <= '9' {
				k++
			}
			n, err := strconv.Atoi(line[j:k])
			if err != nil || k == len(line) || line[k] != ' ' {
				return nil, fmt.Errorf("shape: bad slot reference in line %q", line)
			}
			sh.parts = append(sh.parts, shapePart{lit: text[lit : pos+j-1], slot: n})
			sh.slots = max(sh.slots, n+1)
			lit = pos + k
		}
		pos += end + 1
	}
	sh.parts = append(sh.parts, shapePart{lit: text[lit:], slot: -1})
	return sh, nil
}

// unpack writes the canonical text of a shape's values from their slots.
func (sh *shape) unpack(blob []byte) (string, error) {
	if len(blob) != 8*sh.slots {
		return "", fmt.Errorf("%d bytes of floats for a shape of %d slots", len(blob), sh.slots)
	}
	b := make([]byte, 0, len(sh.text)+16*sh.slots)
	for _, p := range sh.parts {
		b = append(b, p.lit...)
		if p.slot >= 0 {
			x := math.Float64frombits(binary.BigEndian.Uint64(blob[8*p.slot:]))
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return "", fmt.Errorf("slot %d holds %g: not finite", p.slot, x)
			}
			b = strconv.AppendFloat(b, x, 'g', -1, 64)
		}
	}
	return string(b), nil
}

// shapeBook is a ledger's memory of the shapes it has read or written:
// shapes never change once committed, so an entry cannot go stale.
type shapeBook struct {
	mu     sync.RWMutex
	byText map[string]int64
	byID   map[int64]*shape
}

func (sb *shapeBook) lookupText(text string) (int64, bool) {
	sb.mu.RLock()
	defer sb.mu.RUnlock()
	id, ok := sb.byText[text]
	return id, ok
}

// lookupBytes is lookupText of a text still in a buffer (no copy made).
func (sb *shapeBook) lookupBytes(text []byte) (int64, bool) {
	sb.mu.RLock()
	defer sb.mu.RUnlock()
	id, ok := sb.byText[string(text)]
	return id, ok
}

func (sb *shapeBook) lookupID(id int64) (*shape, bool) {
	sb.mu.RLock()
	defer sb.mu.RUnlock()
	sh, ok := sb.byID[id]
	return sh, ok
}

func (sb *shapeBook) put(id int64, sh *shape) {
	sb.mu.Lock()
	defer sb.mu.Unlock()
	if sb.byText == nil {
		sb.byText, sb.byID = map[string]int64{}, map[int64]*shape{}
	}
	sb.byText[sh.text], sb.byID[id] = id, sh
}

// shapeID returns the id of a shape's text, storing it (with its lines,
// for the views) when the ledger holds no such shape. A shape stored by
// tx is remembered once tx commits.
func (l *Ledger) shapeID(ctx context.Context, tx *qtx, text string) (int64, error) {
	if id, ok := l.shapes.lookupText(text); ok {
		return id, nil
	}
	if id, ok := tx.newShapes[text]; ok {
		return id, nil
	}
	sh, err := parseShape(text)
	if err != nil {
		return 0, err
	}
	var id int64
	err = tx.QueryRowContext(ctx, "SELECT id FROM shapes WHERE text = ?", text).Scan(&id)
	switch {
	case err == nil:
		l.shapes.put(id, sh)
		return id, nil
	case !errors.Is(err, sql.ErrNoRows):
		return 0, fmt.Errorf("read shape: %w", err)
	}
	res, err := tx.ExecContext(ctx, "INSERT INTO shapes (text, slots) VALUES (?, ?)", text, sh.slots)
	if err != nil {
		return 0, fmt.Errorf("insert shape: %w", err)
	}
	if id, err = res.LastInsertId(); err != nil {
		return 0, fmt.Errorf("insert shape: %w", err)
	}
	if err := insertShapeLines(ctx, tx, id, text); err != nil {
		return 0, err
	}
	if tx.newShapes == nil {
		tx.newShapes = map[string]int64{}
	}
	tx.newShapes[text] = id
	tx.onCommit = append(tx.onCommit, func() { l.shapes.put(id, sh) })
	return id, nil
}

// insertShapeLines writes a shape's lines into shape_lines, which the
// views read (SQL cannot parse the shape's text into values).
func insertShapeLines(ctx context.Context, tx *qtx, id int64, text string) error {
	for i, line := range strings.Split(strings.TrimSuffix(text, "\n"), "\n") {
		if line == "" {
			continue
		}
		name, rest, _ := strings.Cut(line, " ")
		kind, body, _ := strings.Cut(rest, " ")
		var slot, unit, lit any
		switch kind {
		case "f":
			num, u, _ := strings.Cut(body, " ")
			unit = u
			if strings.HasPrefix(num, "$") {
				k, err := strconv.Atoi(num[1:])
				if err != nil {
					return fmt.Errorf("shape line %q: %v", line, err)
				}
				slot = k
			} else {
				lit = num
			}
		case "s":
			s, err := strconv.Unquote(body)
			if err != nil {
				return fmt.Errorf("shape line %q: %v", line, err)
			}
			lit = s
		default:
			return fmt.Errorf("shape line %q: unknown kind", line)
		}
		if _, err := tx.ExecContext(ctx, "INSERT INTO shape_lines (shape, line, name, kind, slot, literal, unit) VALUES (?, ?, ?, ?, ?, ?, ?)",
			id, i, name, kind, slot, lit, unit); err != nil {
			return fmt.Errorf("insert shape line: %w", err)
		}
	}
	return nil
}

// shapeByID returns a stored shape, reading it through tx when the ledger
// has not met it yet.
func (l *Ledger) shapeByID(ctx context.Context, tx *qtx, id int64) (*shape, error) {
	if sh, ok := l.shapes.lookupID(id); ok {
		return sh, nil
	}
	var text string
	if err := tx.QueryRowContext(ctx, "SELECT text FROM shapes WHERE id = ?", id).Scan(&text); err != nil {
		if errors.Is(err, sql.ErrNoRows) {
			return nil, fmt.Errorf("%w: shape %d is not stored", ErrIntegrity, id)
		}
		return nil, fmt.Errorf("read shape %d: %w", id, err)
	}
	sh, err := parseShape(text)
	if err != nil {
		return nil, fmt.Errorf("%w: shape %d: %v", ErrIntegrity, id, err)
	}
	if _, pending := tx.newShapes[text]; !pending {
		l.shapes.put(id, sh)
	}
	return sh, nil
}

// valuesText is the canonical text of a stored parameters or outputs
// column: the text itself when shape is NULL (a row from before 0017),
// else the shape's text with its slots filled from the blob.
func (l *Ledger) valuesText(ctx context.Context, tx *qtx, shapeID sql.NullInt64, col []byte) (string, error) {
	if !shapeID.Valid {
		return string(col), nil
	}
	sh, err := l.shapeByID(ctx, tx, shapeID.Int64)
	if err != nil {
		return "", err
	}
	text, err := sh.unpack(col)
	if err != nil {
		return "", fmt.Errorf("%w: shape %d: %v", ErrIntegrity, shapeID.Int64, err)
	}
	return text, nil
}

// packedColumns are the stored shape and blob of a set of values: NULL
// and an empty text for the outputs of a failed node.
func (l *Ledger) packedColumns(ctx context.Context, tx *qtx, p packed) (any, []byte, error) {
	id := p.id
	if id == 0 {
		var err error
		if id, err = l.shapeID(ctx, tx, p.shape); err != nil {
			return nil, nil, err
		}
	}
	return id, p.slotBytes(), nil
}

// kpOf is the stored key prefix of a key's digest (its first 60 bits), by
// which rows are found: an index of 8-byte integers is a quarter of one
// of 32-byte blobs.
// A malformed digest (shorter than 8 bytes) has prefix -1, which no
// stored key has.
func kpOf(digest []byte) int64 {
	if len(digest) < 8 {
		return -1
	}
	return int64(binary.BigEndian.Uint64(digest[:8]) >> 4)
}

// keyMatch is the SQL condition and arguments that select the rows of n
// keys (alias a: "" or "n."), found by their prefixes.
func keyMatch(a string, keys [][]byte) (string, []any) {
	args := make([]any, 0, 2*len(keys))
	for _, k := range keys {
		args = append(args, kpOf(k))
	}
	for _, k := range keys {
		args = append(args, k)
	}
	m := marks(len(keys))
	return a + "kp IN (" + m + ") AND " + a + "key IN (" + m + ")", args
}
