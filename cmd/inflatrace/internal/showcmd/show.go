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
	"github.com/inflatrace/inflatrace/pipeline"
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
	Run         string         `json:"run"`
	Status      string         `json:"status"`
	Started     string         `json:"started"`
	Finished    string         `json:"finished,omitempty"`
	ToolVersion string         `json:"tool_version"`
	ConfigPath  string         `json:"config_path"`
	ConfigHash  string         `json:"config_hash"`
	Config      string         `json:"config"`
	Error       string         `json:"error,omitempty"`
	Nodes       []Node         `json:"nodes"`
	Results     []study.Result `json:"results"`
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
	l, err := o.Env.OpenLedger(o.Globals)
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
	out := Output{Run: string(id), Status: string(run.Status), Started: run.Started.UTC().Format(time.RFC3339Nano),
		ToolVersion: run.ToolVersion, ConfigPath: run.ConfigPath, ConfigHash: run.ConfigHash, Config: run.ConfigText,
		Error: run.Error, Results: results}
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
	return o.Env.Table(w, app.ResultHeader, app.ResultRows(results))
}
