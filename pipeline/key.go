package pipeline

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"strconv"
	"strings"
	"unsafe"
)

// HashPrefix is the algorithm prefix of every printed hash.
const HashPrefix = "sha256:"

// KeyVersion is the version of the key description format. Bump it when the
// layout of Describe changes; the golden-key test pins the current one.
const KeyVersion = 1

// KeyID identifies a node: the SHA-256 of its written description.
type KeyID string

// OutputID is the SHA-256 of a node's canonical output encoding.
type OutputID string

// Short returns the prefix and the first 12 hex digits, for tables.
func (k KeyID) Short() string { return shortHash(string(k)) }

// Short returns the prefix and the first 12 hex digits, for tables.
func (o OutputID) Short() string { return shortHash(string(o)) }

func shortHash(s string) string {
	if len(s) > len(HashPrefix)+12 {
		return s[:len(HashPrefix)+12]
	}
	return s
}

// Sum returns the prefixed SHA-256 of data.
func Sum(data []byte) string { return formatSum(sha256.Sum256(data)) }

// formatSum writes a digest as a prefixed hash in one allocation.
func formatSum(h [sha256.Size]byte) string {
	var out [len(HashPrefix) + 2*sha256.Size]byte
	copy(out[:], HashPrefix)
	hex.Encode(out[len(HashPrefix):], h[:])
	return string(out[:])
}

// isHex marks the hexadecimal digits (a table: ParseHash runs for every
// key and hash a scan handles, millions of times).
var isHex = func() (t [256]bool) {
	for _, c := range "0123456789abcdefABCDEF" {
		t[c] = true
	}
	return t
}()

// ParseHash checks that s is a prefixed SHA-256 hex digest.
func ParseHash(s string) error {
	hexPart, ok := strings.CutPrefix(s, HashPrefix)
	if !ok {
		return fmt.Errorf("hash %q lacks the %q prefix", s, HashPrefix)
	}
	if len(hexPart) != 64 {
		return fmt.Errorf("hash %q: want 64 hex digits, found %d", s, len(hexPart))
	}
	for i := 0; i < len(hexPart); i++ {
		if c := hexPart[i]; !isHex[c] {
			// hex gives the message for the offending byte.
			_, err := hex.DecodeString(hexPart)
			return fmt.Errorf("hash %q: %v", s, err)
		}
	}
	return nil
}

// InputRef names one upstream node and the output hash it produced.
type InputRef struct {
	Stage  string
	Key    KeyID
	Output OutputID
}

// Describe writes the canonical description of a node, the text its key is
// the hash of:
//
//	inflatrace node key v1
//	tool <identity>
//	stage <name>
//	version <n>
//	param <name> f <shortest float> <unit>     (sorted by name)
//	param <name> s "<quoted string>"
//	input <position> <stage> <output hash>     (in declared order)
//
// Upstream nodes enter only through their output hashes.
func Describe(tool string, stage string, version int, params Values, inputs []InputRef) (string, error) {
	desc, _, err := describe(tool, stage, version, params, inputs, false)
	return desc, err
}

// describe is Describe, also returning the key when withKey is set (hashed
// from the bytes before they become the string, saving a copy).
func describe(tool string, stage string, version int, params Values, inputs []InputRef, withKey bool) (string, KeyID, error) {
	var arr [valuesOnStack]namedValue
	entries, size := sortedValues(params, arr[:], "param ")
	size += 96 + 4*len(tool) + len(stage)
	for _, in := range inputs {
		size += 16 + len(in.Stage) + len(in.Output)
	}
	b := make([]byte, 0, size)
	b = append(b, "inflatrace node key v"...)
	b = strconv.AppendInt(b, KeyVersion, 10)
	b = append(b, "\ntool "...)
	b = strconv.AppendQuote(b, tool)
	b = append(b, "\nstage "...)
	b = append(b, stage...)
	b = append(b, "\nversion "...)
	b = strconv.AppendInt(b, int64(version), 10)
	b = append(b, '\n')
	b, err := appendValues(b, entries, "param ")
	if err != nil {
		return "", "", fmt.Errorf("stage %s: parameter %w", stage, err)
	}
	for i, in := range inputs {
		if err := ParseHash(string(in.Output)); err != nil {
			return "", "", fmt.Errorf("stage %s: input %d: %w", stage, i, err)
		}
		b = append(b, "input "...)
		b = strconv.AppendInt(b, int64(i), 10)
		b = append(b, ' ')
		b = append(b, in.Stage...)
		b = append(b, ' ')
		b = append(b, in.Output...)
		b = append(b, '\n')
	}
	var key KeyID
	if withKey {
		key = KeyID(Sum(b))
	}
	// b is never written again: the string shares its bytes, as
	// strings.Builder does, instead of copying them.
	return unsafe.String(unsafe.SliceData(b), len(b)), key, nil
}

// KeyOf returns the key of a description.
func KeyOf(description string) KeyID { return KeyID(formatSum(sha256.Sum256([]byte(description)))) }

// OutputHash returns the hash of an output set (of its canonical encoding).
func OutputHash(outputs Values) (OutputID, []byte, error) {
	enc, err := outputs.Encode()
	if err != nil {
		return "", nil, err
	}
	return OutputID(Sum(enc)), enc, nil
}
