// Package tracecmd implements "inflatrace trace RESULT": the full lineage
// of one result, every upstream node with its stage, version, parameters,
// output values with their units, key and output hash.
package tracecmd

import (
	"context"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Options are the parsed flags and arguments of trace.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Result  string
	JSON    bool
}

// NewCmd returns the trace command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "trace RESULT",
		Short: "Show the full lineage of one result",
		Long: `RESULT is RUN#N (the N-th result of a run, counting from 1: the # column of
run, show and table, where RUN is an id, prefix, tag or "latest") or a node key
(a unique prefix of at least 6 hex digits). A bare RUN is refused: a run has
many results.

Each node is listed upstream first with its parameters and its outputs, every
value with its unit ([1] for a dimensionless number).`,
		Args: cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Result = args[0]
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the lineage as JSON")
	return cmd
}

// Node is the JSON shape of one lineage node.
type Node struct {
	Stage      string            `json:"stage"`
	Version    int               `json:"version"`
	Key        string            `json:"key"`
	OutputHash string            `json:"output_hash,omitempty"`
	Status     string            `json:"status"`
	Params     map[string]string `json:"params"`
	Inputs     []string          `json:"inputs"`
	// Outputs are the node's output values, absent for a failed node.
	Outputs map[string]Output `json:"outputs,omitempty"`
	Error   string            `json:"error,omitempty"`
}

// Output is the JSON shape of one output value: a number (every digit)
// with its unit, or a string with no unit.
type Output struct {
	Value any    `json:"value"`
	Unit  string `json:"unit,omitempty"`
}

// hint is the usage hint for a result reference; results is the number
// of results of the run named, or -1 when none is known.
func hint(results int) string {
	n := "N from 1"
	if results >= 0 {
		n = fmt.Sprintf("N from 1 to %d", results)
	}
	return "trace needs one result: RUN#N, " + n + " (the # column of run, show and table), or a node key"
}

// ResolveResult turns RUN#N or a key prefix into a node key and a label.
// A bare run reference, or N out of range, is a usage error with a hint.
func ResolveResult(ctx context.Context, l *ledger.Ledger, ref string) (pipeline.KeyID, string, error) {
	if run, nth, ok := strings.Cut(ref, "#"); ok {
		n, err := strconv.Atoi(nth)
		if err != nil || n < 1 {
			return "", "", app.Usage(fmt.Errorf("result %q: want RUN#N with N >= 1: %s", ref, hint(-1)))
		}
		id, err := l.ResolveRun(ctx, run)
		if err != nil {
			return "", "", err
		}
		refs, err := l.RunResults(ctx, id)
		if err != nil {
			return "", "", err
		}
		if n > len(refs) {
			return "", "", app.Usage(fmt.Errorf("run %s has %d results, not %d: %s: %w", id, len(refs), n, hint(len(refs)), ledger.ErrNotFound))
		}
		return refs[n-1].Key, refs[n-1].Label, nil
	}
	k, kerr := l.ResolveKey(ctx, ref)
	if kerr == nil {
		return k, "", nil
	}
	// Not a key: a run named alone is the common slip.
	if id, err := l.ResolveRun(ctx, ref); err == nil {
		count := -1
		if refs, err := l.RunResults(ctx, id); err == nil {
			count = len(refs)
		}
		return "", "", app.Usage(fmt.Errorf("%q is run %s, not one result: %s (e.g. %s#1)", ref, id, hint(count), ref))
	}
	return "", "", kerr
}

// Run prints the lineage.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	key, label, err := ResolveResult(ctx, l, o.Result)
	if err != nil {
		return err
	}
	lin, err := l.Lineage(ctx, key)
	if err != nil {
		return err
	}
	nodes := make([]Node, len(lin))
	for i, n := range lin {
		jn := Node{Stage: n.Stage, Version: n.Version, Key: string(n.Key), OutputHash: string(n.OutputHash), Status: string(n.Status),
			Params: map[string]string{}, Error: n.Error}
		for _, p := range n.Params.Names() {
			jn.Params[p] = valueText(n.Params[p])
		}
		for _, in := range n.Inputs {
			jn.Inputs = append(jn.Inputs, string(in.Key))
		}
		if n.Status == pipeline.NodeOK && n.Outputs != nil {
			jn.Outputs = make(map[string]Output, len(n.Outputs))
			for name, v := range n.Outputs {
				if v.Kind == pipeline.KindFloat {
					jn.Outputs[name] = Output{Value: v.Float, Unit: v.Unit}
				} else {
					jn.Outputs[name] = Output{Value: v.Str}
				}
			}
		}
		nodes[i] = jn
	}
	if o.JSON {
		return app.JSON(o.Env.Stdout, map[string]any{"result": string(key), "label": label, "lineage": nodes})
	}
	w := o.Env.Stdout
	if label != "" {
		fmt.Fprintf(w, "result %s\n", label)
	}
	fmt.Fprintf(w, "key    %s\n", key)
	for i, n := range nodes {
		fmt.Fprintf(w, "\n[%d] %s v%d  %s\n    key    %s\n", i+1, n.Stage, n.Version, n.Status, n.Key)
		if n.OutputHash != "" {
			fmt.Fprintf(w, "    output %s\n", n.OutputHash)
		}
		for _, in := range n.Inputs {
			fmt.Fprintf(w, "    input  %s\n", in)
		}
		if n.Error != "" {
			fmt.Fprintf(w, "    error  %s\n", n.Error)
		}
		if names := lin[i].Params.Names(); len(names) > 0 {
			fmt.Fprintf(w, "  parameters\n")
			writeValues(w, lin[i].Params)
		}
		if len(lin[i].Outputs) > 0 && n.Outputs != nil {
			fmt.Fprintf(w, "  outputs\n")
			writeValues(w, lin[i].Outputs)
		}
	}
	return nil
}

// writeValues lists values one a line, "name = value [unit]", names
// aligned and sorted: numbers first, then the strings (a model's
// expressions, an end condition), which can be long.
func writeValues(w io.Writer, vs pipeline.Values) {
	names := vs.Names()
	width := 0
	for _, n := range names {
		width = max(width, len(n))
	}
	for _, kind := range []pipeline.Kind{pipeline.KindFloat, pipeline.KindString} {
		for _, n := range names {
			if v := vs[n]; v.Kind == kind {
				fmt.Fprintf(w, "    %-*s = %s\n", width, n, ReadableValue(v))
			}
		}
	}
}

// ReadableValue writes a value for a reader: a number to ten significant
// digits with its unit in brackets ("0.9608333333 [1]", "6.369016e+15
// [GeV]"), a string as it is.
func ReadableValue(v pipeline.Value) string {
	if v.Kind == pipeline.KindFloat {
		return strconv.FormatFloat(v.Float, 'g', 10, 64) + " [" + v.Unit + "]"
	}
	return v.Str
}

func valueText(v pipeline.Value) string {
	if v.Kind == pipeline.KindFloat {
		return pipeline.FormatFloat(v.Float) + " " + v.Unit
	}
	return strconv.Quote(v.Str)
}
