package tables

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/study"
)

// goldenColumns exercise every kind of column: text, parameters, numbers
// with and without values, flags, and errors.
var goldenColumns = []string{"model", "params", "history", "N_star", "n_s", "r", "alpha_s", "energy_scale_GeV", "T_reh_GeV", "w_reh", "below_bbn", "constraint", "delta_chi2", "inside_68", "error"}

func write(t *testing.T, rows []study.Result, o Options) string {
	t.Helper()
	var b bytes.Buffer
	if err := Write(&b, rows, o); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func diff(t *testing.T, format, got, want string) {
	t.Helper()
	if got == want {
		return
	}
	g, w := strings.Split(got, "\n"), strings.Split(want, "\n")
	for i := 0; i < len(g) || i < len(w); i++ {
		var a, b string
		if i < len(g) {
			a = g[i]
		}
		if i < len(w) {
			b = w[i]
		}
		if a != b {
			t.Errorf("%s line %d:\n got  %q\n want %q", format, i+1, a, b)
		}
	}
}

// TestCSVGolden: RFC 4180 (CRLF record ends; fields with commas or quotes
// quoted, quotes doubled; a header of column names); numbers, with
// Digits 4, to 4 significant digits in shortest form; missing values
// empty; the long layout keeps a row per result.
func TestCSVGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: CSV, Layout: Long, Columns: goldenColumns, Digits: 4})
	want := "model,params,history,N_star,n_s,r,alpha_s,energy_scale_GeV,T_reh_GeV,w_reh,below_bbn,constraint,delta_chi2,inside_68,error\r\n" +
		`alpha-attractor,"alpha=1, n=2",N*=55,55,0.9636,0.003967,-0.0006612,1.623e+16,,,,planck,0.1234,true,` + "\r\n" +
		`"odd_model & ""co"", {x}|y",lambda=1e-14,w=1/3 $x$ 50%,51.5,0.97,0.1,0,,1e+09,0.3333,false,set#1,,false,` + "\r\n" +
		`bad,mu=2,N*=60,,,,,,,,,planck,,,inflation never ends for phi > 12.3` + "\r\n"
	diff(t, "csv", got, want)
}

// TestCSVExactRoundTrip: by default (no Digits), every number read back
// by an RFC 4180 reader (encoding/csv) parses to the identical float64.
func TestCSVExactRoundTrip(t *testing.T) {
	rows := fixture()
	cols := []string{"n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "H_star_GeV", "w_reh", "param.alpha"}
	recs, err := csv.NewReader(strings.NewReader(write(t, rows, Options{Format: CSV, Layout: Long, Columns: cols}))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(rows)+1 {
		t.Fatalf("%d records, want %d", len(recs), len(rows)+1)
	}
	r := rows[0]
	want := []float64{r.Ns, r.R, r.AlphaS, r.Nt, *r.EnergyScaleGeV, *r.HStarGeV}
	for i, w := range want {
		if x, err := strconv.ParseFloat(recs[1][i], 64); err != nil || x != w {
			t.Errorf("%s = %q, want exactly %v", cols[i], recs[1][i], w)
		}
	}
	if x, _ := strconv.ParseFloat(recs[2][6], 64); x != 1.0/3 {
		t.Errorf("w_reh = %q, want exactly 1/3", recs[2][6])
	}
	if recs[1][7] != "1" || recs[2][7] != "" {
		t.Errorf("param.alpha cells %q, %q", recs[1][7], recs[2][7])
	}
}

// TestJSONGolden: one object per row in column order; numbers, booleans,
// null for missing; strings escaped as JSON requires and no more.
func TestJSONGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: JSON, Layout: Long, Columns: goldenColumns, Digits: 4})
	want := `[
  {"model": "alpha-attractor", "params": {"alpha": 1, "n": 2}, "history": "N*=55", "N_star": 55, "n_s": 0.9636, "r": 0.003967, "alpha_s": -0.0006612, "energy_scale_GeV": 1.623e+16, "T_reh_GeV": null, "w_reh": null, "below_bbn": null, "constraint": "planck", "delta_chi2": 0.1234, "inside_68": true, "error": ""},
  {"model": "odd_model & \"co\", {x}|y", "params": {"lambda": 1e-14}, "history": "w=1/3 $x$ 50%", "N_star": 51.5, "n_s": 0.97, "r": 0.1, "alpha_s": 0, "energy_scale_GeV": null, "T_reh_GeV": 1e+09, "w_reh": 0.3333, "below_bbn": false, "constraint": "set#1", "delta_chi2": null, "inside_68": false, "error": ""},
  {"model": "bad", "params": {"mu": 2}, "history": "N*=60", "N_star": null, "n_s": null, "r": null, "alpha_s": null, "energy_scale_GeV": null, "T_reh_GeV": null, "w_reh": null, "below_bbn": null, "constraint": "planck", "delta_chi2": null, "inside_68": null, "error": "inflation never ends for phi > 12.3"}
]
`
	diff(t, "json", got, want)
	if got := write(t, nil, Options{Format: JSON}); got != "[]\n" {
		t.Errorf("no rows: %q", got)
	}
}

