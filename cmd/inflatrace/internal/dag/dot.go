// Package dag writes a run's stage graph in the DOT language: one node per
// stage execution, labelled by stage and short key and marked computed,
// reused or failed, with an edge from each input; optionally one result's
// lineage highlighted.
package dag

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Colours of the node marks.
var fill = map[pipeline.Action]string{
	pipeline.Computed: "#b7e1a1",
	pipeline.Reused:   "#d9d9d9",
	pipeline.Failed:   "#f4a6a6",
}

// Options control the drawing.
type Options struct {
	Title   string
	Lineage map[pipeline.KeyID]bool // nodes to highlight (nil: none)
}

func id(k pipeline.KeyID) string {
	return "n" + strings.TrimPrefix(string(k), pipeline.HashPrefix)[:16]
}

// Write writes the graph of a run's nodes.
func Write(w io.Writer, nodes []ledger.RunNode, o Options) error {
	var b strings.Builder
	b.WriteString("digraph inflatrace {\n")
	b.WriteString("  graph [rankdir=TB, fontname=\"Helvetica\", fontsize=12")
	if o.Title != "" {
		fmt.Fprintf(&b, ", label=%q, labelloc=t", o.Title)
	}
	b.WriteString("];\n  node [shape=box, style=\"rounded,filled\", fontname=\"Helvetica\", fontsize=10];\n  edge [color=\"#555555\"];\n")
	in := map[pipeline.KeyID]bool{}
	for _, n := range nodes {
		in[n.Key] = true
	}
	sorted := append([]ledger.RunNode(nil), nodes...)
	sort.SliceStable(sorted, func(i, j int) bool { return sorted[i].Ordinal < sorted[j].Ordinal })
	for _, n := range sorted {
		attrs := fmt.Sprintf("label=%q, fillcolor=%q, tooltip=%q", n.Stage+"\n"+n.Key.Short()+"\n"+string(n.Action), fill[n.Action], string(n.Key))
		if o.Lineage != nil {
			if o.Lineage[n.Key] {
				attrs += ", penwidth=3, color=\"#1f4e9c\""
			} else {
				attrs += ", color=\"#bbbbbb\", fontcolor=\"#999999\""
			}
		}
		fmt.Fprintf(&b, "  %s [%s];\n", id(n.Key), attrs)
	}
	for _, n := range sorted {
		for _, up := range n.Inputs {
			if !in[up.Key] {
				continue
			}
			attrs := ""
			if o.Lineage != nil && o.Lineage[n.Key] && o.Lineage[up.Key] {
				attrs = " [penwidth=2.5, color=\"#1f4e9c\"]"
			}
			fmt.Fprintf(&b, "  %s -> %s%s;\n", id(up.Key), id(n.Key), attrs)
		}
	}
	b.WriteString("}\n")
	_, err := io.WriteString(w, b.String())
	return err
}
