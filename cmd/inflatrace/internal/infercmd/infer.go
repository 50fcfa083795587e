// Package infercmd implements "inflatrace infer": a study's [[inference]]
// tables evaluated as one recorded run (one node per inference and
// constraint set) and written as a table of evidences, Bayes factors
// against the reference model, credible intervals of the parameters, of
// N* and of the reheating temperature, the predictive range of r and the
// forecasts' detection odds.
package infercmd

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/infer"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Options are the parsed flags of infer.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Config  string
	Format  string
	Digits  int
	Jobs    int
}

// NewCmd returns the infer command; run, when not nil, replaces Run (for
// tests of the flags).
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	o := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "infer STUDY",
		Short: "Infer each [[inference]] of a study against its constraint sets: evidences, Bayes factors, intervals, predictive r, detection odds",
		Long: `infer evaluates the [[inference]] tables of a study: for each model family,
with a prior on each parameter (a value, {uniform = [lo, hi]} or
{log_uniform = [lo, hi]}) and on reheating (w_reh a value or
{uniform = [lo, hi]}; T_reh log-uniform between T_reh_min_GeV, the BBN
bound by default, and the point's instantaneous maximum), against each
Gaussian constraint set it names (every one by default). The integrals are
taken by a deterministic adaptive cubature to ln Z within "tolerance"
(0.01 by default), so a re-run gives the same bits; each inference is a
node of the ledger, reused when nothing it depends on changed.

The table has one row per inference and constraint set: ln Z with its
numerical error; ln B against the model marked reference = true, with its
grade on Jeffreys' scale; each free parameter's median and 68% credible
interval; N* and log10 T_reh/GeV (median, 68%); the 95% predictive range of
r; and for each [[forecast]] the probability of a 3 sigma detection of r.
JSON carries every recorded number with its error estimate.`,
		Args: func(_ *cobra.Command, args []string) error {
			if len(args) != 1 {
				return app.Usage(fmt.Errorf("give one STUDY file"))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Config = args[0]
			return run(cmd.Context(), o)
		},
	}
	cmd.Flags().StringVar(&o.Format, "format", "text", "output format: text, markdown, csv, json or latex")
	cmd.Flags().IntVar(&o.Digits, "digits", 3, "significant digits in text, markdown and latex")
	cmd.Flags().IntVarP(&o.Jobs, "jobs", "j", 0, "inferences evaluated at once (default: one per CPU)")
	return cmd
}

// Row is one inference against one constraint set.
type Row struct {
	Label      string             `json:"label"`
	Family     string             `json:"family"`
	Constraint string             `json:"constraint"`
	Reference  bool               `json:"reference,omitempty"`
	LnZ        float64            `json:"ln_Z"`
	LnZErr     float64            `json:"ln_Z_err"`
	LnB        *float64           `json:"ln_B,omitempty"`
	LnBErr     *float64           `json:"ln_B_err,omitempty"`
	Grade      string             `json:"grade,omitempty"`
	Free       []string           `json:"free_parameters"`
	Values     map[string]float64 `json:"values"`
}

// Run evaluates the study's inferences and writes the table.
func Run(ctx context.Context, o *Options) error {
	switch o.Format {
	case "text", "markdown", "csv", "json", "latex":
	default:
		return app.Usage(fmt.Errorf("--format %q: want text, markdown, csv, json or latex", o.Format))
	}
	if o.Digits < 1 || o.Digits > 17 {
		return app.Usage(fmt.Errorf("--digits %d: want 1 to 17", o.Digits))
	}
	if o.Jobs < 0 {
		return app.Usage(errors.New("--jobs must be at least 1"))
	}
	s, err := study.Load(o.Config)
	if err != nil {
		return app.Usage(err)
	}
	if len(s.Inferences) == 0 {
		return app.Usage(fmt.Errorf("%s: no [[inference]] table (see inflatrace infer --help)", o.Config))
	}
	graph, err := s.InferenceGraph()
	if err != nil {
		return app.Usage(fmt.Errorf("%s: %w", o.Config, err))
	}
	out, err := o.Env.ExecuteGraph(ctx, o.Globals, s, graph, o.Jobs)
	var failed *app.RunFailedError
	if err != nil && !errors.As(err, &failed) {
		return err
	}
	rows := Rows(s, out.Outputs)
	if werr := Write(o.Env.Stdout, o.Format, o.Digits, out.Run, rows); werr != nil {
		return werr
	}
	return err
}

