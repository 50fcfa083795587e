package pipeline

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"strconv"
	"strings"
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
func Sum(data []byte) string {
	h := sha256.Sum256(data)
	return HashPrefix + hex.EncodeToString(h[:])
}

// ParseHash checks that s is a prefixed SHA-256 hex digest.
func ParseHash(s string) error {
	hexPart, ok := strings.CutPrefix(s, HashPrefix)
	if !ok {
		return fmt.Errorf("hash %q lacks the %q prefix", s, HashPrefix)
	}
	if len(hexPart) != 64 {
		return fmt.Errorf("hash %q: want 64 hex digits, found %d", s, len(hexPart))
	}
	if _, err := hex.DecodeString(hexPart); err != nil {
		return fmt.Errorf("hash %q: %v", s, err)
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
	var b strings.Builder
	b.WriteString("inflatrace node key v" + strconv.Itoa(KeyVersion) + "\n")
	b.WriteString("tool " + strconv.Quote(tool) + "\n")
	b.WriteString("stage " + stage + "\n")
	b.WriteString("version " + strconv.Itoa(version) + "\n")
	for _, n := range params.Names() {
		l, err := params[n].line(n)
		if err != nil {
			return "", fmt.Errorf("stage %s: parameter %w", stage, err)
		}
		b.WriteString("param " + l + "\n")
	}
	for i, in := range inputs {
		if err := ParseHash(string(in.Output)); err != nil {
			return "", fmt.Errorf("stage %s: input %d: %w", stage, i, err)
		}
		b.WriteString("input " + strconv.Itoa(i) + " " + in.Stage + " " + string(in.Output) + "\n")
	}
	return b.String(), nil
}

// KeyOf returns the key of a description.
func KeyOf(description string) KeyID { return KeyID(Sum([]byte(description))) }

// OutputHash returns the hash of an output set (of its canonical encoding).
func OutputHash(outputs Values) (OutputID, []byte, error) {
	enc, err := outputs.Encode()
	if err != nil {
		return "", nil, err
	}
	return OutputID(Sum(enc)), enc, nil
}
