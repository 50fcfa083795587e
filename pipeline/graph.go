package pipeline

import (
	"fmt"
	"strconv"
)

// Node is one execution of a stage in a graph.
type Node struct {
	Index  int
	Stage  Stage
	Params Values
	Inputs []int  // graph indices of upstream nodes, in declared order
	Label  string // a human description, not part of the key
}

// Result marks a node whose lineage makes one reported prediction.
type Result struct {
	Label string
	Node  int
}

// Graph is a DAG of nodes. Nodes are added in topological order (an input
// must exist before its consumer), and identical nodes (same stage,
// parameters and inputs) are merged, so shared upstream work runs once.
type Graph struct {
	Nodes   []*Node
	Results []Result
	index   map[string]int
}

// Add appends a node and returns its index, or the index of an identical
// node already present. It checks the parameters against the stage's
// declaration and the inputs against its declared upstream stages.
func (g *Graph) Add(st Stage, params Values, label string, inputs ...int) (int, error) {
	spec := st.Spec()
	if err := spec.CheckParams(params); err != nil {
		return 0, err
	}
	if len(inputs) != len(spec.Inputs) {
		return 0, fmt.Errorf("stage %s: %d inputs given, %d declared", spec.Name, len(inputs), len(spec.Inputs))
	}
	for i, in := range inputs {
		if in < 0 || in >= len(g.Nodes) {
			return 0, fmt.Errorf("stage %s: input %d refers to node %d, not yet in the graph", spec.Name, i, in)
		}
		if got := g.Nodes[in].Stage.Spec().Name; got != spec.Inputs[i] {
			return 0, fmt.Errorf("stage %s: input %d is a %s node, want %s", spec.Name, i, got, spec.Inputs[i])
		}
	}
	// The node's signature: stage, version, canonical parameters, inputs.
	var arr [valuesOnStack]namedValue
	entries, size := sortedValues(params, arr[:], "")
	sig := make([]byte, 0, size+len(spec.Name)+16+8*len(inputs))
	sig = append(sig, spec.Name...)
	sig = append(sig, '/')
	sig = strconv.AppendInt(sig, int64(spec.Version), 10)
	sig = append(sig, '\n')
	sig, err := appendValues(sig, entries, "")
	if err != nil {
		return 0, fmt.Errorf("stage %s: %w", spec.Name, err)
	}
	for _, in := range inputs {
		sig = append(sig, ' ')
		sig = strconv.AppendInt(sig, int64(in), 10)
	}
	if g.index == nil {
		g.index = map[string]int{}
	}
	if i, ok := g.index[string(sig)]; ok {
		return i, nil
	}
	n := &Node{Index: len(g.Nodes), Stage: st, Params: params, Inputs: inputs, Label: label}
	g.Nodes = append(g.Nodes, n)
	g.index[string(sig)] = n.Index
	return n.Index, nil
}

// MarkResult records node i as a result under label.
func (g *Graph) MarkResult(label string, i int) {
	g.Results = append(g.Results, Result{Label: label, Node: i})
}