// Rows pairs the study's inferences with their nodes' outputs (nil for a
// failed node, left out) and takes the Bayes factors against the
// reference model for each constraint set.
func Rows(s *study.Study, outputs []pipeline.Values) []Row {
	var rows []Row
	i := 0
	for _, inf := range s.Inferences {
		free := []string{}
		for _, p := range inf.Params {
			if p.Kind != infer.Fixed {
				free = append(free, p.Name)
			}
		}
		if inf.W.Kind != infer.Fixed {
			free = append(free, "w_reh")
		}
		for _, g := range inf.Constraints {
			vs := outputs[i]
			i++
			if vs == nil {
				continue
			}
			r := Row{Label: inf.Label, Family: inf.Family, Constraint: g.Name, Reference: inf.Reference, Free: free, Values: map[string]float64{}}
			for n, v := range vs {
				if v.Kind == pipeline.KindFloat {
					r.Values[n] = v.Float
				}
			}
			r.LnZ, r.LnZErr = r.Values["ln_Z"], r.Values["ln_Z_err"]
			rows = append(rows, r)
		}
	}
	for ci := range rows {
		for _, ref := range rows {
			if !ref.Reference || ref.Constraint != rows[ci].Constraint {
				continue
			}
			b := rows[ci].LnZ - ref.LnZ
			e := math.Hypot(rows[ci].LnZErr, ref.LnZErr)
			if rows[ci].Reference {
				b, e = 0, 0
			}
			rows[ci].LnB, rows[ci].LnBErr = &b, &e
			if !rows[ci].Reference {
				rows[ci].Grade = infer.Grade(b)
			}
		}
	}
	return rows
}

// column is one column of the table: its heading and its cell per row.
type column struct {
	head string
	cell func(r Row) string
}

// columns are the table's columns for rows.
func columns(rows []Row, digits int, latex bool) []column {
	f := func(x float64) string {
		if math.IsNaN(x) {
			return "-"
		}
		return strconv.FormatFloat(x, 'g', digits, 64)
	}
	iv := func(r Row, name string) string {
		med, ok := r.Values[name+":median"]
		if !ok {
			return "-"
		}
		return f(med) + " [" + f(r.Values[name+":lo68"]) + ", " + f(r.Values[name+":hi68"]) + "]"
	}
	cols := []column{
		{"model", func(r Row) string { return r.Label }},
		{"constraint", func(r Row) string { return r.Constraint }},
		{"ln Z", func(r Row) string { return f(r.LnZ) + " ± " + strconv.FormatFloat(r.LnZErr, 'g', 1, 64) }},
		{"ln B", func(r Row) string {
			if r.LnB == nil {
				return "-"
			}
			if r.Reference {
				return "0 (reference)"
			}
			return f(*r.LnB) + " (" + r.Grade + ")"
		}},
	}
	seen := map[string]bool{}
	for _, r := range rows {
		for _, p := range r.Free {
			if seen[p] {
				continue
			}
			seen[p] = true
			name := "param:" + p
			if p == "w_reh" {
				name = "w_reh"
			}
			cols = append(cols, column{p + " (68%)", func(r Row) string { return iv(r, name) }})
		}
	}
	cols = append(cols,
		column{"N* (68%)", func(r Row) string { return iv(r, "N_star") }},
		column{"log10 T_reh/GeV (68%)", func(r Row) string { return iv(r, "log10_T_reh_GeV") }},
		column{"r (95% range)", func(r Row) string {
			return "[" + f(r.Values["r:lo95"]) + ", " + f(r.Values["r:hi95"]) + "]"
		}},
	)
	var fcs []string
	for _, r := range rows {
		for n := range r.Values {
			if name, ok := strings.CutPrefix(n, "P_detect_3sigma:"); ok && !strings.HasSuffix(name, "_err") && !seen["fc:"+name] {
				seen["fc:"+name] = true
				fcs = append(fcs, name)
			}
		}
	}
	sort.Strings(fcs)
	for _, fc := range fcs {
		cols = append(cols, column{"P(3 sigma, " + fc + ")", func(r Row) string {
			p, ok := r.Values["P_detect_3sigma:"+fc]
			if !ok {
				return "-"
			}
			return f(p)
		}})
	}
	return cols
}