// TestJSONExact: the output is valid JSON (encoding/json) whose numbers,
// by default (no Digits), decode to the identical float64 values.
func TestJSONExact(t *testing.T) {
	rows := fixture()
	out := write(t, rows, Options{Format: JSON, Layout: Long, Columns: []string{"label", "params", "n_s", "r", "alpha_s", "w_reh", "inside_95"}})
	var back []map[string]any
	if err := json.Unmarshal([]byte(out), &back); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, out)
	}
	if len(back) != len(rows) {
		t.Fatalf("%d objects", len(back))
	}
	if back[0]["n_s"] != rows[0].Ns || back[0]["r"] != rows[0].R || back[0]["alpha_s"] != rows[0].AlphaS || back[1]["w_reh"] != 1.0/3 {
		t.Errorf("numbers changed: %v", back[:2])
	}
	if back[0]["label"] != rows[0].Label || back[1]["params"].(map[string]any)["lambda"] != 1e-14 || back[2]["inside_95"] != nil {
		t.Errorf("values changed: %v", back)
	}
}

// TestMarkdownGolden: header with units, alignment row, escaped pipes,
// em dash for missing values; one notation per column (alpha_s and
// T_reh scientific throughout, since one of their values is).
func TestMarkdownGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: Markdown, Layout: Long, Columns: goldenColumns})
	want := `| Model | Parameters | History | N* | n_s | r | alpha_s | V*^(1/4) [GeV] | T_reh [GeV] | w_reh | below BBN | Constraint | Delta chi^2 | in 68% | Error |
| :--- | :--- | :--- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | :---: | :--- | ---: | :---: | :--- |
| alpha-attractor | alpha=1, n=2 | N*=55 | 55.00 | 0.9636 | 0.003967 | -6.612e-4 | 1.623e+16 | — | — | — | planck | 0.1234 | yes |  |
| odd_model & "co", {x}\|y | lambda=1e-14 | w=1/3 $x$ 50% | 51.50 | 0.9700 | 0.1000 | 0.000e+0 | — | 1.000e+9 | 0.3333 | no | set#1 | — | no |  |
| bad | mu=2 | N*=60 | — | — | — | — | — | — | — | — | planck | — | — | inflation never ends for phi > 12.3 |
`
	diff(t, "markdown", got, want)
	// Every line has columns+1 unescaped pipes (GFM: a row is cells
	// between pipes).
	for i, line := range strings.Split(strings.TrimSuffix(got, "\n"), "\n") {
		n := 0
		for k := 0; k < len(line); k++ {
			if line[k] == '\\' {
				k++
				continue
			}
			if line[k] == '|' {
				n++
			}
		}
		if n != len(goldenColumns)+1 {
			t.Errorf("line %d has %d cell separators, want %d", i+1, n, len(goldenColumns)+1)
		}
	}
}

// TestLaTeXGolden: the wide layout in booktabs form (booktabs manual,
// Fear 2020: \toprule, \midrule, \bottomrule, \cmidrule under a group's
// \multicolumn header, no vertical rules); computed numbers in siunitx S
// columns (siunitx manual, Wright 2023: table-format reserving sign,
// integer, decimal and exponent digits; text and headers braced); one
// notation per column; parameters in math mode with Greek names; text
// escaped; --- for missing values.
func TestLaTeXGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: LaTeX, Columns: goldenColumns})
	want := `\begin{tabular}{lllS[table-format=2.2,group-digits=none]S[table-format=1.4,group-digits=none]S[table-format=1.6,group-digits=none]S[table-format=-1.3e-1,group-digits=none]S[table-format=1.3e2,group-digits=none]S[table-format=1.3e1,group-digits=none]S[table-format=1.4,group-digits=none]clS[table-format=1.4,group-digits=none]cc}
\toprule
 &  &  &  &  &  &  &  &  &  &  &  & \multicolumn{2}{c}{planck} & \multicolumn{1}{c}{set\#1} \\
\cmidrule(lr){13-14} \cmidrule(lr){15-15}
Model & Parameters & History & {$N_*$} & {$n_s$} & {$r$} & {$\alpha_s$} & {$V_*^{1/4}$ [GeV]} & {$T_{\rm reh}$ [GeV]} & {$w_{\rm reh}$} & below BBN & Error & {$\Delta\chi^2$} & in 68\% & in 68\% \\
\midrule
alpha-attractor & $\alpha=1$, $n=2$ & N*=55 & 55.00 & 0.9636 & 0.003967 & -6.612e-4 & 1.623e16 & {---} & {---} & --- &  & 0.1234 & yes & --- \\
odd\_model \& "co", \{x\}\textbar{}y & $\lambda=1\times10^{-14}$ & w=1/3 \$x\$ 50\% & 51.50 & 0.9700 & 0.1000 & 0.000e0 & {---} & 1.000e9 & 0.3333 & no &  & {---} & --- & no \\
bad & $\mu=2$ & N*=60 & {---} & {---} & {---} & {---} & {---} & {---} & {---} & --- & inflation never ends for phi \textgreater{} 12.3 & {---} & --- & --- \\
\bottomrule
\end{tabular}
`
	diff(t, "latex", got, want)
}

