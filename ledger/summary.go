package ledger

import (
	"bytes"
	"compress/flate"
	"fmt"
	"io"
	"sync"
)

// A work's summary (the front end's assembled results: labels, keys and
// numbers of every result of a chunk) is stored deflated, behind a zero
// byte that no front end's summary starts with; a summary stored before
// compression (or an empty one) is stored as it is. Checksums and digests
// are taken of the summary itself, never of its stored bytes.

// summaryMark starts a deflated summary.
const summaryMark = 0x00

var flaters = sync.Pool{New: func() any {
	w, _ := flate.NewWriter(nil, flate.BestSpeed)
	return w
}}

// storedSummary is the column value of a summary.
func storedSummary(s []byte) []byte {
	if len(s) == 0 {
		return []byte{}
	}
	var b bytes.Buffer
	b.Grow(len(s)/2 + 16)
	b.WriteByte(summaryMark)
	w := flaters.Get().(*flate.Writer)
	w.Reset(&b)
	w.Write(s) // writes to a bytes.Buffer do not fail
	w.Close()
	flaters.Put(w)
	return b.Bytes()
}

// summaryColumn scans a stored summary into the summary it stands for.
type summaryColumn struct{ dst *[]byte }

// Scan implements sql.Scanner.
func (c summaryColumn) Scan(v any) error {
	var raw []byte
	switch x := v.(type) {
	case []byte:
		raw = x
	case string:
		raw = []byte(x)
	case nil:
	default:
		return fmt.Errorf("%w: a work's summary is a %T", ErrIntegrity, v)
	}
	if len(raw) == 0 || raw[0] != summaryMark {
		*c.dst = append([]byte(nil), raw...)
		return nil
	}
	src := bytes.NewReader(raw[1:])
	r, _ := inflaters.Get().(io.ReadCloser)
	if r == nil {
		r = flate.NewReader(src)
	} else if err := r.(flate.Resetter).Reset(src, nil); err != nil {
		return fmt.Errorf("%w: a work's stored summary does not inflate: %v", ErrIntegrity, err)
	}
	defer inflaters.Put(r)
	// Sized for a summary's usual ratio, so that a warm run's hundreds of
	// summaries are not grown and copied many times each.
	b := bytes.NewBuffer(make([]byte, 0, summaryRatio*len(raw)+2*bytes.MinRead))
	if _, err := b.ReadFrom(r); err != nil {
		return fmt.Errorf("%w: a work's stored summary does not inflate: %v", ErrIntegrity, err)
	}
	*c.dst = b.Bytes()
	return nil
}

// inflaters keeps decompressors for reuse (each holds tens of kilobytes of
// tables and window).
var inflaters sync.Pool

// summaryRatio bounds how many times larger a summary usually is than its
// deflated form (measured 1.87 for chunks of 1000 first-order results of
// the e-model scan; a larger summary only grows the buffer).
const summaryRatio = 2
