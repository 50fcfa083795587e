// Package showcmd implements "inflatrace show RUN": one recorded run, its
// configuration, its nodes and its results, read from the ledger.
package showcmd

import (
	"context"
	"fmt"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	stagenodes "github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Options are the parsed flags and arguments of show.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Run     string
	JSON    bool
}

// NewCmd returns the show command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "show RUN",
		Short: "Show one run: its configuration, nodes and results",
		Long:  "RUN is a run id, a unique prefix of one, or \"latest\".",
		Args:  cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Run = args[0]
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the run as JSON")
	return cmd
}

// Node is the JSON shape of one node of a run.
type Node struct {
	Ordinal    int            `json:"ordinal"`
	Stage      string         `json:"stage"`
	Version    int            `json:"version"`
	Key        string         `json:"key"`
	Action     string         `json:"action"`
	DurationMS float64        `json:"duration_ms"`
	Params     map[string]any `json:"params"`
	Inputs     []string       `json:"inputs"`
	Outputs    map[string]any `json:"outputs,omitempty"`
	OutputHash string         `json:"output_hash,omitempty"`
	Error      string         `json:"error,omitempty"`
}

// Output is the JSON shape of show --json.
type Output struct {
	Run string `json:"run"`
	// Unverified says why the run's numbers are not vouched for (imported
	// unsigned or from an untrusted key), until verify RUN.
	Unverified  string `json:"unverified,omitempty"`
	Status      string `json:"status"`
	Started     string `json:"started"`
	Finished    string `json:"finished,omitempty"`
	ToolVersion string `json:"tool_version"`
	ConfigPath  string `json:"config_path"`
	ConfigHash  string `json:"config_hash"`
	Config      string `json:"config"`
	Error       string `json:"error,omitempty"`
	DerivedFrom string `json:"derived_from,omitempty"` // the run this one was re-run from (run --from)
	// AssembledFrom are the shard runs that merge assembled into this run
	// of the whole study, in shard order.
	AssembledFrom []string       `json:"assembled_from,omitempty"`
	Nodes         []Node         `json:"nodes"`
	Results       []study.Result `json:"results"`
}

// valuesJSON renders values as name -> number or string; units are kept in
// the names' documentation, and numbers keep every digit.
func valuesJSON(vs pipeline.Values) map[string]any {
	if vs == nil {
		return nil
	}
	m := make(map[string]any, len(vs))
	for n, v := range vs {
		if v.Kind == pipeline.KindFloat {
			m[n] = map[string]any{"value": v.Float, "unit": v.Unit}
		} else {
			m[n] = v.Str
		}
	}
	return m
}

func paramSummary(vs pipeline.Values) string {
	var parts []string
	for _, n := range vs.Names() {
		v := vs[n]
		if v.Kind == pipeline.KindFloat {
			parts = append(parts, fmt.Sprintf("%s=%.6g", n, v.Float))
		} else {
			s := v.Str
			if len(s) > 24 {
				s = s[:21] + "..."
			}
			parts = append(parts, n+"="+s)
		}
	}
	return strings.Join(parts, " ")
}

// Run shows the run.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	run, results, err := app.LoadRun(ctx, l, o.Run)
	if err != nil {
		return err
	}
	id := run.ID
	nodes, err := l.RunNodes(ctx, id)
	if err != nil {
		return err
	}
	addBounds(results, nodes)
	out := Output{Run: string(id), Status: string(run.Status), Started: run.Started.UTC().Format(time.RFC3339Nano),
		ToolVersion: run.ToolVersion, ConfigPath: run.ConfigPath, ConfigHash: run.ConfigHash, Config: run.ConfigText,
		Error: run.Error, Results: results}
	out.DerivedFrom = string(run.DerivedFrom)
	if why, marked, err := l.Unverified(ctx, id); err != nil {
		return err
	} else if marked {
		out.Unverified = why
	}
	for _, p := range run.Parts {
		out.AssembledFrom = append(out.AssembledFrom, string(p))
	}
	if !run.Finished.IsZero() {
		out.Finished = run.Finished.UTC().Format(time.RFC3339Nano)
	}
	for _, n := range nodes {
		jn := Node{Ordinal: n.Ordinal, Stage: n.Stage, Version: n.Version, Key: string(n.Key), Action: string(n.Action),
			DurationMS: float64(n.RunDuration.Microseconds()) / 1000, Params: valuesJSON(n.Params), Error: n.RunError}
		for _, in := range n.Inputs {
			jn.Inputs = append(jn.Inputs, string(in.Key))
		}
		if n.Status == pipeline.NodeOK {
			jn.Outputs, jn.OutputHash = valuesJSON(n.Outputs), string(n.OutputHash)
		}
		out.Nodes = append(out.Nodes, jn)
	}
	if o.JSON {
		return app.JSON(o.Env.Stdout, out)
	}
	w := o.Env.Stdout
	fmt.Fprintf(w, "run       %s\nstatus    %s\nstarted   %s\nfinished  %s\ntool      inflatrace %s\nconfig    %s (%s)\n",
		out.Run, out.Status, out.Started, out.Finished, out.ToolVersion, out.ConfigPath, out.ConfigHash)
	if out.Error != "" {
		fmt.Fprintf(w, "error     %s\n", out.Error)
	}
	if out.Unverified != "" {
		fmt.Fprintf(w, "UNVERIFIED %s; \"inflatrace verify %s\" recomputes it\n", out.Unverified, out.Run)
	}
	if out.DerivedFrom != "" {
		note := ""
		if _, err := l.Run(ctx, run.DerivedFrom); err != nil {
			note = " (not in this ledger)"
		}
		fmt.Fprintf(w, "derived from %s%s\n", out.DerivedFrom, note)
	}
	if len(out.AssembledFrom) > 0 {
		fmt.Fprintf(w, "assembled from %d shard runs: %s\n", len(out.AssembledFrom), strings.Join(out.AssembledFrom, ", "))
	}
	fmt.Fprintf(w, "\n# configuration\n")
	for _, line := range strings.Split(strings.TrimRight(out.Config, "\n"), "\n") {
		fmt.Fprintf(w, "    %s\n", line)
	}
	fmt.Fprintf(w, "\n# nodes (%d)\n", len(nodes))
	rows := make([][]string, len(nodes))
	for i, n := range nodes {
		note := paramSummary(n.Params)
		if n.RunError != "" {
			note = "error: " + n.RunError
		}
		rows[i] = []string{fmt.Sprint(n.Ordinal), n.Stage, n.Key.Short(), string(n.Action), n.RunDuration.Round(time.Microsecond).String(), note}
	}
	if err := o.Env.Table(w, []string{"#", "stage", "key", "action", "duration", "parameters"}, rows); err != nil {
		return err
	}
	fmt.Fprintf(w, "\n# results (%d)\n", len(results))
	if err := o.Env.Table(w, app.ResultHeader, app.ResultRows(results)); err != nil {
		return err
	}
	if err := endsAndEfolds(o.Env, results); err != nil {
		return err
	}
	return significance(o.Env, results)
}

