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
)

// Options are the parsed flags and arguments of run.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Config  string
	Jobs    int
	JSON    bool
	Shard   string // "I/N": evaluate the I-th of N deterministic shares
}

// NewCmd returns the run command; run is called with the parsed options
// (Run when nil).
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "run CONFIG",
		Short: "Evaluate a study configuration and record it in the ledger",
		Long: `Evaluate every model, reheating history and constraint of a study
configuration (TOML) as a DAG of stage nodes. A node whose key is already in
the ledger is reused, not recomputed. Results go to stdout, progress to stderr.`,
		Args: cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Config = args[0]
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().IntVarP(&opts.Jobs, "jobs", "j", 0, "nodes evaluated at once (default: the number of CPUs)")
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print one JSON object: run, computed, reused, failed, results")
	cmd.Flags().StringVar(&opts.Shard, "shard", "", "evaluate only share I of N (I/N, 1 <= I <= N): model points i with i mod N = I-1")
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
	s, err := study.Load(o.Config)
	if err != nil {
		return app.Usage(err)
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
	emit := func(run pipeline.RunID, rs []study.Result) error {
		if o.JSON {
			// One JSON object, written as the results arrive: run first,
			// the counts after the results.
			if wrote == 0 {
				fmt.Fprintf(w, "{\n  \"run\": %q,\n  \"results\": [", run)
			}
			for _, r := range rs {
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
	out, err := o.Env.ExecuteStudyTo(ctx, o.Globals, s, o.Jobs, emit)
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
