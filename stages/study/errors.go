package study

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2/unstable"
)

// ConfigError is a problem in a configuration file, located by line and
// column (0 when unknown) and by key path.
type ConfigError struct {
	File         string
	Line, Column int
	Path         string // key path such as "model[2].alpha"; may be empty
	Msg          string
}

func (e *ConfigError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		b.WriteString(":" + strconv.Itoa(e.Line))
		if e.Column > 0 {
			b.WriteString(":" + strconv.Itoa(e.Column))
		}
	}
	b.WriteString(": ")
	if e.Path != "" {
		b.WriteString(e.Path + ": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// positions maps key paths ("title", "model[0].alpha", "reheating[1]") to
// where they appear in the document.
type positions map[string]unstable.Position

// indexPositions parses the document with go-toml's low-level parser and
// records the position of every key and array-of-tables header.
func indexPositions(data []byte) positions {
	idx := positions{}
	var p unstable.Parser
	p.Reset(data)
	var table string
	arrays := map[string]int{}
	for p.NextExpression() {
		e := p.Expression()
		switch e.Kind {
		case unstable.Table, unstable.ArrayTable:
			k, first := keyPath(e.Key())
			// A sub-table of an array of tables belongs to its last element.
			for name, n := range arrays {
				if rest, ok := strings.CutPrefix(k, name+"."); ok && e.Kind == unstable.Table {
					k = name + "[" + strconv.Itoa(n-1) + "]." + rest
				}
			}
			if e.Kind == unstable.ArrayTable {
				arrays[k]++
				k = k + "[" + strconv.Itoa(arrays[k]-1) + "]"
			}
			table = k
			if first != nil {
				idx[k] = p.Shape(first.Raw).Start
			}
		case unstable.KeyValue:
			indexKeyValue(&p, idx, table, e)
		}
	}
	return idx
}

func indexKeyValue(p *unstable.Parser, idx positions, table string, e *unstable.Node) {
	k, first := keyPath(e.Key())
	if table != "" {
		k = table + "." + k
	}
	if first != nil {
		idx[k] = p.Shape(first.Raw).Start
	}
	if v := e.Value(); v != nil && v.Kind == unstable.InlineTable {
		it := v.Children()
		for it.Next() {
			if c := it.Node(); c.Kind == unstable.KeyValue {
				indexKeyValue(p, idx, k, c)
			}
		}
	}
}

func keyPath(it unstable.Iterator) (string, *unstable.Node) {
	var parts []string
	var first *unstable.Node
	for it.Next() {
		n := it.Node()
		if first == nil {
			first = n
		}
		parts = append(parts, string(n.Data))
	}
	return strings.Join(parts, "."), first
}

// errAt returns a ConfigError at the position of path, or of its nearest
// recorded parent.
func (c *parser) errAt(path string, format string, args ...any) *ConfigError {
	e := &ConfigError{File: c.file, Path: path, Msg: fmt.Sprintf(format, args...)}
	for p := path; p != ""; {
		if pos, ok := c.pos[p]; ok {
			e.Line, e.Column = pos.Line, pos.Column
			break
		}
		i := strings.LastIndexAny(p, ".[")
		if i < 0 {
			break
		}
		p = p[:i]
	}
	return e
}
