package tables

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/study"
)

// siunitxNumber is the input siunitx reads as a number in an S column
// (siunitx manual, Wright 2023, "Parsing numbers": an optional sign,
// digits with an optional decimal marker and fraction, an optional
// exponent marker e with an optional sign and digits).
var siunitxNumber = regexp.MustCompile(`^(-?)([0-9]+)(?:\.([0-9]+))?(?:e(-?)([0-9]+))?$`)

// tableFormatRe reads a table-format of the form tableFormat writes.
var tableFormatRe = regexp.MustCompile(`^S\[table-format=(-?)([0-9]+)\.([0-9]+)(?:e(-?)([0-9]+))?,group-digits=none\]$`)

// spread makes rows whose numbers span many decades, in both signs, with
// zeros and missing values: the case that mixed notations in one column
// before (alpha_s from -9.218e-4 to -1.098e-3).
func spread() []study.Result {
	var rows []study.Result
	for i, x := range []float64{-9.218e-4, -1.098e-3, 0, 3.3e-7, 2.5e13, 0.9649, 55, -1, 123456} {
		e, d := x*1e3, float64(i)*1.5
		rows = append(rows, study.Result{
			Label: "m(p=" + strconv.Itoa(i) + ") | N*=55 | s", Model: "m", Params: map[string]float64{"p": float64(i)},
			NStar: 50 + float64(i), Ns: 0.96 + x*1e-9, R: math.Abs(x), AlphaS: x, Nt: -x, EnergyScaleGeV: &e, Constraint: "s", DeltaChi2: &d,
		})
	}
	rows = append(rows, study.Result{Label: "bad(p=9) | N*=55 | s", Model: "bad", Params: map[string]float64{"p": 9}, Error: "no end", Constraint: "s"})
	return rows
}

// texBody splits a tabular's output into its column spec and body rows'
// cells.
func texBody(t *testing.T, out string) (specs []string, rows [][]string) {
	t.Helper()
	lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
	spec, _ := strings.CutPrefix(lines[0], `\begin{tabular}{`)
	specs, ok := specColumns(strings.TrimSuffix(spec, "}"))
	if !ok {
		t.Fatalf("spec %q", lines[0])
	}
	mid := 0
	for i, l := range lines {
		if l == `\midrule` {
			mid = i
		}
	}
	for _, l := range lines[mid+1 : len(lines)-2] {
		rows = append(rows, strings.Split(strings.TrimSuffix(l, ` \\`), " & "))
	}
	return specs, rows
}

