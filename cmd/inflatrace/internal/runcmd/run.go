// Package runcmd implements "inflatrace run CONFIG": evaluate a study
// configuration through the pipeline, recording every node in the ledger
// and reusing those already recorded.
package runcmd

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
	"github.com/inflatrace/inflatrace/stages/study/edit"
)

// Options are the parsed flags and arguments of run.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Config  string
	Jobs    int
	JSON    bool
	Shard   string // "I/N": evaluate the I-th of N deterministic shares
	// From is the recorded run (id, prefix, tag or "latest") whose
	// configuration text is re-run, instead of Config.
	From string
	// Edits are the --set, --add and --drop changes, in command-line order.
	Edits []edit.Edit
	// WriteConfig names a file the edited configuration is written to.
	WriteConfig string
	// DryRun checks the edited configuration (and writes it) without running.
	DryRun bool
}

// NewCmd returns the run command; run is called with the parsed options
// (Run when nil).
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "run CONFIG | run --from RUN [--set PATH=VALUE]... [--add ARRAY={...}]... [--drop PATH]...",
		Short: "Evaluate a study configuration and record it in the ledger",
		Long: `Evaluate every model, reheating history and constraint of a study
configuration (TOML) as a DAG of stage nodes. A node whose key is already in
the ledger is reused, not recomputed. Results go to stdout, progress to stderr.

--from RUN re-runs the configuration text recorded with RUN (a run id, a
unique prefix, a tag or "latest"); --set PATH=VALUE (PATH as in
configuration errors: slow_roll.method, reheating[1].w_reh, model[2].alpha;
VALUE is TOML, a bare word is a string), --add ARRAY={inline table} (model,
reheating, constraint or forecast) and --drop PATH (a key or an entry such
as model[3]) edit it first, in the order given, keeping the rest of the text
and its comments. They also edit a CONFIG file's text (the file itself is
not changed). The new run records the run it was derived from.`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.Config = args[0]
			}
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().IntVarP(&opts.Jobs, "jobs", "j", 0, "nodes evaluated at once (default: the number of CPUs)")
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print one JSON object: run, computed, reused, failed, results")
	cmd.Flags().StringVar(&opts.Shard, "shard", "", "evaluate only share I of N (I/N, 1 <= I <= N): model points i with i mod N = I-1")
	cmd.Flags().StringVar(&opts.From, "from", "", "re-run the configuration recorded with this run (id, prefix, tag or latest)")
	cmd.Flags().Var(&editFlag{kind: edit.Set, edits: &opts.Edits}, "set", "PATH=VALUE: set a key (slow_roll.method=exact, model[0].alpha='[1, 7]'); repeatable")
	cmd.Flags().Var(&editFlag{kind: edit.Add, edits: &opts.Edits}, "add", "ARRAY={...}: append a [[model]], [[reheating]], [[constraint]] or [[forecast]] entry; repeatable")
	cmd.Flags().Var(&editFlag{kind: edit.Drop, edits: &opts.Edits}, "drop", "PATH: remove a key or an entry (model[3]); repeatable")
	cmd.Flags().StringVar(&opts.WriteConfig, "write-config", "", "write the edited configuration to this file")
	cmd.Flags().BoolVar(&opts.DryRun, "dry-run", false, "check the edited configuration (print it, or write it with --write-config) without running it")
	return cmd
}

// Output is the JSON shape of run --json (stable field names).
type Output struct {
	Run      string         `json:"run"`
	Status   string         `json:"status"`
	Computed int            `json:"computed"`
	Reused   int            `json:"reused"`
	Failed   int            `json:"failed"`
	Skipped  int            `json:"skipped"`
	Results  []study.Result `json:"results"`
}

// Run loads the configuration, executes it and prints the results.
func Run(ctx context.Context, o *Options) error {
	if o.Jobs < 0 {
		return app.Usage(errors.New("--jobs must be at least 1"))
	}
	s, from, err := load(ctx, o)
	if err != nil {
		return err
	}
	if s.NumModels() == 0 {
		return app.Usage(fmt.Errorf("%s: no [[model]] to predict; its [[inference]] tables run with \"inflatrace infer %s\"", s.File, s.File))
	}
	if o.DryRun {
		if o.WriteConfig == "" {
			_, err := o.Env.Stdout.Write(s.Text)
			return err
		}
		return nil
	}
	if o.Shard != "" {
		var i, n int
		if _, err := fmt.Sscanf(o.Shard, "%d/%d", &i, &n); err != nil || n < 1 || i < 1 || i > n || fmt.Sprintf("%d/%d", i, n) != o.Shard {
			return app.Usage(fmt.Errorf("--shard %q: want I/N with 1 <= I <= N", o.Shard))
		}
		s.Shard(i, n)
		s.File += fmt.Sprintf(" [shard %d/%d]", i, n) // recorded as the run's config path
	}
	w := o.Env.Stdout
	wrote := 0
	var numbering app.ResultNumbering
	jsonRow := 0 // the row of the last recorded result written as JSON
	emit := func(run pipeline.RunID, rs []study.Result) error {
		if o.JSON {
			// One JSON object, written as the results arrive: run first,
			// the counts after the results.
			if wrote == 0 {
				fmt.Fprintf(w, "{\n  \"run\": %q,\n  \"results\": [", run)
			}
			for _, r := range rs {
				// The N of RUN#N, counted as the text table counts it:
				// every result but a failed one takes the next number.
				if r.Error == "" {
					jsonRow++
					r.Row = jsonRow
				}
				b, err := json.MarshalIndent(r, "    ", "  ")
				if err != nil {
					return err
				}
				sep := ","
				if wrote == 0 {
					sep = ""
				}
				fmt.Fprintf(w, "%s\n    %s", sep, b)
				wrote++
			}
			return nil
		}
		// RUN#N numbers continue from chunk to chunk.
		rows := numbering.Rows(rs)
		if wrote == 0 {
			wrote += len(rs)
			return o.Env.Table(w, app.ResultHeader, rows)
		}
		wrote += len(rs)
		return o.Env.TableRows(w, rows)
	}
	out, err := o.Env.ExecuteWith(ctx, o.Globals, s, app.ExecOptions{Jobs: o.Jobs, Emit: emit, DerivedFrom: from})
	if out == nil {
		if o.JSON && wrote > 0 {
			fmt.Fprintln(w, "\n  ]\n}")
		}
		return err
	}
	if o.JSON {
		rep := out.Report
		if wrote == 0 {
			fmt.Fprintf(w, "{\n  \"run\": %q,\n  \"results\": [", rep.Run)
		}
		fmt.Fprintf(w, "\n  ],\n  \"status\": %q,\n  \"computed\": %d,\n  \"reused\": %d,\n  \"failed\": %d,\n  \"skipped\": %d\n}\n",
			rep.Status, rep.Computed, rep.Reused, rep.Failed, rep.Skipped)
	}
	return err
}
