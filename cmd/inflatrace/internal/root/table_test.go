package root

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

// studyTwoSets is a small study of the demo scenario: two models (one of
// them at alpha = 1/3 and 7/3) at two N*, each compared with two shipped
// constraint sets and the invented TERN-B forecast.
const studyTwoSets = `[[reheating]]
history = "fixed-efolds"
N_star = [50, 60]

[[constraint]]
use = "cmb-combined-2025"

[[constraint]]
use = "act-dr6-bk18-2025"

[[forecast]]
use = "tern-b"

[[model]]
family = "e-model"
label = "E-model"
alpha = ["1/3", "7/3"]

[[model]]
family = "starobinsky"
`

func tableRecords(t *testing.T, out string) [][]string {
	t.Helper()
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatalf("table CSV: %v\n%s", err, out)
	}
	return recs
}

// TestTableLayoutsAndWritten: the wide table of a run with two constraint
// sets and a forecast has a row per prediction (a third of the long
// table's rows, which are the run's results), a group per set in the
// run's order, the forecast's detection significance, and the
// parameters as the study wrote them.
func TestTableLayoutsAndWritten(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("two.toml", studyTwoSets), "--json"))
	if len(r.Results) != 3*2*3 {
		t.Fatalf("%d results, want 18", len(r.Results))
	}
	long := tableRecords(t, h.mustRun("table", r.Run, "--format", "csv", "--layout", "long"))
	wide := tableRecords(t, h.mustRun("table", r.Run, "--format", "csv"))
	if len(long)-1 != 18 || len(wide)-1 != 6 {
		t.Fatalf("long %d rows, wide %d rows; want 18 and 6", len(long)-1, len(wide)-1)
	}
	head := strings.Join(wide[0], ",")
	for _, want := range []string{"delta_chi2[cmb-combined-2025],n_sigma[cmb-combined-2025],inside_95[cmb-combined-2025],delta_chi2[act-dr6-bk18-2025]", "detection_sigma[tern-b]"} {
		if !strings.Contains(head, want) {
			t.Errorf("wide header %s lacks %s", head, want)
		}
	}
	if strings.Contains(head, "delta_chi2[tern-b]") || strings.Contains(head, "detection_sigma[cmb") {
		t.Errorf("a column without values in a set: %s", head)
	}
	md := h.mustRun("table", r.Run, "--columns", "model_label,params,param.alpha,history,r")
	for _, want := range []string{"| E-model | alpha=1/3, n=1 | 1/3 | N*=50 |", "| E-model | alpha=7/3, n=1 | 7/3 | N*=60 |"} {
		if !strings.Contains(md, want) {
			t.Errorf("Markdown lacks %q:\n%s", want, md)
		}
	}
	if strings.Contains(md, "0.3333333333333333") {
		t.Errorf("a parameter in shortest form where the study wrote 1/3:\n%s", md)
	}
	tex := h.mustRun("table", r.Run, "--format", "latex", "--longtable", "--caption", "Two sets", "--label", "tab:two")
	for _, want := range []string{`\begin{longtable}`, `\multicolumn{3}{c}{cmb-combined-2025}`, `\multicolumn{1}{c}{tern-b (forecast)}`, `$\alpha=7/3$`, `\caption{Two sets}\label{tab:two}`} {
		if !strings.Contains(tex, want) {
			t.Errorf("LaTeX lacks %q:\n%s", want, tex)
		}
	}
}