// Write writes the rows in format (text, markdown, csv, json or latex).
func Write(w io.Writer, format string, digits int, run pipeline.RunID, rows []Row) error {
	if format == "json" {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(struct {
			Run  pipeline.RunID `json:"run"`
			Rows []Row          `json:"rows"`
		}{run, rows})
	}
	if format == "csv" {
		// CSV keeps every number exact: one column per recorded value.
		names := map[string]bool{}
		for _, r := range rows {
			for n := range r.Values {
				names[n] = true
			}
		}
		keys := make([]string, 0, len(names))
		for n := range names {
			keys = append(keys, n)
		}
		sort.Strings(keys)
		cw := csv.NewWriter(w)
		if err := cw.Write(append([]string{"model", "family", "constraint", "reference", "ln_B", "grade"}, keys...)); err != nil {
			return err
		}
		for _, r := range rows {
			lnB := ""
			if r.LnB != nil {
				lnB = strconv.FormatFloat(*r.LnB, 'g', -1, 64)
			}
			rec := []string{r.Label, r.Family, r.Constraint, strconv.FormatBool(r.Reference), lnB, r.Grade}
			for _, k := range keys {
				if v, ok := r.Values[k]; ok {
					rec = append(rec, strconv.FormatFloat(v, 'g', -1, 64))
				} else {
					rec = append(rec, "")
				}
			}
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
		cw.Flush()
		return cw.Error()
	}
	cols := columns(rows, digits, format == "latex")
	cells := make([][]string, len(rows))
	for i, r := range rows {
		for _, c := range cols {
			cells[i] = append(cells[i], c.cell(r))
		}
	}
	switch format {
	case "markdown":
		var b strings.Builder
		b.WriteString("|")
		for _, c := range cols {
			b.WriteString(" " + c.head + " |")
		}
		b.WriteString("\n|")
		for range cols {
			b.WriteString(" --- |")
		}
		b.WriteString("\n")
		for _, row := range cells {
			b.WriteString("|")
			for _, c := range row {
				b.WriteString(" " + strings.ReplaceAll(c, "|", "\\|") + " |")
			}
			b.WriteString("\n")
		}
		_, err := io.WriteString(w, b.String())
		return err
	case "latex":
		var b strings.Builder
		b.WriteString("% inflatrace infer, run " + string(run) + "; needs \\usepackage{booktabs}\n")
		b.WriteString("\\begin{tabular}{" + strings.Repeat("l", len(cols)) + "}\n\\toprule\n")
		heads := make([]string, len(cols))
		for i, c := range cols {
			heads[i] = texText(c.head)
		}
		b.WriteString(strings.Join(heads, " & ") + " \\\\\n\\midrule\n")
		for _, row := range cells {
			out := make([]string, len(row))
			for i, c := range row {
				out[i] = texText(c)
			}
			b.WriteString(strings.Join(out, " & ") + " \\\\\n")
		}
		b.WriteString("\\bottomrule\n\\end{tabular}\n")
		_, err := io.WriteString(w, b.String())
		return err
	}
	// text: aligned columns.
	width := make([]int, len(cols))
	for i, c := range cols {
		width[i] = len([]rune(c.head))
		for _, row := range cells {
			width[i] = max(width[i], len([]rune(row[i])))
		}
	}
	line := func(vals []string) string {
		var b strings.Builder
		for i, v := range vals {
			if i > 0 {
				b.WriteString("  ")
			}
			b.WriteString(v + strings.Repeat(" ", width[i]-len([]rune(v))))
		}
		return strings.TrimRight(b.String(), " ") + "\n"
	}
	heads := make([]string, len(cols))
	for i, c := range cols {
		heads[i] = c.head
	}
	if _, err := io.WriteString(w, line(heads)); err != nil {
		return err
	}
	for _, row := range cells {
		if _, err := io.WriteString(w, line(row)); err != nil {
			return err
		}
	}
	return nil
}

// texText escapes a cell for LaTeX text mode.
func texText(s string) string {
	r := strings.NewReplacer("\\", "\\textbackslash{}", "&", "\\&", "%", "\\%", "$", "\\$", "#", "\\#", "_", "\\_", "{", "\\{", "}", "\\}", "~", "\\textasciitilde{}", "^", "\\textasciicircum{}", "±", "$\\pm$", "*", "$^*$")
	return r.Replace(s)
}
