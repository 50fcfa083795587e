// Package diffcmd implements "inflatrace diff RUN_A RUN_B": every
// assumption that differs between two runs, the change of each paired
// result, and its attribution to the differing configuration fields.
package diffcmd

import (
	"context"
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/provenance"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Options are the parsed flags and arguments of diff.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	A, B    string
	JSON    bool
}

// NewCmd returns the diff command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "diff RUN_A RUN_B",
		Short: "What differs between two runs, and which assumption moved each prediction",
		Long: `diff lists every assumption that differs between two runs (configuration
fields, stage versions, the tool version, constraint data), pairs their results
and, for each, gives the change of N*, n_s, r, alpha_s, Delta chi^2 and sigmas,
decomposed into the contribution of each differing configuration field
(Shapley decomposition over the intermediate configurations, evaluated
through the cached DAG and not recorded) plus a remainder (what cannot be
re-evaluated, such as a changed stage version, and rounding).`,
		Args: cobra.ExactArgs(2),
		RunE: func(c *cobra.Command, args []string) error {
			opts.A, opts.B = args[0], args[1]
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the report as JSON")
	return cmd
}

func load(ctx context.Context, l *ledger.Ledger, ref string) (provenance.Run, error) {
	d, rs, err := app.LoadRun(ctx, l, ref)
	if err != nil {
		return provenance.Run{}, err
	}
	ns, err := l.RunNodes(ctx, d.ID)
	if err != nil {
		return provenance.Run{}, err
	}
	return provenance.Run{Detail: d, Nodes: ns, Results: rs}, nil
}

// Run compares the runs.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	a, err := load(ctx, l, o.A)
	if err != nil {
		return err
	}
	b, err := load(ctx, l, o.B)
	if err != nil {
		return err
	}
	dir := filepath.Dir(a.Detail.ConfigPath)
	eval := provenance.Evaluator(&provenance.ReadThrough{L: l}, dir, app.ToolIdentity, o.Env.CPUs, o.Env.Now)
	rep, err := provenance.Compare(ctx, a, b, eval)
	if err != nil {
		return err
	}
	if o.JSON {
		return app.JSON(o.Env.Stdout, jsonReport(rep))
	}
	w := o.Env.Stdout
	fmt.Fprintf(w, "A %s\nB %s\n\n# assumptions that differ (%d)\n", rep.A, rep.B, len(rep.Assumptions))
	var attributed []string
	for i, x := range rep.Assumptions {
		mark := ""
		if x.Attributed {
			attributed = append(attributed, fmt.Sprintf("[%d]", i+1))
		} else {
			mark = " (not re-evaluable: in the remainder)"
		}
		fmt.Fprintf(w, "[%d] %s %s%s\n", i+1, x.Kind, x.What, mark)
	}
	fmt.Fprintf(w, "\n# paired results (%d); %d configurations evaluated\n", len(rep.Pairs), rep.Evaluated)
	for _, p := range rep.Pairs {
		if p.LabelA == p.LabelB {
			fmt.Fprintf(w, "\n%s\n", p.LabelA)
		} else {
			fmt.Fprintf(w, "\n%s\n  -> %s\n", p.LabelA, p.LabelB)
		}
		if len(p.Unseparated) > 0 {
			fmt.Fprintf(w, "  (not separated: configurations %s failed or lack this result; total change only)\n", strings.Join(p.Unseparated, ", "))
		}
		for _, q := range provenance.Quantities {
			c, ok := p.Changes[q]
			if !ok || c.Total == 0 && allZero(c.Contributions) {
				continue
			}
			var parts []string
			for i, x := range c.Contributions {
				parts = append(parts, fmt.Sprintf("%s %+.4g", attributed[i], x))
			}
			parts = append(parts, fmt.Sprintf("remainder %+.3g", c.Remainder))
			fmt.Fprintf(w, "  %-10s %.6g -> %.6g  (%+.4g = %s)\n", q, c.A, c.B, c.Total, strings.Join(parts, ", "))
		}
	}
	for _, u := range rep.Unpaired {
		fmt.Fprintf(w, "unpaired %s\n", u)
	}
	return nil
}

func allZero(xs []float64) bool {
	for _, x := range xs {
		if x != 0 {
			return false
		}
	}
	return true
}

// JSONReport is the JSON shape of diff --json.
type JSONReport struct {
	A           pipeline.RunID   `json:"run_a"`
	B           pipeline.RunID   `json:"run_b"`
	Assumptions []JSONAssumption `json:"assumptions"`
	Pairs       []JSONPair       `json:"pairs"`
	Unpaired    []string         `json:"unpaired"`
	Evaluated   int              `json:"configurations_evaluated"`
}

// JSONAssumption is one differing assumption.
type JSONAssumption struct {
	Kind       string `json:"kind"`
	What       string `json:"what"`
	Attributed bool   `json:"attributed"`
}

// JSONPair is one paired result.
type JSONPair struct {
	A       string                       `json:"label_a"`
	B       string                       `json:"label_b"`
	Changes map[string]provenance.Change `json:"changes"`
	// NotSeparated lists the intermediate configurations that failed or
	// lack this result (the changes are then totals only).
	NotSeparated []string `json:"not_separated,omitempty"`
}

func jsonReport(r *provenance.Report) JSONReport {
	out := JSONReport{A: r.A, B: r.B, Unpaired: r.Unpaired, Evaluated: r.Evaluated}
	for _, a := range r.Assumptions {
		out.Assumptions = append(out.Assumptions, JSONAssumption{a.Kind, a.What, a.Attributed})
	}
	for _, p := range r.Pairs {
		out.Pairs = append(out.Pairs, JSONPair{p.LabelA, p.LabelB, p.Changes, p.Unseparated})
	}
	return out
}