// TestLaTeXOneNotationPerColumn: in every S column, every number cell is
// siunitx input, all cells of the column use one notation (all with an
// exponent or none), and every number fits the column's table-format (no
// more integer digits, decimals or exponent digits than reserved, a sign
// only where one is reserved); every other cell of an S column is braced
// text. For several digit settings and exact numbers, in both layouts.
func TestLaTeXOneNotationPerColumn(t *testing.T) {
	for _, o := range []Options{{Digits: 1}, {Digits: 4}, {Digits: 8}, {Exact: true}, {Layout: Long}} {
		o.Format = LaTeX
		o.Columns = []string{"model", "param.p", "N_star", "n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "delta_chi2"}
		specs, rows := texBody(t, write(t, spread(), o))
		sCols := 0
		for i, spec := range specs {
			f := tableFormatRe.FindStringSubmatch(spec)
			if f == nil {
				if strings.HasPrefix(spec, "S") {
					t.Errorf("%+v: column %d spec %q unreadable", o, i, spec)
				}
				continue
			}
			sCols++
			intDigits, _ := strconv.Atoi(f[2])
			decimals, _ := strconv.Atoi(f[3])
			expDigits, _ := strconv.Atoi(f[5])
			sci := map[bool]int{}
			for k, row := range rows {
				cell := row[i]
				if strings.HasPrefix(cell, "{") && strings.HasSuffix(cell, "}") {
					continue
				}
				m := siunitxNumber.FindStringSubmatch(cell)
				if m == nil {
					t.Errorf("%+v: row %d column %d: %q is not siunitx input", o, k, i, cell)
					continue
				}
				sci[m[5] != ""]++
				if (m[1] == "-" && f[1] == "") || len(m[2]) > intDigits || len(m[3]) > decimals ||
					len(m[5]) > expDigits || (m[4] == "-" && f[4] == "") || (m[5] != "" && f[5] == "") {
					t.Errorf("%+v: row %d column %d: %q does not fit %s", o, k, i, cell, spec)
				}
			}
			if len(sci) > 1 {
				t.Errorf("%+v: column %d (%s) mixes notations: %v", o, i, spec, sci)
			}
		}
		if sCols != 7 {
			t.Errorf("%+v: %d S columns, want 7 (N_star, n_s, r, alpha_s, n_t, energy scale, Delta chi^2)", o, sCols)
		}
	}
}

// TestMarkdownOneNotationPerColumn: the same rule in Markdown: a column
// of computed numbers is all positional or all scientific.
func TestMarkdownOneNotationPerColumn(t *testing.T) {
	out := write(t, spread(), Options{Format: Markdown, Columns: []string{"alpha_s", "n_s", "energy_scale_GeV"}})
	lines := strings.Split(strings.TrimSpace(out), "\n")[2:]
	for c := 0; c < 3; c++ {
		kinds := map[bool]int{}
		for _, l := range lines {
			cell := strings.TrimSpace(strings.Split(strings.Trim(l, "|"), "|")[c])
			if cell != "—" {
				kinds[strings.Contains(cell, "e")]++
			}
		}
		if len(kinds) != 1 {
			t.Errorf("column %d mixes notations: %v\n%s", c, kinds, out)
		}
	}
	if !strings.Contains(out, "| -9.218e-4 |") || !strings.Contains(out, "| -1.098e-3 |") {
		t.Errorf("alpha_s not scientific throughout:\n%s", out)
	}
}

// TestLongTable: a longtable with its caption and label first, the head
// (booktabs rules and column headers) written for the first page and
// repeated for the others (longtable manual, Carlisle 2021: \endfirsthead,
// \endhead, \endfoot, \endlastfoot), a continuation line in the foot, a
// bottom rule at the end only, and every row of the body.
func TestLongTable(t *testing.T) {
	rows := compared()
	out := write(t, rows, Options{Format: LaTeX, LongTable: true, Caption: `Predictions at $N_*=50, 60$`, Label: "tab:orrery"})
	for _, want := range []string{"\\begin{longtable}{", "\\caption{Predictions at $N_*=50, 60$}\\label{tab:orrery} \\\\\n\\toprule\n",
		"\\endfirsthead\n\\multicolumn{", "\\endhead\n", "(continued on the next page)", "\\endfoot\n\\bottomrule\n\\endlastfoot\n", "\\end{longtable}\n"} {
		if strings.Count(out, want) != 1 {
			t.Errorf("longtable: %q %d times, want once:\n%s", want, strings.Count(out, want), out)
		}
	}
	if strings.Count(out, `\toprule`) != 2 || strings.Count(out, `Model & Parameters`) != 2 || strings.Contains(out, `\begin{table}`) {
		t.Errorf("head not repeated once, or a float around a longtable:\n%s", out)
	}
	body := strings.Split(out[strings.Index(out, "\\endlastfoot\n")+len("\\endlastfoot\n"):], "\n")
	if len(body) != len(rows)/3+2 { // rows, \end{longtable}, ""
		t.Errorf("%d body lines for %d predictions", len(body)-2, len(rows)/3)
	}
}

// TestCaptionFloat: a caption or label sets the tabular in a table float,
// caption above it (common practice in the field's journals); without
// either the tabular stands alone, to \input inside the author's own
// float.
func TestCaptionFloat(t *testing.T) {
	out := write(t, compared(), Options{Format: LaTeX, Caption: "TERN-B targets", Label: "tab:t"})
	if !strings.HasPrefix(out, "\\begin{table}\n\\centering\n\\caption{TERN-B targets}\\label{tab:t}\n\\begin{tabular}{") || !strings.HasSuffix(out, "\\end{tabular}\n\\end{table}\n") {
		t.Errorf("float:\n%s", out)
	}
	out = write(t, compared(), Options{Format: LaTeX, Label: "tab:t"})
	if !strings.HasPrefix(out, "\\begin{table}\n\\centering\n\\label{tab:t}\n") {
		t.Errorf("label alone:\n%s", out)
	}
	if out := write(t, compared(), Options{Format: LaTeX}); !strings.HasPrefix(out, `\begin{tabular}`) {
		t.Errorf("plain:\n%s", out)
	}
}

// TestTableFormat: the reserved widths for hand-checked sets of numbers.
func TestTableFormat(t *testing.T) {
	for _, c := range []struct {
		in   []string
		want string
	}{
		{[]string{"0.9649", "55.00", ""}, "2.4"},
		{[]string{"-6.612e-4", "1.000e12"}, "-1.3e-2"},
		{[]string{"1", "123"}, "3.0"},
		{nil, "1.0"},
	} {
		if got := tableFormat(c.in); got != c.want {
			t.Errorf("tableFormat(%q) = %s, want %s", c.in, got, c.want)
		}
	}
}
