package pipeline

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Kind is the type of a Value.
type Kind uint8

// The kinds of Value.
const (
	KindFloat  Kind = iota + 1 // a float64 with a unit
	KindString                 // a string
)

// Unit labels used across inflatrace. Physics runs in reduced Planck units
// (M_p = 1); GeV and Mpc^-1 appear at the edges and are always labelled.
const (
	UnitNone   = "1"      // dimensionless
	UnitMp     = "M_p"    // reduced Planck mass (field values, scales)
	UnitMp4    = "M_p^4"  // energy density
	UnitGeV    = "GeV"    // energies at the edges
	UnitPerMpc = "Mpc^-1" // comoving wavenumbers
	UnitKelvin = "K"      // temperatures of the photon bath today
)

// Value is one typed datum: a parameter of a node or one of its outputs.
type Value struct {
	Kind  Kind
	Float float64
	Str   string
	Unit  string // for floats; "1" when dimensionless
}

// Float returns a float value with its unit.
func Float(x float64, unit string) Value { return Value{Kind: KindFloat, Float: x, Unit: unit} }

// String returns a string value.
func String(s string) Value { return Value{Kind: KindString, Str: s} }

// Values is a named set of values: a node's parameters or its outputs.
type Values map[string]Value

// Names returns the names in sorted order.
func (vs Values) Names() []string {
	names := make([]string, 0, len(vs))
	for n := range vs {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

// Num returns the float named n, or an error naming what is missing.
func (vs Values) Num(n string) (float64, error) {
	v, ok := vs[n]
	if !ok {
		return 0, fmt.Errorf("missing value %q", n)
	}
	if v.Kind != KindFloat {
		return 0, fmt.Errorf("value %q is not a number", n)
	}
	return v.Float, nil
}

// Text returns the string named n, or an error naming what is missing.
func (vs Values) Text(n string) (string, error) {
	v, ok := vs[n]
	if !ok {
		return "", fmt.Errorf("missing value %q", n)
	}
	if v.Kind != KindString {
		return "", fmt.Errorf("value %q is not a string", n)
	}
	return v.Str, nil
}

func validName(s string) bool {
	if s == "" {
		return false
	}
	for _, r := range s {
		if r <= ' ' || r == '"' || r == 0x7f {
			return false
		}
	}
	return true
}

// FormatFloat writes x in the shortest form that parses back to the same
// float64 (strconv 'g', precision -1). This is the float text used in keys.
func FormatFloat(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// appendLine appends the canonical one-line form of a named value, without
// its newline:
//
//	<name> f <shortest float> <unit>
//	<name> s <Go-quoted string>
func appendLine(b []byte, name string, v Value) ([]byte, error) {
	if !validName(name) {
		return b, fmt.Errorf("invalid value name %q", name)
	}
	switch v.Kind {
	case KindFloat:
		if math.IsNaN(v.Float) || math.IsInf(v.Float, 0) {
			return b, fmt.Errorf("value %q is %g: not finite", name, v.Float)
		}
		if !validName(v.Unit) {
			return b, fmt.Errorf("value %q has invalid unit %q (use %q when dimensionless)", name, v.Unit, UnitNone)
		}
		b = append(b, name...)
		b = append(b, " f "...)
		b = strconv.AppendFloat(b, v.Float, 'g', -1, 64)
		b = append(b, ' ')
		return append(b, v.Unit...), nil
	case KindString:
		b = append(b, name...)
		b = append(b, " s "...)
		return strconv.AppendQuote(b, v.Str), nil
	}
	return b, fmt.Errorf("value %q has no kind", name)
}

// valuesOnStack is the size of the arrays encoders sort values in without
// allocating: a compare node's outputs (about 30 values with a forecast
// and the BBN flag) fit.
const valuesOnStack = 48

// namedValue is one entry of a Values, for encoding in name order.
type namedValue struct {
	name string
	v    Value
}

// sortedValues returns the entries of vs sorted by name, in buf when it is
// large enough (encoders pass an array on their stack, so that a typical
// set costs no allocation), and a bound on the length of their canonical
// lines when each is written after prefix.
func sortedValues(vs Values, buf []namedValue, prefix string) ([]namedValue, int) {
	entries, size := buf[:0], 0
	for n, v := range vs {
		entries = append(entries, namedValue{n, v})
		// A float takes at most 24 bytes; quoting writes at most 4 bytes
		// a byte (\x00 for a control or invalid byte).
		size += len(prefix) + len(n) + len(v.Unit) + 4*len(v.Str) + 32
	}
	slices.SortFunc(entries, func(a, b namedValue) int { return strings.Compare(a.name, b.name) })
	return entries, size
}

// appendValues appends the canonical lines of entries (sorted), each after
// prefix and ending in a newline.
func appendValues(b []byte, entries []namedValue, prefix string) ([]byte, error) {
	var err error
	for _, e := range entries {
		b = append(b, prefix...)
		if b, err = appendLine(b, e.name, e.v); err != nil {
			return b, err
		}
		b = append(b, '\n')
	}
	return b, nil
}

// Encode writes the canonical text of vs: one line per value, sorted by
// name, each ending in a newline. It fails on non-finite floats, so a NaN
// can never become a recorded result.
func (vs Values) Encode() ([]byte, error) {
	var arr [valuesOnStack]namedValue
	entries, size := sortedValues(vs, arr[:], "")
	b, err := appendValues(make([]byte, 0, size), entries, "")
	if err != nil {
		return nil, err
	}
	return b, nil
}

// DecodeValues parses the canonical text written by Encode.
func DecodeValues(data []byte) (Values, error) {
	text := string(data)
	vs := make(Values, strings.Count(text, "\n")+1)
	for i := 0; len(text) > 0; i++ {
		l := text
		if j := strings.IndexByte(text, '\n'); j >= 0 {
			l, text = text[:j], text[j+1:]
		} else {
			text = ""
		}
		if l == "" {
			continue
		}
		name, rest, ok1 := strings.Cut(l, " ")
		kind, body, ok2 := strings.Cut(rest, " ")
		if !ok1 || !ok2 {
			return nil, fmt.Errorf("line %d: malformed value %q", i+1, l)
		}
		switch kind {
		case "f":
			num, unit, ok := strings.Cut(body, " ")
			if !ok {
				return nil, fmt.Errorf("line %d: float without unit %q", i+1, l)
			}
			x, err := strconv.ParseFloat(num, 64)
			if err != nil {
				return nil, fmt.Errorf("line %d: %v", i+1, err)
			}
			vs[name] = Float(x, unit)
		case "s":
			s, err := strconv.Unquote(body)
			if err != nil {
				return nil, fmt.Errorf("line %d: bad string %q: %v", i+1, body, err)
			}
			vs[name] = String(s)
		default:
			return nil, fmt.Errorf("line %d: unknown kind %q", i+1, kind)
		}
	}
	return vs, nil
}
