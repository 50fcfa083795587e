// Package edit changes a study configuration's TOML text in place: it sets
// a key, appends an array-of-tables entry or drops a key or an entry, and
// keeps every other byte of the text (comments, blank lines, order) as it
// was. It works on lines: it locates the table header or the N-th
// array-of-tables entry and the key's line (a multi-line array value is
// replaced whole), and checks that the result is still a TOML document.
// It reads no files; whether the result is a valid study is for the study
// parser to say.
package edit

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"
)

// Kind is what an Edit does.
type Kind int

// The kinds of edit.
const (
	// Set replaces the value of Path, adding the key (and a missing plain
	// table) when it is absent.
	Set Kind = iota
	// Add appends a new array-of-tables entry: Path names the array
	// (model, reheating, constraint, forecast) and Value is an inline table.
	Add
	// Drop removes the key or the whole array-of-tables entry at Path.
	Drop
)

// Edit is one change to a configuration.
type Edit struct {
	Kind  Kind
	Path  string // "slow_roll.method", "model[2].alpha", "model[3]", "title"
	Value string // TOML text (a bare word is taken as a string); for Add an inline table
}

// String renders the edit as its command-line flag.
func (e Edit) String() string {
	switch e.Kind {
	case Add:
		return "--add " + e.Path + "=" + e.Value
	case Drop:
		return "--drop " + e.Path
	default:
		return "--set " + e.Path + "=" + e.Value
	}
}

// Arrays are the arrays of tables Add may append to.
var Arrays = []string{"model", "reheating", "constraint", "forecast"}

// Error is an edit that cannot be applied, naming the edit's path.
type Error struct {
	Path string
	Msg  string
}

func (e *Error) Error() string { return e.Path + ": " + e.Msg }

func errf(path, format string, args ...any) error {
	return &Error{Path: path, Msg: fmt.Sprintf(format, args...)}
}

// ParseFlag splits a "PATH=VALUE" flag argument at its first '='.
func ParseFlag(kind Kind, arg string) (Edit, error) {
	if kind == Drop {
		return Edit{Kind: Drop, Path: strings.TrimSpace(arg)}, nil
	}
	p, v, ok := strings.Cut(arg, "=")
	if !ok || strings.TrimSpace(p) == "" {
		return Edit{}, fmt.Errorf("%q: want PATH=VALUE", arg)
	}
	return Edit{Kind: kind, Path: strings.TrimSpace(p), Value: strings.TrimSpace(v)}, nil
}

