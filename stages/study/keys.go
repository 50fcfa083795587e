package study

import (
	"bytes"
	"reflect"
	"sort"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"
)

// decodeStrict decodes a TOML document into v (a pointer to a struct),
// refusing unknown keys and keys that match a declared one only when case
// is ignored, and indexes the document's positions for later errors.
func (c *parser) decodeStrict(data []byte, v any) error {
	dec := toml.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return c.decodeError(err)
	}
	c.pos = indexPositions(data)
	return c.checkKeyCase(data, reflect.TypeOf(v).Elem())
}

// checkKeyCase refuses a key that matches a declared key of the document's
// shape only when case is ignored. TOML keys are case-sensitive, but the
// decoder matches struct fields case-insensitively, so without this check
// "[[Constraint]]" would be read as "[[constraint]]" and, beside it, two
// arrays of tables would silently become one (the later replacing the
// earlier, in an order that re-rendering the document could change).
func (c *parser) checkKeyCase(data []byte, t reflect.Type) error {
	var doc map[string]any
	if err := toml.Unmarshal(data, &doc); err != nil {
		return nil // the strict decode has already reported or will report it
	}
	return c.checkKeys("", doc, t)
}

// checkKeys checks the keys of the decoded table v against the toml tags
// of the struct type t.
func (c *parser) checkKeys(path string, v map[string]any, t reflect.Type) error {
	fields := map[string]reflect.Type{}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		name, _, _ := strings.Cut(f.Tag.Get("toml"), ",")
		if name != "" && name != "-" {
			fields[name] = f.Type
		}
	}
	keys := make([]string, 0, len(v))
	for k := range v {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		p := k
		if path != "" {
			p = path + "." + k
		}
		ft, ok := fields[k]
		if !ok {
			for name := range fields {
				if strings.EqualFold(name, k) {
					e := c.errAt(p, "unknown key %q (keys are case-sensitive; did you mean %q?)", k, name)
					if e.Line == 0 {
						if pos, ok := c.pos[p+"[0]"]; ok {
							e.Line, e.Column = pos.Line, pos.Column
						}
					}
					return e
				}
			}
			continue // an unknown key: the strict decode reports it
		}
		for ft.Kind() == reflect.Pointer || ft.Kind() == reflect.Slice {
			ft = ft.Elem()
		}
		if ft.Kind() != reflect.Struct {
			continue // maps are checked key by key where they are read
		}
		switch x := v[k].(type) {
		case map[string]any:
			if err := c.checkKeys(p, x, ft); err != nil {
				return err
			}
		case []any:
			for i, e := range x {
				if m, ok := e.(map[string]any); ok {
					if err := c.checkKeys(p+"["+strconv.Itoa(i)+"]", m, ft); err != nil {
						return err
					}
				}
			}
		}
	}
	return nil
}