// latexRow scans one table row, skipping escapes (a backslash and the
// control word or symbol after it), and counts cell separators, brace
// depth and math-mode switches outside escapes.
func latexRow(line string) (cells, depth, dollars int, ok bool) {
	cells = 1
	for k := 0; k < len(line); k++ {
		switch c := line[k]; c {
		case '\\':
			k++
			for k+1 < len(line) && isLetter(line[k]) && isLetter(line[k+1]) {
				k++
			}
		case '&':
			cells++
		case '{':
			depth++
		case '}':
			depth--
			if depth < 0 {
				return cells, depth, dollars, false
			}
		case '$':
			dollars++
		}
	}
	return cells, depth, dollars, true
}

func isLetter(c byte) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' }

// specColumns splits a tabular column spec into its columns: letters,
// each optionally followed by a bracketed option list (S[...]).
func specColumns(spec string) ([]string, bool) {
	var out []string
	for len(spec) > 0 {
		c := spec[:1]
		spec = spec[1:]
		if !strings.Contains("lrcS", c) {
			return out, false
		}
		if strings.HasPrefix(spec, "[") {
			end := strings.IndexByte(spec, ']')
			if end < 0 {
				return out, false
			}
			c, spec = c+spec[:end+1], spec[end+1:]
		}
		out = append(out, c)
	}
	return out, true
}

// spans counts the columns a row's cells take: one each, \multicolumn{k}
// k.
func spans(row string) int {
	n := 0
	for _, cell := range strings.Split(row, " & ") {
		k := 1
		if rest, ok := strings.CutPrefix(strings.TrimSpace(cell), `\multicolumn{`); ok {
			k, _ = strconv.Atoi(rest[:strings.IndexByte(rest, '}')])
		}
		n += k
	}
	return n
}

// TestLaTeXStructure: for every column (all fixed ones and a parameter)
// and for rows whose text holds every special character, in both
// layouts, the output is one balanced tabular environment: \begin and
// \end once each, booktabs rules in their places, braces balanced and
// math mode closed in every line, and every row (the group header and
// column header included) spanning as many columns as the spec has,
// ended by \\.
func TestLaTeXStructure(t *testing.T) {
	rows := fixture()
	nasty := `\ & % $ # _ { } ~ ^ < > | \\ {{ }} $$`
	rows = append(rows, study.Result{Label: nasty + " | " + nasty + " | " + nasty, Model: nasty, Params: map[string]float64{"a_b": 1}, Method: nasty, Reheating: nasty, Constraint: nasty, Key: nasty, Error: nasty})
	cols := append(ColumnNames(), "param.alpha", "param.a_b")
	for _, layout := range Layouts {
		out := write(t, rows, Options{Format: LaTeX, Layout: layout, Columns: cols})
		lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
		if strings.Count(out, `\begin{tabular}`) != 1 || strings.Count(out, `\end{tabular}`) != 1 {
			t.Fatalf("%s: environment opened or closed more than once:\n%s", layout, out)
		}
		first, last := lines[0], lines[len(lines)-1]
		spec, ok := strings.CutPrefix(first, `\begin{tabular}{`)
		spec, ok2 := strings.CutSuffix(spec, "}")
		specCols, ok3 := specColumns(spec)
		if !ok || !ok2 || !ok3 || last != `\end{tabular}` {
			t.Fatalf("%s: environment lines %q ... %q", layout, first, last)
		}
		if lines[1] != `\toprule` || lines[len(lines)-2] != `\bottomrule` {
			t.Errorf("%s: top or bottom rule misplaced", layout)
		}
		var body []string
		for _, line := range lines[2 : len(lines)-2] {
			if line == `\midrule` || strings.HasPrefix(line, `\cmidrule`) {
				continue
			}
			body = append(body, line)
		}
		heads := 1
		if layout == Wide {
			heads = 2
		}
		if len(body) != len(rows)+heads {
			t.Fatalf("%s: %d rows, want %d", layout, len(body), len(rows)+heads)
		}
		for i, line := range body {
			row, ok := strings.CutSuffix(line, ` \\`)
			if !ok {
				t.Errorf("%s: row %d does not end with \\\\: %q", layout, i, line)
			}
			cells, depth, dollars, ok := latexRow(row)
			if strings.Contains(row, `\multicolumn`) {
				cells = spans(row)
			}
			if !ok || depth != 0 || dollars%2 != 0 || cells != len(specCols) {
				t.Errorf("%s: row %d: %d columns (want %d), brace depth %d, %d math switches: %q", layout, i, cells, len(specCols), depth, dollars, row)
			}
		}
	}
}

