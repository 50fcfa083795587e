// Package diffcmd implements "inflatrace diff RUN_A RUN_B": every
// assumption that differs between two runs, the change of each paired
// result, and its attribution to the differing configuration fields. The
// comparison itself is stages/study/revision's; this package loads the
// runs and writes the report.
package diffcmd

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/stages/study"
	"github.com/inflatrace/inflatrace/stages/study/revision"
)

// Formats diff writes: text (the default) and the table formats.
var Formats = append([]string{"text"}, tables.Formats...)

// Options are the parsed flags and arguments of diff.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	A, B    string
	JSON    bool   // --json: the same as --format json
	Format  string // text, csv, json, markdown, latex
	All     bool   // every pair, changed or not
	Digits  int
	// Quantities restricts the quantities written (empty: every one of
	// revision.Quantities).
	Quantities []string
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
fields, stage versions, the tool version, constraint data) and pairs their
results by what they are (model and its parameter values, reheating history,
method, end condition, constraint set), never by position. Results only one
run has are listed as added or removed.

For each pair it gives the change of N*, n_s, r, alpha_s, n_t, V*^1/4 [GeV],
H* [GeV], T_reh [GeV], Delta chi^2, n_sigma and the forecast significance,
decomposed into the contribution of each differing configuration field
(Shapley decomposition over the 2^k intermediate configurations, evaluated
through the cached DAG and never recorded) plus a remainder (what cannot be
re-evaluated, such as a changed stage version, and rounding). The main cause
of a change is the assumption with the largest contribution, with its share.
Beyond 8 differing fields, the fields of one table entry (model[2]) are
attributed together, then those of one section (model, reheating). Where an
intermediate configuration fails for a pair or lacks it, that pair gives its
total change and says which assumptions could not be separated.

