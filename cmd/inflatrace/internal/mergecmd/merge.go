// Package mergecmd implements "inflatrace merge LEDGER...": shard ledgers
// merged into this one, idempotently, refusing conflicting outputs; then
// every complete set of shard runs of one study assembled into one run of
// the whole study, from the recorded nodes alone.
package mergecmd

import (
	"context"
	"fmt"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Options are the parsed arguments of merge.
type Options struct {
	Env        *app.Env
	Globals    *app.Globals
	From       []string
	NoAssemble bool
}

// NewCmd returns the merge command.
func NewCmd(env *app.Env, g *app.Globals) *cobra.Command {
	o := &Options{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "merge LEDGER...",
		Short: "Merge other ledgers (e.g. shards) into this one and assemble each complete set of shards into one run",
		Long: `merge copies every finished run of each LEDGER, with its nodes, results and
tags, into this ledger, in one transaction per ledger. It is idempotent and
refuses conflicting outputs for one key.

Then, unless --no-assemble, every complete set of shard runs of one study
("run CONFIG --shard I/N" for I = 1..N, the same configuration and this
version of inflatrace, all succeeded) is assembled into one run of the whole
study: its configuration, every result in the order a single run gives, and
links to the shard runs (shown by show, listed by runs). The assembly
computes nothing: every node must already be recorded, or it fails. table,
plot, export, diff and verify then work on the whole scan. Assembling is
idempotent too: a set already assembled is not assembled again.`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o.From = args
			return Run(c.Context(), o)
		},
	}
	cmd.Flags().BoolVar(&o.NoAssemble, "no-assemble", false, "merge only: do not assemble shard runs into runs of the whole study")
	return cmd
}

// Run merges the ledgers in order; each merge is one transaction. Then it
// assembles the complete shard sets.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	for _, p := range o.From {
		rep, err := l.Merge(ctx, p)
		if err != nil {
			l.Close()
			return &app.RunFailedError{Run: pipeline.RunID("merge"), Failed: 1, First: err}
		}
		fmt.Fprintf(o.Env.Stderr, "merged %s: %d run(s), %d node(s) new; %d run(s), %d node(s) already here\n",
			p, rep.Runs, rep.Nodes, rep.RunsKept, rep.NodesKept)
		if err := o.Env.VouchTrusted(ctx, l, rep.Written); err != nil {
			l.Close()
			return err
		}
	}
	if o.NoAssemble {
		return l.Close()
	}
	sets, notes, err := ShardSets(ctx, l)
	l.Close()
	if err != nil {
		return err
	}
	for _, n := range notes {
		fmt.Fprintf(o.Env.Stderr, "not assembled: %s\n", n)
	}
	for _, set := range sets {
		if err := assemble(ctx, o, set); err != nil {
			return err
		}
	}
	return nil
}

// shardPath matches the configuration path a shard run records.
var shardPath = regexp.MustCompile(`^(.*) \[shard ([0-9]+)/([0-9]+)\]$`)

// ShardSet is a complete set of shard runs of one study, in shard order.
type ShardSet struct {
	Base  string // the study's path, without the shard suffix
	Parts []pipeline.RunID
}

// ShardSets finds the complete sets of shard runs in the ledger that no
// run assembles yet. Incomplete, failed or other-version sets are
// described in notes instead.
func ShardSets(ctx context.Context, l *ledger.Ledger) ([]ShardSet, []string, error) {
	runs, err := l.Runs(ctx)
	if err != nil {
		return nil, nil, err
	}
	assembled, err := l.AllParts(ctx)
	if err != nil {
		return nil, nil, err
	}
	done := map[string]bool{}
	for _, parts := range assembled {
		done[joinIDs(parts)] = true
	}
	type group struct {
		base, tool string
		n          int
		byShard    map[int]ledger.RunSummary // the newest run of each shard
	}
	groups := map[string]*group{}
	var order []string
	for i := len(runs) - 1; i >= 0; i-- { // oldest first: the newest of a shard wins
		r := runs[i]
		m := shardPath.FindStringSubmatch(r.ConfigPath)
		if m == nil || r.Status == pipeline.RunRunning {
			continue
		}
		k, _ := strconv.Atoi(m[2])
		n, _ := strconv.Atoi(m[3])
		id := strings.Join([]string{m[1], r.ConfigHash, r.ToolVersion, m[3]}, "\x00")
		g, ok := groups[id]
		if !ok {
			g = &group{base: m[1], tool: r.ToolVersion, n: n, byShard: map[int]ledger.RunSummary{}}
			groups[id] = g
			order = append(order, id)
		}
		g.byShard[k] = r
	}
	var sets []ShardSet
	var notes []string
	for _, id := range order {
		g := groups[id]
		var parts []pipeline.RunID
		var missing, failed []string
		for k := 1; k <= g.n; k++ {
			r, ok := g.byShard[k]
			switch {
			case !ok:
				missing = append(missing, strconv.Itoa(k))
			case r.Status != pipeline.RunSucceeded:
				failed = append(failed, fmt.Sprintf("%d (%s)", k, r.ID))
			default:
				parts = append(parts, r.ID)
			}
		}
		what := fmt.Sprintf("%s in %d shards", g.base, g.n)
		switch {
		case len(missing) > 0:
			notes = append(notes, fmt.Sprintf("%s: shard(s) %s not in this ledger", what, strings.Join(missing, ", ")))
		case len(failed) > 0:
			notes = append(notes, fmt.Sprintf("%s: shard run(s) %s failed; re-run them, or run the study on this ledger (every recorded node is reused)", what, strings.Join(failed, ", ")))
		case g.tool != app.Version:
			notes = append(notes, fmt.Sprintf("%s: run by inflatrace %s, this is %s; assemble with that version", what, g.tool, app.Version))
		case done[joinIDs(parts)]:
			// already assembled
		default:
			sets = append(sets, ShardSet{Base: g.base, Parts: parts})
		}
	}
	sort.SliceStable(sets, func(i, j int) bool { return sets[i].Parts[0] < sets[j].Parts[0] })
	return sets, notes, nil
}

func joinIDs(ids []pipeline.RunID) string {
	s := make([]string, len(ids))
	for i, id := range ids {
		s[i] = string(id)
	}
	return strings.Join(s, ",")
}

// assemble records one run of the whole study from its shard runs'
// recorded nodes, computing nothing.
func assemble(ctx context.Context, o *Options, set ShardSet) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	first, err := l.Run(ctx, set.Parts[0])
	l.Close()
	if err != nil {
		return err
	}
	file := fmt.Sprintf("%s [assembled from %d shards]", set.Base, len(set.Parts))
	s, err := study.Parse(file, []byte(first.ConfigText), filepath.Dir(app.RecordedFile(set.Base)))
	if err != nil {
		return fmt.Errorf("assemble %s: the shards' configuration: %w", set.Base, err)
	}
	results := 0
	count := func(_ pipeline.RunID, rs []study.Result) error { results += len(rs); return nil }
	out, err := o.Env.ExecuteWith(ctx, o.Globals, s, app.ExecOptions{Emit: count, Parts: set.Parts, ReuseOnly: true})
	if err != nil {
		return fmt.Errorf("assemble %s from shard runs %s: %w", set.Base, joinIDs(set.Parts), err)
	}
	fmt.Fprintf(o.Env.Stderr, "assembled run %s: the whole study %s from its %d shard runs (%d results, nothing computed); tag it with: inflatrace tag %s NAME\n",
		out.Report.Run, set.Base, len(set.Parts), results, out.Report.Run)
	return nil
}
