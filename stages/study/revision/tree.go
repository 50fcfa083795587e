package revision

import (
	"fmt"
	"reflect"
	"sort"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"
)

// Field is one leaf of a configuration: its path ("reheating[1].T_reh_GeV")
// and value (nil when absent).
type Field struct {
	Path  string
	Value any
}

// parseTree decodes a configuration into a generic tree.
func parseTree(text string) (map[string]any, error) {
	var m map[string]any
	if err := toml.Unmarshal([]byte(text), &m); err != nil {
		return nil, err
	}
	return m, nil
}

// flatten lists the leaves of a tree. Arrays of tables are indexed; arrays
// of values are leaves.
func flatten(prefix string, v any, out map[string]any) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			p := k
			if prefix != "" {
				p = prefix + "." + k
			}
			flatten(p, e, out)
		}
	case []any:
		if len(x) > 0 {
			if _, ok := x[0].(map[string]any); ok {
				for i, e := range x {
					flatten(prefix+"["+strconv.Itoa(i)+"]", e, out)
				}
				return
			}
		}
		out[prefix] = x
	default:
		out[prefix] = x
	}
}

// Differences returns the configuration fields whose values differ, sorted
// by path: ignoring presentation-only fields (title, description, label).
func Differences(a, b map[string]any) []Difference {
	fa, fb := map[string]any{}, map[string]any{}
	flatten("", a, fa)
	flatten("", b, fb)
	paths := map[string]bool{}
	for p := range fa {
		paths[p] = true
	}
	for p := range fb {
		paths[p] = true
	}
	// An entry of an array of tables that only one run has ([[model]]
	// number 4 added, say) is one difference, the whole table: its fields
	// switched one at a time would give intermediate configurations with
	// half a model.
	lonely := map[string]Difference{}
	for k, va := range a {
		ta, _ := va.([]any)
		tb, _ := b[k].([]any)
		addLonely(k, ta, tb, lonely)
	}
	for k, vb := range b {
		if _, ok := a[k]; !ok {
			tb, _ := vb.([]any)
			addLonely(k, nil, tb, lonely)
		}
	}
	var out []Difference
	for _, d := range lonely {
		out = append(out, d)
	}
	for p := range paths {
		if presentational(p) || inLonely(p, lonely) {
			continue
		}
		va, okA := fa[p]
		vb, okB := fb[p]
		if okA && okB && reflect.DeepEqual(va, vb) {
			continue
		}
		d := Difference{Path: p, A: va, B: vb}
		if !okA {
			d.A = nil
		}
		if !okB {
			d.B = nil
		}
		out = append(out, d)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Path < out[j].Path })
	return out
}

// addLonely records the entries of the array of tables named k that only
// one side has (ta from run A, tb from run B).
func addLonely(k string, ta, tb []any, out map[string]Difference) {
	isTables := func(x []any) bool {
		if len(x) == 0 {
			return false
		}
		_, ok := x[0].(map[string]any)
		return ok
	}
	if !isTables(ta) && !isTables(tb) {
		return
	}
	for i := len(tb); i < len(ta); i++ {
		p := k + "[" + strconv.Itoa(i) + "]"
		out[p] = Difference{Path: p, A: ta[i]}
	}
	for i := len(ta); i < len(tb); i++ {
		p := k + "[" + strconv.Itoa(i) + "]"
		out[p] = Difference{Path: p, B: tb[i]}
	}
}

// inLonely reports whether a leaf path lies inside an entry recorded as
// a whole-table difference.
func inLonely(path string, lonely map[string]Difference) bool {
	for p := range lonely {
		if strings.HasPrefix(path, p+".") {
			return true
		}
	}
	return false
}

func presentational(path string) bool {
	last := path
	if i := strings.LastIndex(path, "."); i >= 0 {
		last = path[i+1:]
	}
	return last == "title" || last == "description" || last == "label"
}

// Difference is one configuration field that differs.
type Difference struct {
	Path string
	A, B any // nil when absent
}

