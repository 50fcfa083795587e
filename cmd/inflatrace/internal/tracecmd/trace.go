// Package tracecmd implements "inflatrace trace RESULT": the full lineage
// of one result, every upstream node with its stage, version, parameters,
// key and output hash.
package tracecmd

import (
	"context"
	"fmt"
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
		Long: `RESULT is RUN#N (the N-th result of a run, counting from 1, where RUN is an id,
prefix, tag or "latest") or a node key (a unique prefix of at least 6 hex digits).`,
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
}

// ResolveResult turns RUN#N or a key prefix into a node key and a label.
func ResolveResult(ctx context.Context, l *ledger.Ledger, ref string) (pipeline.KeyID, string, error) {
	if run, nth, ok := strings.Cut(ref, "#"); ok {
		n, err := strconv.Atoi(nth)
		if err != nil || n < 1 {
			return "", "", app.Usage(fmt.Errorf("result %q: want RUN#N with N >= 1", ref))
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
			return "", "", fmt.Errorf("run %s has %d results, not %d: %w", id, len(refs), n, ledger.ErrNotFound)
		}
		return refs[n-1].Key, refs[n-1].Label, nil
	}
	k, err := l.ResolveKey(ctx, ref)
	return k, "", err
}

// Run prints the lineage.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedger(o.Globals)
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
		jn := Node{Stage: n.Stage, Version: n.Version, Key: string(n.Key), OutputHash: string(n.OutputHash), Status: string(n.Status), Params: map[string]string{}}
		for _, p := range n.Params.Names() {
			jn.Params[p] = valueText(n.Params[p])
		}
		for _, in := range n.Inputs {
			jn.Inputs = append(jn.Inputs, string(in.Key))
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
		fmt.Fprintf(w, "\n[%d] %s v%d  %s\n    key    %s\n    output %s\n", i+1, n.Stage, n.Version, n.Status, n.Key, n.OutputHash)
		for _, in := range n.Inputs {
			fmt.Fprintf(w, "    input  %s\n", in)
		}
		for _, p := range lin[i].Params.Names() {
			fmt.Fprintf(w, "    %-12s %s\n", p, n.Params[p])
		}
	}
	return nil
}

func valueText(v pipeline.Value) string {
	if v.Kind == pipeline.KindFloat {
		return pipeline.FormatFloat(v.Float) + " " + v.Unit
	}
	return strconv.Quote(v.Str)
}
