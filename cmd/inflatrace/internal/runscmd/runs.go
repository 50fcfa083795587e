// Package runscmd implements "inflatrace runs": the recorded runs, newest
// first.
package runscmd

import (
	"context"
	"strconv"
	"time"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

// Options are the parsed flags of runs.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	JSON    bool
}

// NewCmd returns the runs command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "runs",
		Short: "List the runs recorded in the ledger, newest first",
		Args:  cobra.NoArgs,
		RunE:  func(c *cobra.Command, _ []string) error { return run(c.Context(), opts) },
	}
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the list as JSON")
	return cmd
}

// Row is the JSON shape of one run.
type Row struct {
	Run         string `json:"run"`
	Started     string `json:"started"`
	Finished    string `json:"finished,omitempty"`
	Status      string `json:"status"`
	ToolVersion string `json:"tool_version"`
	Config      string `json:"config"`
	ConfigHash  string `json:"config_hash"`
	Computed    int    `json:"computed"`
	Reused      int    `json:"reused"`
	Failed      int    `json:"failed"`
	Results     int    `json:"results"`
}

// Run lists the runs.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	runs, err := l.Runs(ctx)
	if err != nil {
		return err
	}
	rows := make([]Row, len(runs))
	table := make([][]string, len(runs))
	for i, r := range runs {
		fin := ""
		if !r.Finished.IsZero() {
			fin = r.Finished.UTC().Format(time.RFC3339)
		}
		rows[i] = Row{Run: string(r.ID), Started: r.Started.UTC().Format(time.RFC3339), Finished: fin,
			Status: string(r.Status), ToolVersion: r.ToolVersion, Config: r.ConfigPath, ConfigHash: r.ConfigHash,
			Computed: r.Computed, Reused: r.Reused, Failed: r.Failed, Results: r.Results}
		table[i] = []string{string(r.ID), rows[i].Started, string(r.Status), strconv.Itoa(r.Computed),
			strconv.Itoa(r.Reused), strconv.Itoa(r.Failed), strconv.Itoa(r.Results), r.ConfigPath}
	}
	if o.JSON {
		return app.JSON(o.Env.Stdout, rows)
	}
	return o.Env.Table(o.Env.Stdout, []string{"run", "started", "status", "computed", "reused", "failed", "results", "config"}, table)
}