// String writes "path: a -> b".
func (d Difference) String() string {
	return fmt.Sprintf("%s: %s -> %s", d.Path, show(d.A), show(d.B))
}

// show writes a value as TOML on one line (tables inline).
func show(v any) string {
	switch x := v.(type) {
	case nil:
		return "(absent)"
	case map[string]any:
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		parts := make([]string, len(keys))
		for i, k := range keys {
			parts[i] = k + " = " + show(x[k])
		}
		return "{" + strings.Join(parts, ", ") + "}"
	case []any:
		parts := make([]string, len(x))
		for i, e := range x {
			parts[i] = show(e)
		}
		return "[" + strings.Join(parts, ", ") + "]"
	}
	b, err := toml.Marshal(map[string]any{"v": v})
	if err != nil {
		return fmt.Sprint(v)
	}
	return strings.TrimSpace(strings.TrimPrefix(string(b), "v = "))
}

// apply returns a deep copy of tree with the given differences switched to
// their B values.
func apply(tree map[string]any, diffs []Difference) (map[string]any, error) {
	c := deepCopy(tree).(map[string]any)
	for _, d := range diffs {
		if err := set(c, d.Path, d.B); err != nil {
			return nil, err
		}
	}
	prune(c)
	return c, nil
}

// prune drops tables left empty by deletions from arrays of tables (a
// table run B does not have at all).
func prune(m map[string]any) {
	for k, v := range m {
		switch x := v.(type) {
		case map[string]any:
			prune(x)
		case []any:
			kept := x[:0]
			for _, e := range x {
				if t, ok := e.(map[string]any); ok {
					prune(t)
					if len(t) == 0 {
						continue
					}
				}
				kept = append(kept, e)
			}
			if len(kept) == 0 {
				delete(m, k)
			} else {
				m[k] = kept
			}
		}
	}
}

func deepCopy(v any) any {
	switch x := v.(type) {
	case map[string]any:
		m := make(map[string]any, len(x))
		for k, e := range x {
			m[k] = deepCopy(e)
		}
		return m
	case []any:
		s := make([]any, len(x))
		for i, e := range x {
			s[i] = deepCopy(e)
		}
		return s
	}
	return v
}

// set writes value at path (nil deletes), creating tables as needed.
func set(root map[string]any, path string, value any) error {
	parts := strings.Split(path, ".")
	cur := root
	for i, p := range parts {
		name, idx := p, -1
		if j := strings.IndexByte(p, '['); j >= 0 && strings.HasSuffix(p, "]") {
			n, err := strconv.Atoi(p[j+1 : len(p)-1])
			if err != nil {
				return fmt.Errorf("path %s: bad index", path)
			}
			name, idx = p[:j], n
		}
		last := i == len(parts)-1
		if idx < 0 {
			if last {
				if value == nil {
					delete(cur, name)
				} else {
					cur[name] = value
				}
				return nil
			}
			next, ok := cur[name].(map[string]any)
			if !ok {
				next = map[string]any{}
				cur[name] = next
			}
			cur = next
			continue
		}
		arr, _ := cur[name].([]any)
		for len(arr) <= idx {
			arr = append(arr, map[string]any{})
		}
		cur[name] = arr
		t, ok := arr[idx].(map[string]any)
		if !ok {
			return fmt.Errorf("path %s: %s[%d] is not a table", path, name, idx)
		}
		if last {
			// A whole entry: replaced, or emptied (prune drops it) so
			// that the indices of the others stay as they are.
			if value == nil {
				arr[idx] = map[string]any{}
				return nil
			}
			m, ok := value.(map[string]any)
			if !ok {
				return fmt.Errorf("path %s: a table entry needs a table", path)
			}
			arr[idx] = deepCopy(m)
			return nil
		}
		cur = t
	}
	return nil
}

// render writes a tree as TOML.
func render(tree map[string]any) (string, error) {
	b, err := toml.Marshal(tree)
	if err != nil {
		return "", err
	}
	return string(b), nil
}
