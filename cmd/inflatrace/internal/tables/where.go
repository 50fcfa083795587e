package tables

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/stages/study"
)

// OptionError is a bad table option: Option names it as the table
// command's flag does ("--where", "--sort", "--columns", ...), Value is
// the text given.
type OptionError struct {
	Option string
	Value  string
	Err    error
}

func (e *OptionError) Error() string { return fmt.Sprintf("%s %q: %v", e.Option, e.Value, e.Err) }

func (e *OptionError) Unwrap() error { return e.Err }

// operators of a condition, two-character ones first so that "<=" is not
// read as "<".
var operators = []string{"<=", ">=", "!=", "=", "<", ">"}

// condition is one parsed --where: column OP value.
type condition struct {
	column, op, value string
}

// parseCondition splits "r<0.01" at its first operator.
func parseCondition(s string) (condition, error) {
	i := strings.IndexAny(s, "<>=!")
	if i < 0 {
		return condition{}, errors.New("want COLUMN OP VALUE with OP one of = != < <= > >=")
	}
	op := ""
	for _, o := range operators {
		if strings.HasPrefix(s[i:], o) {
			op = o
			break
		}
	}
	if op == "" {
		return condition{}, fmt.Errorf("%q is not an operator (want = != < <= > >=)", s[i:i+1])
	}
	c := condition{strings.TrimSpace(s[:i]), op, strings.TrimSpace(s[i+len(op):])}
	if c.column == "" {
		return condition{}, errors.New("no column before the operator")
	}
	if strings.ContainsAny(c.value[:min(1, len(c.value))], "<>=!") {
		return condition{}, fmt.Errorf("%q is not an operator (want = != < <= > >=)", op+c.value[:1])
	}
	return c, nil
}

// matcher tests one row.
type matcher func(sh *sheet, row sheetRow) bool

// compile resolves the condition's column and value against the sheet.
func (c condition) compile(sh *sheet) (matcher, error) {
	col, err := sh.resolve(c.column)
	if err != nil {
		return nil, err
	}
	switch col.kind {
	case number, input, ordinal:
		want, err := study.ParseNumber(c.value)
		if err != nil {
			return nil, fmt.Errorf("column %s is numeric: %q is not a number or a ratio p/q", c.column, c.value)
		}
		return func(sh *sheet, row sheetRow) bool {
			v := sh.value(col, row)
			if !v.ok || math.IsNaN(v.num) {
				return false
			}
			return compareOp(c.op, cmpFloat(v.num, want))
		}, nil
	case flag:
		var want bool
		switch strings.ToLower(c.value) {
		case "yes", "true":
			want = true
		case "no", "false":
		default:
			return nil, fmt.Errorf("column %s is yes or no: %q is neither", c.column, c.value)
		}
		if c.op != "=" && c.op != "!=" {
			return nil, fmt.Errorf("column %s is yes or no: use = or !=", c.column)
		}
		return func(sh *sheet, row sheetRow) bool {
			v := sh.value(col, row)
			return v.ok && (v.flag == want) == (c.op == "=")
		}, nil
	}
	if c.op != "=" && c.op != "!=" {
		return nil, fmt.Errorf("column %s is text: use = or != (compared ignoring case)", c.column)
	}
	return func(sh *sheet, row sheetRow) bool {
		v := sh.value(col, row)
		return v.ok && strings.EqualFold(cellText(col.kind, v), c.value) == (c.op == "=")
	}, nil
}

// cellText is a text or parameter cell's text, as the Markdown table
// shows it.
func cellText(k kind, v cell) string {
	if k == params {
		return paramText(v.params, v.written)
	}
	return v.text
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

func compareOp(op string, c int) bool {
	switch op {
	case "=":
		return c == 0
	case "!=":
		return c != 0
	case "<":
		return c < 0
	case "<=":
		return c <= 0
	case ">":
		return c > 0
	}
	return c >= 0 // ">="
}

// filter keeps the rows meeting every condition.
func (sh *sheet) filter(where []string) error {
	var ms []matcher
	for _, w := range where {
		c, err := parseCondition(w)
		if err == nil {
			var m matcher
			if m, err = c.compile(sh); err == nil {
				ms = append(ms, m)
				continue
			}
		}
		return &OptionError{"--where", w, err}
	}
	kept := sh.rows[:0]
	for _, row := range sh.rows {
		ok := true
		for _, m := range ms {
			if !m(sh, row) {
				ok = false
				break
			}
		}
		if ok {
			kept = append(kept, row)
		}
	}
	sh.rows = kept
	return nil
}

// sortKey is one --sort column, descending when it has a leading '-'.
type sortKey struct {
	col  sheetCol
	desc bool
}

// order sorts the rows by the keys, stably (rows equal in every key keep
// the run's order). Missing values sort last in either direction.
func (sh *sheet) order(keys []string) error {
	var ks []sortKey
	for _, k := range keys {
		name, desc := strings.CutPrefix(strings.TrimSpace(k), "-")
		name = strings.TrimPrefix(name, "+")
		if name == "" {
			return &OptionError{"--sort", k, errors.New("no column named (want COLUMN or -COLUMN)")}
		}
		col, err := sh.resolve(name)
		if err != nil {
			return &OptionError{"--sort", k, err}
		}
		ks = append(ks, sortKey{col, desc})
	}
	if len(ks) == 0 {
		return nil
	}
	sort.SliceStable(sh.rows, func(i, j int) bool {
		for _, k := range ks {
			a, b := sh.value(k.col, sh.rows[i]), sh.value(k.col, sh.rows[j])
			if a.ok != b.ok {
				return a.ok
			}
			if !a.ok {
				continue
			}
			c := compareCells(k.col.kind, a, b)
			if c != 0 {
				return (c < 0) != k.desc
			}
		}
		return false
	})
	return nil
}

// compareCells orders two present cells of one kind: numbers by value
// (NaN after every number), flags no before yes, text ignoring case and
// then byte by byte.
func compareCells(k kind, a, b cell) int {
	switch k {
	case number, input, ordinal:
		an, bn := math.IsNaN(a.num), math.IsNaN(b.num)
		if an || bn {
			return cmpBool(an, bn)
		}
		return cmpFloat(a.num, b.num)
	case flag:
		return cmpBool(a.flag, b.flag)
	}
	at, bt := cellText(k, a), cellText(k, b)
	if c := strings.Compare(strings.ToLower(at), strings.ToLower(bt)); c != 0 {
		return c
	}
	return strings.Compare(at, bt)
}

func cmpBool(a, b bool) int {
	switch {
	case a == b:
		return 0
	case b:
		return -1
	}
	return 1
}
