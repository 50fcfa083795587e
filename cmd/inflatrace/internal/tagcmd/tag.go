// Package tagcmd implements "inflatrace tag RUN NAME": a name for a run
// (paper-v1, referee-2) usable wherever a run id is accepted.
package tagcmd

import (
	"context"
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/ledger"
)

// Options are the parsed flags and arguments of tag.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Run     string
	Name    string
	Move    bool
}

// NewCmd returns the tag command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "tag RUN NAME",
		Short: "Name a run (e.g. paper-v1); the name works wherever a run id does",
		Args:  cobra.ExactArgs(2),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Run, opts.Name = args[0], args[1]
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.Move, "move", false, "move the name if it already names another run")
	return cmd
}

// Run tags the run. A name that already names another run is refused (exit
// 2, naming the run that holds it) unless --move is given; tagging a run
// again with a name it already has succeeds and changes nothing.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	id, err := l.ResolveRun(ctx, o.Run)
	if err != nil {
		return err
	}
	if err := l.Tag(ctx, id, o.Name, o.Move); err != nil {
		var taken *ledger.TagTakenError
		switch {
		case errors.As(err, &taken):
			return app.Usage(fmt.Errorf("tag %q already names run %s; to give it to run %s instead, run: inflatrace tag %s %s --move",
				taken.Name, taken.Holder, id, o.Run, o.Name))
		case errors.Is(err, ledger.ErrBadTagName):
			return app.Usage(err)
		}
		return err
	}
	fmt.Fprintf(o.Env.Stderr, "tagged run %s as %s\n", id, o.Name)
	return nil
}
