package tables

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
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
// quoted, quotes doubled; a header of column names); numbers to 4
// significant digits in shortest form; missing values empty.
func TestCSVGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: CSV, Columns: goldenColumns})
	want := "model,params,history,N_star,n_s,r,alpha_s,energy_scale_GeV,T_reh_GeV,w_reh,below_bbn,constraint,delta_chi2,inside_68,error\r\n" +
		`alpha-attractor,"alpha=1, n=2",N*=55,55,0.9636,0.003967,-0.0006612,1.623e+16,,,,planck,0.1234,true,` + "\r\n" +
		`"odd_model & ""co"", {x}|y",lambda=1e-14,w=1/3 $x$ 50%,51.5,0.97,0.1,0,,1e+09,0.3333,false,set#1,,false,` + "\r\n" +
		`bad,mu=2,N*=60,,,,,,,,,planck,,,inflation never ends for phi > 12.3` + "\r\n"
	diff(t, "csv", got, want)
}

// TestCSVExactRoundTrip: with Exact, every number read back by an RFC
// 4180 reader (encoding/csv) parses to the identical float64.
func TestCSVExactRoundTrip(t *testing.T) {
	rows := fixture()
	cols := []string{"n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "H_star_GeV", "w_reh", "param.alpha"}
	recs, err := csv.NewReader(strings.NewReader(write(t, rows, Options{Format: CSV, Columns: cols, Exact: true}))).ReadAll()
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
	got := write(t, fixture(), Options{Format: JSON, Columns: goldenColumns})
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
// with Exact, decode to the identical float64 values.
func TestJSONExact(t *testing.T) {
	rows := fixture()
	out := write(t, rows, Options{Format: JSON, Columns: []string{"label", "params", "n_s", "r", "alpha_s", "w_reh", "inside_95"}, Exact: true})
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
// em dash for missing values.
func TestMarkdownGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: Markdown, Columns: goldenColumns})
	want := `| Model | Parameters | History | N* | n_s | r | alpha_s | V*^(1/4) [GeV] | T_reh [GeV] | w_reh | below BBN | Constraint | Delta chi^2 | in 68% | Error |
| :--- | :--- | :--- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | :---: | :--- | ---: | :---: | :--- |
| alpha-attractor | alpha=1, n=2 | N*=55 | 55.00 | 0.9636 | 0.003967 | -6.612e-4 | 1.623e+16 | — | — | — | planck | 0.1234 | yes |  |
| odd_model & "co", {x}\|y | lambda=1e-14 | w=1/3 $x$ 50% | 51.50 | 0.9700 | 0.1000 | 0.000 | — | 1.000e+9 | 0.3333 | no | set#1 | — | no |  |
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

// TestLaTeXGolden: a complete tabular: column spec l/r/c, \hline rules,
// math-mode headers with units and numbers, escaped text, --- for
// missing values.
func TestLaTeXGolden(t *testing.T) {
	got := write(t, fixture(), Options{Format: LaTeX, Columns: goldenColumns})
	want := `\begin{tabular}{lllrrrrrrrclrcl}
\hline
Model & Parameters & History & $N_*$ & $n_s$ & $r$ & $\alpha_s$ & $V_*^{1/4}$ [GeV] & $T_{\rm reh}$ [GeV] & $w_{\rm reh}$ & below BBN & Constraint & $\Delta\chi^2$ & in 68\% & Error \\
\hline
alpha-attractor & alpha=1, n=2 & N*=55 & $55.00$ & $0.9636$ & $0.003967$ & $-6.612\times10^{-4}$ & $1.623\times10^{16}$ & --- & --- & --- & planck & $0.1234$ & yes &  \\
odd\_model \& "co", \{x\}\textbar{}y & lambda=1e-14 & w=1/3 \$x\$ 50\% & $51.50$ & $0.9700$ & $0.1000$ & $0.000$ & --- & $1.000\times10^{9}$ & $0.3333$ & no & set\#1 & --- & no &  \\
bad & mu=2 & N*=60 & --- & --- & --- & --- & --- & --- & --- & --- & planck & --- & --- & inflation never ends for phi \textgreater{} 12.3 \\
\hline
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

// TestLaTeXStructure: for every column (all fixed ones and a parameter)
// and for rows whose text holds every special character, the output is
// one balanced tabular environment: \begin and \end once each, braces
// balanced and math mode closed in every line, and every row (header
// included) with as many cells as the column spec has letters, ended
// by \\.
func TestLaTeXStructure(t *testing.T) {
	rows := fixture()
	nasty := `\ & % $ # _ { } ~ ^ < > | \\ {{ }} $$`
	rows = append(rows, study.Result{Label: nasty + " | " + nasty + " | " + nasty, Model: nasty, Params: map[string]float64{"a_b": 1}, Method: nasty, Reheating: nasty, Constraint: nasty, Key: nasty, Error: nasty})
	cols := append(ColumnNames(), "param.alpha", "param.a_b")
	out := write(t, rows, Options{Format: LaTeX, Columns: cols})
	lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
	if strings.Count(out, `\begin{tabular}`) != 1 || strings.Count(out, `\end{tabular}`) != 1 {
		t.Fatalf("environment opened or closed more than once:\n%s", out)
	}
	first, last := lines[0], lines[len(lines)-1]
	spec, ok := strings.CutPrefix(first, `\begin{tabular}{`)
	spec, ok2 := strings.CutSuffix(spec, "}")
	if !ok || !ok2 || last != `\end{tabular}` {
		t.Fatalf("environment lines %q ... %q", first, last)
	}
	if strings.Trim(spec, "lrc") != "" || len(spec) != len(cols) {
		t.Fatalf("column spec %q for %d columns", spec, len(cols))
	}
	if lines[1] != `\hline` || lines[3] != `\hline` || lines[len(lines)-2] != `\hline` {
		t.Errorf("rules misplaced")
	}
	body := append([]string{lines[2]}, lines[4:len(lines)-2]...)
	if len(body) != len(rows)+1 {
		t.Fatalf("%d rows, want %d", len(body), len(rows)+1)
	}
	for i, line := range body {
		row, ok := strings.CutSuffix(line, ` \\`)
		if !ok {
			t.Errorf("row %d does not end with \\\\: %q", i, line)
		}
		cells, depth, dollars, ok := latexRow(row)
		if !ok || depth != 0 || dollars%2 != 0 || cells != len(spec) {
			t.Errorf("row %d: %d cells (want %d), brace depth %d, %d math switches: %q", i, cells, len(spec), depth, dollars, row)
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
	want = "\\begin{tabular}{rrr}\n\\hline\n$\\alpha$ & n\\_x & $n_s$ \\\\\n\\hline\n$0.123456789$ & --- & $0.963636$ \\\\\n\\hline\n\\end{tabular}\n"
	diff(t, "digits 6", got, want)
	got = write(t, rows, Options{Format: CSV})
	if !strings.HasPrefix(got, strings.Join(DefaultColumns, ",")+"\r\n") {
		t.Errorf("default columns: %q", got)
	}
}

// TestOptionErrors: unknown formats and columns, digits out of range and
// Digits with Exact are refused.
func TestOptionErrors(t *testing.T) {
	for _, c := range []struct {
		o   Options
		msg string
	}{
		{Options{Format: "xml"}, `unknown format "xml"`},
		{Options{Format: CSV, Columns: []string{"n_s", "nope"}}, `unknown column "nope"`},
		{Options{Format: CSV, Columns: []string{"param."}}, `unknown column "param."`},
		{Options{Format: CSV, Digits: 18}, "18 significant digits"},
		{Options{Format: CSV, Digits: -1}, "-1 significant digits"},
		{Options{Format: CSV, Digits: 3, Exact: true}, "not both"},
	} {
		err := Write(&bytes.Buffer{}, fixture(), c.o)
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%+v: error %v, want %q", c.o, err, c.msg)
		}
	}
}

// TestColumnNames: the documented list, in order, and every column
// writes in every format.
func TestColumnNames(t *testing.T) {
	want := "row label model_label model params method reheating history N_star phi_star phi_end n_s r alpha_s n_t energy_scale_GeV H_star_GeV T_reh_GeV T_max_GeV w_reh N_reh below_bbn N_star_min N_star_max n_s_min n_s_max r_min r_max constraint delta_chi2 n_sigma inside_68 inside_95 key error"
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
