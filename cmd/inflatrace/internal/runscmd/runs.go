// Package runscmd implements "inflatrace runs": the recorded runs, newest
// first, with their tags and the run each was derived from, optionally only the study runs or only the
// one-off predict runs.
package runscmd

import (
	"context"
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/predictcmd"
	"github.com/inflatrace/inflatrace/ledger"
)

// The kinds of run --kind selects.
const (
	KindAll     = "all"     // every run
	KindStudy   = "study"   // runs of a study configuration file (inflatrace run)
	KindPredict = "predict" // one-off runs of inflatrace predict
	KindShard   = "shard"   // runs of one shard of a study (run --shard I/N)
)

// Options are the parsed flags of runs.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	JSON    bool
	Kind    string // KindAll, KindStudy, KindShard or KindPredict
	// CloseStale closes, before listing, the runs left running that are
	// dead (ledger.CloseAbandoned: a free run lock, or without one a gone
	// process or no sign of life for StaleAfter).
	CloseStale bool
	StaleAfter time.Duration
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
	cmd.Flags().BoolVar(&opts.CloseStale, "close-stale", false, "first close as interrupted the runs left running that are dead: their run lock free, or, without a lock file, their process gone or no heartbeat for --stale-after")
	cmd.Flags().DurationVar(&opts.StaleAfter, "stale-after", ledger.StaleAfter, "how long a running run may go without a heartbeat (one every "+ledger.HeartbeatEvery.String()+") before --close-stale takes it for dead")
	cmd.Flags().StringVar(&opts.Kind, "kind", KindAll, "which runs to list: study (inflatrace run, and runs merge assembled from shards), shard (run --shard), predict (inflatrace predict) or all")
	return cmd
}

// Row is the JSON shape of one run.
type Row struct {
	Run         string   `json:"run"`
	Kind        string   `json:"kind"`
	Tags        []string `json:"tags"`
	Started     string   `json:"started"`
	Finished    string   `json:"finished,omitempty"`
	Status      string   `json:"status"`
	ToolVersion string   `json:"tool_version"`
	Config      string   `json:"config"`
	ConfigHash  string   `json:"config_hash"`
	Computed    int      `json:"computed"`
	Reused      int      `json:"reused"`
	Failed      int      `json:"failed"`
	Results     int      `json:"results"`
	// DerivedFrom is the run this one was re-run from (run --from RUN);
	// omitted for a run of a configuration given directly.
	DerivedFrom string `json:"derived_from,omitempty"`
	// AssembledFrom are the shard runs merge assembled into this run of
	// the whole study; omitted for other runs.
	AssembledFrom []string `json:"assembled_from,omitempty"`
}

// shardSuffix ends the configuration path a shard run records.
var shardSuffix = regexp.MustCompile(` \[shard [0-9]+/[0-9]+\]$`)

// KindOf tells a predict run from a study run by the configuration path
// the run recorded: predict records the configuration it writes under the
// name predictcmd.ConfigName ("predict flags"), which no file path given to
// inflatrace run takes unless a study file is named exactly that.
func KindOf(r ledger.RunSummary) string {
	if r.ConfigPath == predictcmd.ConfigName {
		return KindPredict
	}
	if shardSuffix.MatchString(r.ConfigPath) {
		return KindShard
	}
	return KindStudy
}

// Run lists the runs.
func Run(ctx context.Context, o *Options) error {
	switch o.Kind {
	case KindAll, KindStudy, KindShard, KindPredict:
	default:
		return app.Usage(fmt.Errorf("--kind %q: want %s, %s, %s or %s", o.Kind, KindStudy, KindShard, KindPredict, KindAll))
	}
	if o.CloseStale {
		if o.StaleAfter <= 0 {
			return app.Usage(fmt.Errorf("--stale-after %s: want a positive duration", o.StaleAfter))
		}
		l, err := o.Env.OpenLedger(o.Globals)
		if err != nil {
			return err
		}
		closed, err := l.CloseAbandoned(ctx, o.Env.Alive, o.StaleAfter)
		l.Close()
		if err != nil {
			return err
		}
		for _, c := range closed {
			fmt.Fprintf(o.Env.Stderr, "closed run %s as interrupted (its nodes stay and are reused)\n", c)
		}
	}
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	runs, err := l.Runs(ctx)
	if err != nil {
		return err
	}
	tags, err := l.AllTags(ctx)
	if err != nil {
		return err
	}
	derived, err := l.AllDerivedFrom(ctx)
	if err != nil {
		return err
	}
	parts, err := l.AllParts(ctx)
	if err != nil {
		return err
	}
	rows := []Row{}
	table := [][]string{}
	for _, r := range runs {
		kind := KindOf(r)
		if o.Kind != KindAll && o.Kind != kind {
			continue
		}
		fin := ""
		if !r.Finished.IsZero() {
			fin = r.Finished.UTC().Format(time.RFC3339)
		}
		t := tags[r.ID]
		if t == nil {
			t = []string{}
		}
		row := Row{Run: string(r.ID), Kind: kind, Tags: t, Started: r.Started.UTC().Format(time.RFC3339), Finished: fin,
			Status: string(r.Status), ToolVersion: r.ToolVersion, Config: r.ConfigPath, ConfigHash: r.ConfigHash,
			Computed: r.Computed, Reused: r.Reused, Failed: r.Failed, Results: r.Results,
			DerivedFrom: string(derived[r.ID])}
		from := row.DerivedFrom
		for _, p := range parts[r.ID] {
			row.AssembledFrom = append(row.AssembledFrom, string(p))
		}
		if n := len(row.AssembledFrom); n > 0 {
			from = fmt.Sprintf("%d shards", n)
		}
		rows = append(rows, row)
		table = append(table, []string{row.Run, row.Started, row.Status, strconv.Itoa(r.Computed),
			strconv.Itoa(r.Reused), strconv.Itoa(r.Failed), strconv.Itoa(r.Results), from, strings.Join(t, ","), r.ConfigPath})
	}
	if o.JSON {
		return app.JSON(o.Env.Stdout, rows)
	}
	return o.Env.Table(o.Env.Stdout, []string{"run", "started", "status", "computed", "reused", "failed", "results", "from", "tags", "config"}, table)
}