Only changed results are written unless --all. --format markdown, latex or
csv writes one row per changed quantity (result, quantity, old, new, change,
main cause) for a reply to a referee; --format json (or --json) writes the
whole report.`,
		Args: cobra.ExactArgs(2),
		RunE: func(c *cobra.Command, args []string) error {
			opts.A, opts.B = args[0], args[1]
			if opts.JSON {
				if c.Flags().Changed("format") && opts.Format != tables.JSON {
					return app.Usage(fmt.Errorf("--json and --format %s disagree: give one", opts.Format))
				}
				opts.Format = tables.JSON
			}
			if !slices.Contains(Formats, opts.Format) {
				return app.Usage(fmt.Errorf("--format %q: want one of %s", opts.Format, strings.Join(Formats, ", ")))
			}
			for _, q := range opts.Quantities {
				if !slices.Contains(revision.Quantities, q) && !study.InferenceSummary(q) {
					return app.Usage(fmt.Errorf("--quantities: unknown quantity %q (want %s, or for inferences ln_Z, NAME:median, NAME:lo68...)", q, strings.Join(revision.Quantities, ", ")))
				}
			}
			if opts.Digits < 1 || opts.Digits > 17 {
				return app.Usage(fmt.Errorf("--digits %d: want 1 to 17", opts.Digits))
			}
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the whole report as JSON (the same as --format json)")
	cmd.Flags().StringVar(&opts.Format, "format", "text", "output: "+strings.Join(Formats, ", "))
	cmd.Flags().BoolVar(&opts.All, "all", false, "write every paired result, changed or not")
	cmd.Flags().StringSliceVar(&opts.Quantities, "quantities", nil, "write only these quantities (comma-separated: "+strings.Join(revision.Quantities, ", ")+")")
	cmd.Flags().IntVar(&opts.Digits, "digits", tables.DefaultDigits, "significant digits of the table formats")
	return cmd
}

func load(ctx context.Context, l *ledger.Ledger, ref string) (revision.Run, string, error) {
	d, rs, err := app.LoadRun(ctx, l, ref)
	if err != nil {
		return revision.Run{}, "", err
	}
	// A run of inferences: its results are the inferences' summaries.
	if rows, inference, err := infertable.Recorded(ctx, l, d.ID); err != nil {
		return revision.Run{}, "", err
	} else if inference {
		rs = rs[:0]
		for _, r := range rows {
			rs = append(rs, study.InferenceResult(r.Label, r.Family, r.Constraint, r.Values))
		}
	}
	ns, err := l.RunNodeHeads(ctx, d.ID)
	if err != nil {
		return revision.Run{}, "", err
	}
	recs := make([]revision.Node, len(ns))
	for i, n := range ns {
		recs[i] = revision.Node{Stage: n.Stage, Version: n.Version, Params: n.Params}
	}
	return revision.Run{ID: d.ID, ConfigText: d.ConfigText, ToolVersion: d.ToolVersion, Nodes: recs, Results: rs}, d.ConfigPath, nil
}

// Run compares the runs.
func Run(ctx context.Context, o *Options) error {
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	a, pathA, err := load(ctx, l, o.A)
	if err != nil {
		return err
	}
	b, _, err := load(ctx, l, o.B)
	if err != nil {
		return err
	}
	eval := revision.Evaluator(&revision.ReadThrough{L: l}, filepath.Dir(app.RecordedFile(pathA)), app.ToolIdentity, o.Env.CPUs, o.Env.Now)
	rep, err := revision.Compare(ctx, a, b, eval)
	if err != nil {
		return err
	}
	if len(o.Quantities) > 0 {
		for i, p := range rep.Pairs {
			kept := map[string]revision.Change{}
			for _, q := range o.Quantities {
				if c, ok := p.Changes[q]; ok {
					kept[q] = c
				}
			}
			rep.Pairs[i].Changes = kept
		}
	}
	unchanged := 0
	var shown []revision.Pair
	for _, p := range rep.Pairs {
		if p.Changed() || o.All {
			shown = append(shown, p)
		} else {
			unchanged++
		}
	}
	switch o.Format {
	case "text":
		return writeText(o.Env.Stdout, rep, shown, unchanged, o.All)
	case tables.JSON:
		out := *rep
		out.Pairs = shown
		return app.JSON(o.Env.Stdout, jsonReport{&out, unchanged})
	}
	return tables.WriteGrid(o.Env.Stdout, Grid(rep, shown), o.Format, o.Digits)
}

// jsonReport is diff's JSON: the report, with the number of unchanged
// pairs left out (0 under --all).
type jsonReport struct {
	*revision.Report
	UnchangedNotShown int `json:"unchanged_not_shown"`
}

func writeText(w io.Writer, rep *revision.Report, shown []revision.Pair, unchanged int, all bool) error {
	fmt.Fprintf(w, "A %s\nB %s\n\n# assumptions that differ (%d)\n", rep.A, rep.B, len(rep.Assumptions))
	var tags []string
	for i, x := range rep.Assumptions {
		mark := ""
		if x.Attributed {
			tags = append(tags, fmt.Sprintf("[%d]", i+1))
		} else {
			mark = " (not re-evaluable: in the remainder)"
		}
		fmt.Fprintf(w, "[%d] %s %s%s\n", i+1, x.Kind, x.What, mark)
	}
	if rep.Grouping != revision.ByField {
		fmt.Fprintf(w, "(more than %d fields differ: attributed by %s, each group as one assumption)\n", revision.MaxAttributed, rep.Grouping)
	}
	fmt.Fprintf(w, "\n# paired results (%d, %d changed); %d configurations evaluated\n", len(rep.Pairs), len(rep.Pairs)-unchanged-unchangedShown(shown), rep.Evaluated)
	for _, p := range shown {
		if p.LabelA == p.LabelB {
			fmt.Fprintf(w, "\nA#%d B#%d %s\n", p.RowA, p.RowB, p.LabelA)
		} else {
			fmt.Fprintf(w, "\nA#%d %s\n  -> B#%d %s\n", p.RowA, p.LabelA, p.RowB, p.LabelB)
		}
		if len(p.Unseparated) > 0 {
			fmt.Fprintf(w, "  (not separated: configurations %s failed or lack this result; total change only)\n", listSome(p.Unseparated, 4))
		}
		for _, q := range quantitiesOf(p.Changes) {
			c, ok := p.Changes[q]
			if !ok || c.Total == 0 && !all {
				continue
			}
			var parts []string
			for i, x := range c.Contributions {
				parts = append(parts, fmt.Sprintf("%s %+.4g", tags[i], x))
			}
			parts = append(parts, fmt.Sprintf("remainder %+.3g", c.Remainder))
			fmt.Fprintf(w, "  %-16s %.6g -> %.6g  (%+.4g = %s)%s\n", q, c.A, c.B, c.Total, strings.Join(parts, ", "), causeText(c))
		}
	}
	if unchanged > 0 {
		fmt.Fprintf(w, "\n%d paired results unchanged (--all lists them)\n", unchanged)
	}
	for _, u := range rep.Removed {
		fmt.Fprintf(w, "removed (A only) A#%d %s\n", u.Row, u.Label)
	}
	for _, u := range rep.Added {
		fmt.Fprintf(w, "added (B only) B#%d %s\n", u.Row, u.Label)
	}
	return nil
}

func unchangedShown(ps []revision.Pair) int {
	n := 0
	for _, p := range ps {
		if !p.Changed() {
			n++
		}
	}
	return n
}

func listSome(xs []string, n int) string {
	if len(xs) <= n {
		return strings.Join(xs, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(xs[:n], ", "), len(xs)-n)
}

func causeText(c revision.Change) string {
	if c.MainCause == "" {
		return ""
	}
	return "  main cause: " + cause(c)
}

// cause is "slow_roll.method (98%)".
func cause(c revision.Change) string {
	if c.Share == 0 {
		return c.MainCause
	}
	return fmt.Sprintf("%s (%.0f%%)", c.MainCause, 100*c.Share)
}

// quantityLaTeX are the table headers of the quantities.
var quantityLaTeX = map[string]string{
	"N_star":           `$N_*$`,
	"n_s":              `$n_s$`,
	"r":                `$r$`,
	"alpha_s":          `$\alpha_s$`,
	"n_t":              `$n_t$`,
	"energy_scale_GeV": `$V_*^{1/4}$ [GeV]`,
	"H_star_GeV":       `$H_*$ [GeV]`,
	"T_reh_GeV":        `$T_{\rm reh}$ [GeV]`,
	"delta_chi2":       `$\Delta\chi^2$`,
	"n_sigma":          `$n_\sigma$`,
	"detection_sigma":  `detection [$\sigma$]`,
	"N_star_min":       `$N_*$ min`,
	"N_star_max":       `$N_*$ max`,
	"n_s_min":          `$n_s$ min`,
	"n_s_max":          `$n_s$ max`,
	"r_min":            `$r$ min`,
	"r_max":            `$r$ max`,
}

// Grid is the comparison as a table: one row per changed quantity of each
// shown pair (every quantity of an unchanged pair shown under --all),
// labelled by run B's result.
func Grid(rep *revision.Report, shown []revision.Pair) tables.Grid {
	g := tables.Grid{Columns: []tables.GridColumn{
		{Name: "row_a", Plain: "A#", LaTeX: "A\\#", Numeric: true, Exact: true},
		{Name: "row_b", Plain: "B#", LaTeX: "B\\#", Numeric: true, Exact: true},
		{Name: "result", Plain: "result", LaTeX: "result"},
		{Name: "quantity", Plain: "quantity", LaTeX: "quantity"},
		{Name: "old", Plain: "old", LaTeX: "old", Numeric: true},
		{Name: "new", Plain: "new", LaTeX: "new", Numeric: true},
		{Name: "change", Plain: "change", LaTeX: "change", Numeric: true},
		{Name: "main_cause", Plain: "main cause", LaTeX: "main cause"},
	}}
	for _, p := range shown {
		// The new label: the assumptions list and row_a say what it was.
		label := p.LabelB
		for _, q := range quantitiesOf(p.Changes) {
			c, ok := p.Changes[q]
			if !ok || c.Total == 0 && p.Changed() {
				continue
			}
			qc := tables.Text(q)
			qc.LaTeX = quantityLaTeX[q]
			g.Rows = append(g.Rows, []tables.Cell{
				tables.Number(float64(p.RowA)), tables.Number(float64(p.RowB)),
				tables.Text(label), qc,
				tables.Number(c.A), tables.Number(c.B), tables.Number(c.Total),
				tables.Text(cause(c)),
			})
		}
	}
	return g
}

// quantitiesOf are a pair's changed quantities in the order diff writes
// them: the predictions' (revision.Quantities), then an inference's
// summaries by name.
func quantitiesOf(changes map[string]revision.Change) []string {
	var out, rest []string
	for _, q := range revision.Quantities {
		if _, ok := changes[q]; ok {
			out = append(out, q)
		}
	}
	for q := range changes {
		if !slices.Contains(revision.Quantities, q) {
			rest = append(rest, q)
		}
	}
	sort.Strings(rest)
	return append(out, rest...)
}
