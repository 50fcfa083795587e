package ledger

import (
	"encoding/hex"
	"fmt"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
)

// Keys and output hashes are stored as the 32 raw bytes of their SHA-256
// digest and printed, as everywhere else, with the algorithm prefix.

// digestBytes returns the digest of a prefixed hash, or an error naming
// what is wrong with it.
func digestBytes(h string) ([]byte, error) {
	// Decoding checks the digits; only a malformed hash pays for the
	// message.
	if len(h) == len(pipeline.HashPrefix)+64 && h[:len(pipeline.HashPrefix)] == pipeline.HashPrefix {
		out := make([]byte, 32)
		if _, err := hex.Decode(out, []byte(h[len(pipeline.HashPrefix):])); err == nil {
			return out, nil
		}
	}
	if err := pipeline.ParseHash(h); err != nil {
		return nil, err
	}
	return hex.DecodeString(h[len(pipeline.HashPrefix):])
}

// keyArg is a key as a query argument. A malformed key becomes a value no
// stored key can equal (stored keys are checked to be 32 bytes long).
func keyArg(k pipeline.KeyID) []byte {
	b, err := digestBytes(string(k))
	if err != nil {
		return []byte{}
	}
	return b
}

// digestText prints a stored digest with its prefix; a NULL (failed node)
// prints as "".
func digestText(b []byte) string {
	if b == nil {
		return ""
	}
	return pipeline.HashPrefix + hex.EncodeToString(b)
}

// storedKey reads a stored key column.
func storedKey(b []byte) (pipeline.KeyID, error) {
	if len(b) != 32 {
		return "", fmt.Errorf("%w: stored key has %d bytes, want 32", ErrIntegrity, len(b))
	}
	return pipeline.KeyID(digestText(b)), nil
}

// keyRange returns the smallest and largest stored keys whose hex digits
// start with prefix (hex digits only, without the algorithm prefix), so
// that a prefix search uses the key index.
func keyRange(prefix string) (lo, hi []byte, err error) {
	prefix = strings.ToLower(prefix)
	if len(prefix) > 64 {
		return nil, nil, fmt.Errorf("%d hex digits, a key has 64", len(prefix))
	}
	if lo, err = hex.DecodeString(prefix + strings.Repeat("0", 64-len(prefix))); err != nil {
		return nil, nil, fmt.Errorf("not hex: %v", err)
	}
	hi, _ = hex.DecodeString(prefix + strings.Repeat("f", 64-len(prefix)))
	return lo, hi, nil
}
