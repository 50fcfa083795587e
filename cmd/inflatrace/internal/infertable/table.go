// Package infertable writes the table of a run of inferences (inflatrace
// infer, and table and export of such a run): one row per inference and
// constraint set, from the inference nodes' recorded outputs and the
// study's [[inference]] tables (labels and the reference model).
package infertable

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/infer"
	"github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/study"
)

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
		for _, set := range inf.SetNames() {
			vs := outputs[i]
			i++
			if vs == nil {
				continue
			}
			r := Row{Label: inf.Label, Family: inf.Family, Constraint: set, Reference: inf.Reference, Free: free, Values: map[string]float64{}}
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
			heads[i] = texHead(c.head)
		}
		b.WriteString(strings.Join(heads, " & ") + " \\\\\n\\midrule\n")
		for _, row := range cells {
			out := make([]string, len(row))
			for i, c := range row {
				out[i] = texCell(c)
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

// greek are the parameter names written as Greek letters in LaTeX.
var greek = map[string]bool{"alpha": true, "beta": true, "gamma": true, "delta": true, "lambda": true, "mu": true, "nu": true, "xi": true, "phi": true}

// texHead typesets a column heading: ln Z, ln B, the parameters, N_*,
// log10 T_reh, r and the detection probabilities as symbols.
func texHead(h string) string {
	sym := func(name string) string {
		switch {
		case greek[name]:
			return "$\\" + name + "$"
		case name == "w_reh":
			return "$w_{\\rm reh}$"
		}
		return "$" + texText(name) + "$"
	}
	switch {
	case h == "ln Z":
		return "$\\ln Z$"
	case h == "ln B":
		return "$\\ln B$"
	case h == "N* (68%)":
		return "$N_*$ (68\\,\\%)"
	case h == "log10 T_reh/GeV (68%)":
		return "$\\log_{10}(T_{\\rm reh}/\\mathrm{GeV})$ (68\\,\\%)"
	case h == "r (95% range)":
		return "$r$ (95\\,\\% range)"
	case strings.HasPrefix(h, "P(3 sigma, "):
		return "$P(3\\sigma)$, " + texText(strings.TrimSuffix(strings.TrimPrefix(h, "P(3 sigma, "), ")"))
	case strings.HasSuffix(h, " (68%)"):
		return sym(strings.TrimSuffix(h, " (68%)")) + " (68\\,\\%)"
	}
	return texText(h)
}

// texNumber matches a number written with an exponent (6.65e-05).
var texNumber = regexp.MustCompile(`(-?[0-9.]+)e([-+])0*([0-9]+)`)

// texCell escapes a cell and writes its exponents as powers of ten.
func texCell(c string) string {
	t := texText(c)
	return texNumber.ReplaceAllStringFunc(t, func(m string) string {
		p := texNumber.FindStringSubmatch(m)
		exp := p[3]
		if p[2] == "-" {
			exp = "-" + exp
		}
		return "$" + p[1] + "\\times10^{" + exp + "}$"
	})
}

// texText escapes a cell for LaTeX text mode.
func texText(s string) string {
	r := strings.NewReplacer("\\", "\\textbackslash{}", "&", "\\&", "%", "\\%", "$", "\\$", "#", "\\#", "_", "\\_", "{", "\\{", "}", "\\}", "~", "\\textasciitilde{}", "^", "\\textasciicircum{}", "±", "$\\pm$", "*", "$^*$")
	return r.Replace(s)
}

// Recorded reads the rows of a recorded run whose results are inference
// nodes, without recomputing anything: the nodes' outputs from the
// ledger, the labels and the reference model from the run's recorded
// configuration. ok is false for a run of predictions.
func Recorded(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) (rows []Row, ok bool, err error) {
	refs, err := l.RunResults(ctx, id)
	if err != nil {
		return nil, false, err
	}
	if len(refs) == 0 {
		return nil, false, nil
	}
	outputs := make([]pipeline.Values, 0, len(refs))
	for _, r := range refs {
		rec, found, err := l.Node(ctx, r.Key)
		if err != nil {
			return nil, false, err
		}
		if !found || rec.Stage != nodes.InferStage {
			return nil, false, nil
		}
		outputs = append(outputs, rec.Outputs)
	}
	run, err := l.Run(ctx, id)
	if err != nil {
		return nil, false, err
	}
	s, err := study.Parse(run.ConfigPath, []byte(run.ConfigText), filepath.Dir(run.ConfigPath))
	if err != nil {
		return nil, true, fmt.Errorf("run %s: its recorded configuration: %w", id, err)
	}
	if _, specs := s.InferenceSpecs(); len(specs) != len(outputs) {
		return nil, true, fmt.Errorf("run %s: %d inference results, its configuration states %d", id, len(outputs), len(specs))
	}
	return Rows(s, outputs), true, nil
}

// PDF is the recorded density of a quantity (nodes.PDF): its points and
// densities, ok when recorded.
func (r Row) PDF(name string) (xs, ys []float64, ok bool) {
	for i := 0; ; i++ {
		x, okx := r.Values[fmt.Sprintf("pdf:%s:x:%02d", name, i)]
		y, oky := r.Values[fmt.Sprintf("pdf:%s:y:%02d", name, i)]
		if !okx || !oky {
			return xs, ys, len(xs) > 2
		}
		xs, ys = append(xs, x), append(ys, y)
	}
}

// PDF2 is the recorded joint density of a quantity with log10 T_reh
// (pdf2:NAME:...): the quantity's values, the log10 T_reh values and the
// density z[i][j] at (x[i], y[j]).
func (r Row) PDF2(name string) (xs, ys []float64, z [][]float64, ok bool) {
	for i := 0; ; i++ {
		x, okx := r.Values[fmt.Sprintf("pdf2:%s:x:%02d", name, i)]
		if !okx {
			break
		}
		xs = append(xs, x)
	}
	for j := 0; ; j++ {
		y, oky := r.Values[fmt.Sprintf("pdf2:%s:y:%02d", name, j)]
		if !oky {
			break
		}
		ys = append(ys, y)
	}
	if len(xs) < 3 || len(ys) < 3 {
		return nil, nil, nil, false
	}
	z = make([][]float64, len(xs))
	for i := range xs {
		z[i] = make([]float64, len(ys))
		for j := range ys {
			v, okz := r.Values[fmt.Sprintf("pdf2:%s:z:%02d:%02d", name, i, j)]
			if !okz {
				return nil, nil, nil, false
			}
			z[i][j] = v
		}
	}
	return xs, ys, z, true
}