// Apply applies the edits in order and returns the new text. text is not
// modified.
func Apply(text []byte, edits []Edit) ([]byte, error) {
	out := text
	for _, e := range edits {
		var err error
		switch e.Kind {
		case Set:
			out, err = SetValue(out, e.Path, e.Value)
		case Add:
			out, err = AddEntry(out, e.Path, e.Value)
		case Drop:
			out, err = DropPath(out, e.Path)
		default:
			err = errf(e.Path, "unknown edit kind %d", e.Kind)
		}
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// path is a parsed key path: a key at the top level (table ""), in a plain
// table, or in entry index of an array of tables; key is empty when the
// path names a table or an entry itself.
type path struct {
	table string
	index int // -1: not an array entry
	key   string
}

var (
	bareKey  = `[A-Za-z0-9_-]+`
	pathExpr = regexp.MustCompile(`^(` + bareKey + `)(?:\[([0-9]+)\])?(?:\.(` + bareKey + `))?$`)
)

func parsePath(p string) (path, error) {
	m := pathExpr.FindStringSubmatch(p)
	if m == nil {
		return path{}, errf(p, "not a key path: want KEY, TABLE.KEY, ARRAY[N].KEY or ARRAY[N] (such as slow_roll.method, model[0].alpha, model[1])")
	}
	if m[2] == "" && m[3] == "" {
		return path{key: m[1], index: -1}, nil
	}
	out := path{table: m[1], index: -1, key: m[3]}
	if m[2] != "" {
		i, err := strconv.Atoi(m[2])
		if err != nil {
			return path{}, errf(p, "entry index %q: %v", m[2], err)
		}
		out.index = i
	}
	return out, nil
}

// section is the root of the document or one table: the header line
// (-1 for the root), the lines after it up to the next header, and its
// key entries.
type section struct {
	name    string
	array   bool
	index   int // which entry of its array (0-based)
	header  int
	end     int // first line after the section
	entries []entry
}

// entry is one key = value, spanning lines [start, end).
type entry struct {
	key        string
	start, end int
}

// document is the text split into lines (each without its newline).
type document struct {
	lines    []string
	final    bool // the text ended with a newline
	sections []section
}

var headerExpr = regexp.MustCompile(`^\s*(\[\[?)\s*([A-Za-z0-9_.\-"' ]+?)\s*(\]\]?)\s*(#.*)?$`)

func parse(text []byte) (*document, error) {
	s := string(text)
	d := &document{final: strings.HasSuffix(s, "\n")}
	s = strings.TrimSuffix(s, "\n")
	if s != "" || !d.final {
		d.lines = strings.Split(s, "\n")
	}
	if len(text) == 0 {
		d.lines = nil
	}
	counts := map[string]int{}
	cur := section{header: -1, index: -1}
	for i := 0; i < len(d.lines); {
		line := d.lines[i]
		if m := headerExpr.FindStringSubmatch(line); m != nil && (m[1] == "[[") == (m[3] == "]]") {
			cur.end = i
			d.sections = append(d.sections, cur)
			name := strings.ReplaceAll(m[2], " ", "")
			cur = section{name: name, array: m[1] == "[[", header: i, index: -1}
			if cur.array {
				cur.index = counts[name]
				counts[name]++
			}
			i++
			continue
		}
		t := strings.TrimSpace(line)
		if t == "" || strings.HasPrefix(t, "#") {
			i++
			continue
		}
		eq := keyEnd(line)
		if eq < 0 {
			return nil, fmt.Errorf("line %d: want KEY = VALUE, a [table] or a [[table]]: %q", i+1, t)
		}
		key := unquoteKey(strings.TrimSpace(line[:eq]))
		end, err := valueEnd(d.lines, i, eq+1)
		if err != nil {
			return nil, err
		}
		cur.entries = append(cur.entries, entry{key: key, start: i, end: end})
		i = end
	}
	cur.end = len(d.lines)
	d.sections = append(d.sections, cur)
	return d, nil
}

// keyEnd returns the index of the '=' ending a line's key, outside quotes.
func keyEnd(line string) int {
	var q byte
	for i := 0; i < len(line); i++ {
		c := line[i]
		switch {
		case q != 0:
			if c == q {
				q = 0
			}
		case c == '"' || c == '\'':
			q = c
		case c == '=':
			return i
		case c == '#':
			return -1
		}
	}
	return -1
}

func unquoteKey(k string) string {
	if len(k) >= 2 && (k[0] == '"' || k[0] == '\'') && k[len(k)-1] == k[0] {
		return k[1 : len(k)-1]
	}
	return k
}

// valueEnd scans a value starting at line i, column col, and returns the
// line after its last one: brackets and braces outside strings (and
// multi-line strings) carry it over lines.
func valueEnd(lines []string, i, col int) (int, error) {
	depth := 0
	multi := "" // `"""` or `'''` while inside a multi-line string
	start := i
	for ; i < len(lines); i++ {
		line := lines[i]
		j := col
		col = 0
		for j < len(line) {
			if multi != "" {
				if strings.HasPrefix(line[j:], multi) {
					j += 3
					multi = ""
					continue
				}
				if multi == `"""` && line[j] == '\\' {
					j++
				}
				j++
				continue
			}
			c := line[j]
			switch {
			case strings.HasPrefix(line[j:], `"""`) || strings.HasPrefix(line[j:], `'''`):
				multi = line[j : j+3]
				j += 3
				continue
			case c == '"' || c == '\'':
				k := j + 1
				for k < len(line) && line[k] != c {
					if c == '"' && line[k] == '\\' {
						k++
					}
					k++
				}
				j = k + 1
				continue
			case c == '#':
				j = len(line)
				continue
			case c == '[' || c == '{':
				depth++
			case c == ']' || c == '}':
				depth--
			}
			j++
		}
		if depth <= 0 && multi == "" {
			return i + 1, nil
		}
	}
	return 0, fmt.Errorf("line %d: value not closed before the end of the text", start+1)
}

// commentAt returns the column of a trailing comment on a single-line
// value's line, or -1.
func commentAt(line string, col int) int {
	var q byte
	for j := col; j < len(line); j++ {
		c := line[j]
		switch {
		case q != 0:
			if c == '\\' && q == '"' {
				j++
			} else if c == q {
				q = 0
			}
		case c == '"' || c == '\'':
			q = c
		case c == '#':
			return j
		}
	}
	return -1
}

func (d *document) text() []byte {
	s := strings.Join(d.lines, "\n")
	if d.final && len(d.lines) > 0 {
		s += "\n"
	}
	return []byte(s)
}

// splice replaces lines [from, to) with repl.
func (d *document) splice(from, to int, repl ...string) []byte {
	lines := append([]string{}, d.lines[:from]...)
	lines = append(lines, repl...)
	lines = append(lines, d.lines[to:]...)
	out := &document{lines: lines, final: d.final || len(d.lines) == 0}
	return out.text()
}

// find returns the section a path's table names.
func (d *document) find(p path, raw string) (*section, error) {
	if p.table == "" {
		return &d.sections[0], nil
	}
	var entries []*section
	plain := -1
	for i := range d.sections {
		s := &d.sections[i]
		if s.name != p.table {
			continue
		}
		if s.array {
			entries = append(entries, s)
		} else {
			plain = i
		}
	}
	if p.index >= 0 {
		if len(entries) == 0 {
			if plain >= 0 {
				return nil, errf(raw, "[%s] is a table, not an array of tables: write %s.KEY", p.table, p.table)
			}
			return nil, errf(raw, "no [[%s]] entries%s", p.table, d.arrayList())
		}
		if p.index >= len(entries) {
			return nil, errf(raw, "no entry %d: %d [[%s]] entries (%s)", p.index, len(entries), p.table, entryRange(p.table, len(entries)))
		}
		return entries[p.index], nil
	}
	if len(entries) > 0 {
		return nil, errf(raw, "%s is an array of tables: address one entry (%s)", p.table, entryRange(p.table, len(entries)))
	}
	if plain >= 0 {
		return &d.sections[plain], nil
	}
	return nil, nil
}

func entryRange(name string, n int) string {
	if n == 1 {
		return name + "[0]"
	}
	return fmt.Sprintf("%s[0] to %s[%d]", name, name, n-1)
}

// arrayList names the arrays of tables the document has, for errors.
func (d *document) arrayList() string {
	counts := map[string]int{}
	var order []string
	for _, s := range d.sections {
		if s.array {
			if counts[s.name] == 0 {
				order = append(order, s.name)
			}
			counts[s.name]++
		}
	}
	if len(order) == 0 {
		return ""
	}
	parts := make([]string, len(order))
	for i, n := range order {
		parts[i] = entryRange(n, counts[n])
	}
	return " (entries: " + strings.Join(parts, ", ") + ")"
}

func (s *section) keys() string {
	if len(s.entries) == 0 {
		return "none"
	}
	ks := make([]string, len(s.entries))
	for i, e := range s.entries {
		ks[i] = e.key
	}
	return strings.Join(ks, ", ")
}

func (s *section) lookup(key string) *entry {
	for i := range s.entries {
		if s.entries[i].key == key {
			return &s.entries[i]
		}
	}
	return nil
}

// value turns a flag's VALUE into TOML text: TOML as written, or a bare
// word as a string.
func value(raw, v string) (string, error) {
	v = strings.TrimSpace(v)
	if v == "" {
		return "", errf(raw, "empty value: give TOML (0.25, \"7/3\", [50, 60], exact)")
	}
	var m map[string]any
	if err := toml.Unmarshal([]byte("v = "+v), &m); err == nil {
		return v, nil
	} else if strings.ContainsAny(v, "\"'[]{}\n#") {
		return "", errf(raw, "value %s is not TOML: %v", v, err)
	}
	return strconv.Quote(v), nil
}

// SetValue sets the key at path p to value (TOML, or a bare word taken as
// a string), replacing its line(s) or adding a line at the end of its
// table, and creating a missing plain table at the end of the text.
func SetValue(text []byte, p, v string) ([]byte, error) {
	pp, err := parsePath(p)
	if err != nil {
		return nil, err
	}
	if pp.key == "" {
		return nil, errf(p, "names an entry, not a key: --set needs %s.KEY (use --drop to remove an entry)", p)
	}
	val, err := value(p, v)
	if err != nil {
		return nil, err
	}
	d, err := parse(text)
	if err != nil {
		return nil, errf(p, "%v", err)
	}
	s, err := d.find(pp, p)
	if err != nil {
		return nil, err
	}
	var out []byte
	switch {
	case s == nil: // a plain table the text does not have yet
		repl := []string{"[" + pp.table + "]", pp.key + " = " + val}
		if n := len(d.lines); n > 0 && strings.TrimSpace(d.lines[n-1]) != "" {
			repl = append([]string{""}, repl...)
		}
		out = d.splice(len(d.lines), len(d.lines), repl...)
	case s.lookup(pp.key) != nil:
		e := s.lookup(pp.key)
		first := d.lines[e.start]
		eq := keyEnd(first)
		prefix := first[:eq+1]
		line := strings.TrimRight(prefix, " ") + " " + val
		if e.end-e.start == 1 && !strings.Contains(val, "\n") {
			if c := commentAt(first, eq+1); c >= 0 {
				// Keep the comment, at its column where the value fits.
				pad := c - len(line)
				if pad < 1 {
					pad = 1
				}
				line += strings.Repeat(" ", pad) + first[c:]
			}
		}
		out = d.splice(e.start, e.end, line)
	default:
		at := s.header + 1
		indent := ""
		if n := len(s.entries); n > 0 {
			last := s.entries[n-1]
			at = last.end
			l := d.lines[last.start]
			indent = l[:len(l)-len(strings.TrimLeft(l, " \t"))]
		}
		out = d.splice(at, at, indent+pp.key+" = "+val)
	}
	return checked(p, out)
}

// AddEntry appends a new entry to the array of tables name (one of Arrays)
// with the keys of the inline table v, written one per line as given.
func AddEntry(text []byte, name, v string) ([]byte, error) {
	known := false
	for _, a := range Arrays {
		known = known || a == name
	}
	if !known {
		return nil, errf(name, "--add appends to an array of tables: one of %s", strings.Join(Arrays, ", "))
	}
	v = strings.TrimSpace(v)
	var m map[string]any
	if err := toml.Unmarshal([]byte("v = "+v), &m); err != nil {
		return nil, errf(name, "value %s is not TOML: %v", v, err)
	}
	if _, ok := m["v"].(map[string]any); !ok {
		return nil, errf(name, "want an inline table such as {family = \"t-model\", alpha = 7}, got %s", v)
	}
	body := strings.TrimSpace(v[1 : len(v)-1])
	pairs, err := splitTop(body)
	if err != nil {
		return nil, errf(name, "%v", err)
	}
	d, err := parse(text)
	if err != nil {
		return nil, errf(name, "%v", err)
	}
	at := len(d.lines)
	for _, s := range d.sections {
		if s.array && s.name == name {
			at = s.header + 1
			if n := len(s.entries); n > 0 {
				at = s.entries[n-1].end
			}
		}
	}
	repl := []string{"", "[[" + name + "]]"}
	for _, kv := range pairs {
		k, val, _ := strings.Cut(kv, "=")
		repl = append(repl, strings.TrimSpace(k)+" = "+strings.TrimSpace(val))
	}
	if at == 0 {
		repl = repl[1:]
	}
	return checked(name, d.splice(at, at, repl...))
}

// splitTop splits an inline table's body at its top-level commas.
func splitTop(body string) ([]string, error) {
	var out []string
	depth, start := 0, 0
	var q byte
	for i := 0; i < len(body); i++ {
		c := body[i]
		switch {
		case q != 0:
			if c == '\\' && q == '"' {
				i++
			} else if c == q {
				q = 0
			}
		case c == '"' || c == '\'':
			q = c
		case c == '[' || c == '{':
			depth++
		case c == ']' || c == '}':
			depth--
		case c == ',' && depth == 0:
			out = append(out, strings.TrimSpace(body[start:i]))
			start = i + 1
		}
	}
	if last := strings.TrimSpace(body[start:]); last != "" {
		out = append(out, last)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("empty table: give its keys, such as {family = \"t-model\", alpha = 7}")
	}
	return out, nil
}

// DropPath removes the key at p (its whole line or lines), an entry of an
// array of tables (ARRAY[N]: its header and keys), or a plain table.
func DropPath(text []byte, p string) ([]byte, error) {
	pp, err := parsePath(p)
	if err != nil {
		return nil, err
	}
	d, err := parse(text)
	if err != nil {
		return nil, errf(p, "%v", err)
	}
	if pp.table == "" && pp.key != "" {
		// A bare name: a top-level key, or a whole plain table.
		if s := d.sections[0].lookup(pp.key); s == nil {
			for i := range d.sections {
				if sec := &d.sections[i]; sec.name == pp.key && !sec.array {
					return checked(p, dropSection(d, sec))
				}
			}
		}
	}
	if pp.key == "" {
		s, err := d.find(pp, p)
		if err != nil {
			return nil, err
		}
		return checked(p, dropSection(d, s))
	}
	s, err := d.find(pp, p)
	if err != nil {
		return nil, err
	}
	if s == nil {
		return nil, errf(p, "no [%s] table%s", pp.table, d.arrayList())
	}
	e := s.lookup(pp.key)
	if e == nil {
		where := "the top level"
		if s.header >= 0 {
			where = strings.TrimSpace(d.lines[s.header])
		}
		return nil, errf(p, "no key %s in %s (keys: %s)", pp.key, where, s.keys())
	}
	return checked(p, d.splice(e.start, e.end))
}

// dropSection removes a table's header through its last key, and one
// blank line before it when there is one.
func dropSection(d *document, s *section) []byte {
	from, to := s.header, s.header+1
	if n := len(s.entries); n > 0 {
		to = s.entries[n-1].end
	}
	if from > 0 && strings.TrimSpace(d.lines[from-1]) == "" {
		from--
	}
	return d.splice(from, to)
}

// checked refuses an edit whose result is not a TOML document.
func checked(p string, out []byte) ([]byte, error) {
	var m map[string]any
	if err := toml.Unmarshal(out, &m); err != nil {
		return nil, errf(p, "the edited text is not TOML: %v", err)
	}
	return out, nil
}