// TestTableExactAgainstLedger: by default the CSV and JSON tables carry
// every number with the bits the run recorded (run --json writes the
// ledger's values in shortest round-trip form, which encoding/json reads
// back exactly).
func TestTableExactAgainstLedger(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("two.toml", studyTwoSets), "--json"))
	long := tableRecords(t, h.mustRun("table", r.Run, "--format", "csv", "--layout", "long", "--columns", "n_s,r,alpha_s,energy_scale_GeV,delta_chi2"))
	var js []map[string]any
	if err := json.Unmarshal([]byte(h.mustRun("table", r.Run, "--format", "json", "--layout", "long", "--columns", "n_s,r,delta_chi2")), &js); err != nil {
		t.Fatal(err)
	}
	if len(long)-1 != len(r.Results) || len(js) != len(r.Results) {
		t.Fatalf("%d CSV rows, %d JSON rows, %d results", len(long)-1, len(js), len(r.Results))
	}
	for k, res := range r.Results {
		for i, name := range long[0] {
			want, ok := res[name].(float64)
			if !ok {
				if long[k+1][i] != "" {
					t.Errorf("row %d %s: %q where the run has none", k+1, name, long[k+1][i])
				}
				continue
			}
			got, err := strconv.ParseFloat(long[k+1][i], 64)
			if err != nil || math.Float64bits(got) != math.Float64bits(want) {
				t.Errorf("row %d %s: CSV %q, run %v", k+1, name, long[k+1][i], want)
			}
			if name == "n_s" || name == "r" {
				if js[k][name] != want {
					t.Errorf("row %d %s: JSON %v, run %v", k+1, name, js[k][name], want)
				}
			}
		}
	}
}

// TestTableWhereSort: --where filters on any column (ANDed), --sort
// orders, and bad ones are usage errors (exit 2) naming the flag, with no
// --out file written.
func TestTableWhereSort(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("two.toml", studyTwoSets), "--json"))
	recs := tableRecords(t, h.mustRun("table", r.Run, "--format", "csv", "--columns", "model,param.alpha,N_star,r",
		"--where", "r<0.008", "--where", "model=E-MODEL", "--sort", "-r"))
	// r = 12 alpha/N^2 to leading order in 1/N (Kallosh & Linde 2013,
	// arXiv:1306.5220): alpha = 7/3 gives 0.0112 at N* = 50 and 0.0078 at
	// 60, alpha = 1/3 below 0.002; Starobinsky is not an e-model family.
	if len(recs) != 4 {
		t.Fatalf("%d rows, want 3 (7/3 at N*=60, 1/3 at both):\n%v", len(recs)-1, recs)
	}
	prev := math.Inf(1)
	for _, rec := range recs[1:] {
		x, _ := strconv.ParseFloat(rec[3], 64)
		if rec[0] != "e-model" || !(x < 0.008) || x > prev {
			t.Errorf("row %v: not an e-model with r < 0.008 in descending r", rec)
		}
		prev = x
	}
	out := filepath.Join(h.dir, "t.csv")
	for _, c := range []struct{ args []string }{
		{[]string{"--where", "r<<0.01"}},
		{[]string{"--where", "nope=1"}},
		{[]string{"--where", "delta_chi2<4"}}, // two sets: name one
		{[]string{"--sort", "nope"}},
		{[]string{"--layout", "tall"}},
		{[]string{"--caption", "x"}}, // Markdown
	} {
		flag := c.args[0]
		_, errs, code := h.run(append([]string{"table", r.Run, "--out", out}, c.args...)...)
		if code != app.ExitUsage || !strings.Contains(errs, flag) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d naming %s", c.args, code, errs, app.ExitUsage, flag)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%v: wrote %s", c.args, out)
		}
	}
}

// TestArchiveTables: an export carries the tables in every format, the
// LaTeX one with booktabs rules, the Markdown one with the study's 1/3.
func TestArchiveTables(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	dir := filepath.Join(h.dir, "release")
	h.mustRun("export", r.Run, "--out", dir)
	read := func(name string) string {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	if tex := read("results.tex"); !strings.Contains(tex, `\toprule`) || !strings.Contains(tex, `\bottomrule`) {
		t.Errorf("results.tex:\n%s", tex)
	}
	if md := read("results.md"); !strings.Contains(md, "alpha=1/3") {
		t.Errorf("results.md:\n%s", md)
	}
	var js []map[string]any
	if err := json.Unmarshal([]byte(read("results-table.json")), &js); err != nil || len(js) != len(r.Results) {
		t.Errorf("results-table.json: %v, %d rows for %d results (one set)", err, len(js), len(r.Results))
	}
	if recs := tableRecords(t, read("results.csv")); recs[0][0] != "label" || len(recs)-1 != len(r.Results) {
		t.Errorf("results.csv header %v, %d rows", recs[0], len(recs)-1)
	}
}
