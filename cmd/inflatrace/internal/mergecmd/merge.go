// Package mergecmd implements "inflatrace merge LEDGER...": shard ledgers
// merged into this one, idempotently, refusing conflicting outputs.
package mergecmd

import (
	"context"
	"fmt"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Options are the parsed arguments of merge.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	From    []string
}

// NewCmd returns the merge command.
func NewCmd(env *app.Env, g *app.Globals) *cobra.Command {
	o := &Options{Env: env, Globals: g}
	return &cobra.Command{
		Use:   "merge LEDGER...",
		Short: "Merge other ledgers (e.g. shards) into this one; idempotent, refuses conflicting outputs",
		Args:  cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o.From = args
			return Run(c.Context(), o)
		},
	}
}

// Run merges the ledgers in order; each merge is one transaction.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	for _, p := range o.From {
		rep, err := l.Merge(ctx, p)
		if err != nil {
			return &app.RunFailedError{Run: pipeline.RunID("merge"), Failed: 1, First: err}
		}
		fmt.Fprintf(o.Env.Stderr, "merged %s: %d run(s), %d node(s) new; %d run(s), %d node(s) already here\n",
			p, rep.Runs, rep.Nodes, rep.RunsKept, rep.NodesKept)
	}
	return nil
}