// TestDigitsAndColumns: the digit option applies to computed numbers and
// not to parameters; param.NAME columns; headers of parameters with Greek
// names in LaTeX.
func TestDigitsAndColumns(t *testing.T) {
	rows := fixture()[:1]
	rows[0].Params["alpha"] = 0.123456789
	got := write(t, rows, Options{Format: Markdown, Columns: []string{"n_s", "param.alpha", "param.n"}, Digits: 2})
	want := "| n_s | alpha | n |\n| ---: | ---: | ---: |\n| 0.96 | 0.123456789 | 2 |\n"
	diff(t, "digits 2", got, want)
	got = write(t, rows, Options{Format: LaTeX, Columns: []string{"param.alpha", "param.n_x", "n_s"}, Digits: 6})
	want = "\\begin{tabular}{rrS[table-format=1.6,group-digits=none]}\n\\toprule\n$\\alpha$ & n\\_x & {$n_s$} \\\\\n\\midrule\n$0.123456789$ & --- & 0.963636 \\\\\n\\bottomrule\n\\end{tabular}\n"
	diff(t, "digits 6", got, want)
	got = write(t, rows, Options{Format: CSV, Layout: Long})
	// Default columns of the comparison that no result has are left out
	// (detection_sigma: the fixture has no forecast).
	if !strings.HasPrefix(got, strings.Join(DefaultColumns[:len(DefaultColumns)-1], ",")+"\r\n") {
		t.Errorf("default columns: %q", got)
	}
}

// TestOptionErrors: unknown formats, layouts and columns, digits out of
// range, Digits with Exact, LaTeX options in another format and a label
// key with special characters are refused with an *OptionError naming
// the option.
func TestOptionErrors(t *testing.T) {
	for _, c := range []struct {
		o      Options
		option string
		msg    string
	}{
		{Options{Format: "xml"}, "--format", `unknown format`},
		{Options{Format: CSV, Layout: "tall"}, "--layout", `unknown layout`},
		{Options{Format: CSV, Columns: []string{"n_s", "nope"}}, "--columns", `unknown column "nope"`},
		{Options{Format: CSV, Columns: []string{"param."}}, "--columns", `unknown column "param."`},
		{Options{Format: CSV, Digits: 18}, "--digits", "1 to 17"},
		{Options{Format: CSV, Digits: -1}, "--digits", "1 to 17"},
		{Options{Format: CSV, Digits: 3, Exact: true}, "--digits", "not both"},
		{Options{Format: Markdown, LongTable: true}, "--longtable", "LaTeX's only"},
		{Options{Format: CSV, Caption: "x"}, "--caption", "LaTeX's only"},
		{Options{Format: JSON, Label: "tab:x"}, "--label", "LaTeX's only"},
		{Options{Format: LaTeX, Label: `tab:{x}`}, "--label", "may not hold"},
	} {
		err := Write(&bytes.Buffer{}, fixture(), c.o)
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Option != c.option || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%+v: error %v, want an OptionError of %s saying %q", c.o, err, c.option, c.msg)
		}
	}
}

// TestColumnNames: the documented list, in order, and every column
// writes in every format.
func TestColumnNames(t *testing.T) {
	want := "row label model_label model params method reheating history N_star phi_star phi_end n_s r alpha_s n_t energy_scale_GeV H_star_GeV T_reh_GeV T_max_GeV w_reh N_reh below_bbn N_star_min N_star_max n_s_min n_s_max r_min r_max constraint delta_chi2 n_sigma inside_68 inside_95 detection_sigma detected_5sigma key error"
	if got := strings.Join(ColumnNames(), " "); got != want {
		t.Errorf("ColumnNames:\n got  %s\n want %s", got, want)
	}
	rows := fixture()
	rows[0].Band = &study.Band{NStar: [2]float64{50, 60}, Ns: [2]float64{0.96, 0.967}, R: [2]float64{0.003, 0.0048}}
	for _, f := range Formats {
		out := write(t, rows, Options{Format: f, Columns: ColumnNames()})
		if !strings.Contains(out, "0.003") || (f != JSON && f != CSV && !strings.Contains(out, "50.00")) {
			t.Errorf("%s: band values missing", f)
		}
	}
}