// endsAndEfolds prints, for each result, the end of inflation its N* is
// counted from (the condition, the field there, and the potential's own
// end point where that differs) and what N* counts, in words.
func endsAndEfolds(env *app.Env, results []study.Result) error {
	var rows [][]string
	defs := map[string]bool{}
	var order []string
	for _, r := range results {
		if r.End == "" || r.Error != "" {
			continue
		}
		sr := "-"
		if r.PhiEndSlowRoll != nil {
			sr = fmt.Sprintf("%.10g", *r.PhiEndSlowRoll)
		}
		rows = append(rows, []string{r.Label, r.Method, r.End, fmt.Sprintf("%.10g", r.PhiEnd), sr})
		key := r.Method + " / " + r.End + ": " + r.NStarDef
		if !defs[key] {
			defs[key] = true
			order = append(order, key)
		}
	}
	if len(rows) == 0 {
		return nil
	}
	w := env.Stdout
	fmt.Fprintf(w, "\n# end of inflation and N* (phi_end is the end N* is counted from; phi_end_slow_roll the potential's end condition where it differs)\n")
	for _, d := range order {
		fmt.Fprintf(w, "#   %s\n", d)
	}
	return env.Table(w, []string{"result", "method", "end", "phi_end [M_p]", "phi_end_slow_roll [M_p]"}, rows)
}

// addBounds fills in the one-dimensional reading (r95, exceeds_r95) of
// results whose lineage was read without the compare node's parameters,
// from the run's own compare nodes (a result's key is its compare node's).
func addBounds(results []study.Result, nodes []ledger.RunNode) {
	params := map[string]pipeline.Values{}
	for _, n := range nodes {
		if n.Stage == stagenodes.CompareStage {
			params[string(n.Key)] = n.Params
		}
	}
	for i := range results {
		r := &results[i]
		if r.R95 != nil || r.DeltaChi2 == nil || r.Error != "" {
			continue
		}
		if p, ok := params[r.Key]; ok {
			if r95, ok := study.OneDimensionalBound(p); ok {
				exceeds := r.R > r95
				r.R95, r.ExceedsR95 = &r95, &exceeds
			}
		}
	}
}

// SignificanceNote explains the two readings show prints for each
// comparison with a constraint set.
const SignificanceNote = `# significance: two readings of each comparison
#   n_sigma, inside_68, inside_95: the point (n_s, r) in the joint two-parameter
#     distribution; Delta chi^2 is read with two degrees of freedom (2.30 is
#     1 sigma, 6.18 is 2 sigma), so a model at the mean n_s exactly on a
#     published 95% limit on r has Delta chi^2 = 3.84: 1.45 sigma, inside_95.
#   r95, exceeds_r95: the set's one-dimensional 95% upper bound on r (the
#     published limit; mean + 1.96 sigma for r = mean +/- sigma; the 95%
#     quantile of r for a sample set) and whether the model's r is above it.
`

// significance prints, for the results compared with a constraint set,
// both readings side by side; nothing when there are none.
func significance(env *app.Env, results []study.Result) error {
	var rows [][]string
	for _, r := range results {
		if r.R95 == nil || r.ExceedsR95 == nil || r.NSigma == nil || r.Inside95 == nil {
			continue
		}
		rows = append(rows, []string{r.Label, r.Constraint, fmt.Sprintf("%.4g", r.R), fmt.Sprintf("%.4g", *r.R95),
			yesNo(*r.ExceedsR95), fmt.Sprintf("%.3g", *r.NSigma), yesNo(*r.Inside95)})
	}
	if len(rows) == 0 {
		return nil
	}
	w := env.Stdout
	fmt.Fprintf(w, "\n%s", SignificanceNote)
	return env.Table(w, []string{"result", "constraint", "r", "r95", "exceeds_r95", "n_sigma", "inside_95"}, rows)
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}
