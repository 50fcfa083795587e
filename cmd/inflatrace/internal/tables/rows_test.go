package tables

import (
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/study"
)

// TestModelLabel: the label part of a result label without its parameter
// list, also when the label itself holds parentheses or there are no
// parameters.
func TestModelLabel(t *testing.T) {
	for _, c := range []struct {
		label  string
		params map[string]float64
		want   string
	}{
		{"E-model(alpha=1/3, n=1) | N*=50 | planck", map[string]float64{"alpha": 1.0 / 3, "n": 1}, "E-model"},
		{"phi^2 (quadratic)(m=1) | N*=55", map[string]float64{"m": 1}, "phi^2 (quadratic)"},
		{"f(g(x))(a=(1)) | N*=55", map[string]float64{"a": 1}, "f(g(x))"},
		{"Starobinsky | N*=55 | planck", nil, "Starobinsky"},
		{"R (no params) | N*=55", nil, "R (no params)"},
		// A study of several methods marks the method after the list.
		{"E-model(alpha=1) [second] | N*=55 | planck", map[string]float64{"alpha": 1}, "E-model"},
	} {
		method := ""
		if strings.Contains(c.label, "[second]") {
			method = "second"
		}
		if got := ModelLabel(study.Result{Label: c.label, Params: c.params, Method: method}); got != c.want {
			t.Errorf("ModelLabel(%q) = %q, want %q", c.label, got, c.want)
		}
	}
}

// TestDefaultRowColumn: by default CSV, JSON and Markdown lead with the
// row number 1..n in row order and the model label; LaTeX leaves the row
// out unless asked for.
func TestDefaultRowColumn(t *testing.T) {
	rows := fixture()
	recs, err := csv.NewReader(strings.NewReader(write(t, rows, Options{Format: CSV}))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if recs[0][0] != "row" || recs[0][1] != "model_label" {
		t.Fatalf("CSV header %v, want row, model_label first", recs[0])
	}
	for k, rec := range recs[1:] {
		if want := []string{"1", "2", "3"}[k]; rec[0] != want {
			t.Errorf("CSV row %d numbered %q, want %s", k+1, rec[0], want)
		}
		if want := ModelLabel(rows[k]); rec[1] != want {
			t.Errorf("CSV row %d model_label %q, want %q", k+1, rec[1], want)
		}
	}
	var js []map[string]any
	if err := json.Unmarshal([]byte(write(t, rows, Options{Format: JSON})), &js); err != nil {
		t.Fatal(err)
	}
	for k, o := range js {
		if o["row"] != float64(k+1) {
			t.Errorf("JSON row %d has row %v", k+1, o["row"])
		}
	}
	md := strings.Split(write(t, rows, Options{Format: Markdown}), "\n")
	if !strings.HasPrefix(md[0], "| # | Model label |") || !strings.HasPrefix(md[4], "| 3 | bad |") {
		t.Errorf("Markdown header and last row:\n%s\n%s", md[0], md[4])
	}
	tex := write(t, rows, Options{Format: LaTeX})
	if strings.Contains(tex, `\#`) || !strings.Contains(tex, "\nModel & Parameters &") {
		t.Errorf("default LaTeX should have the model label and no row number:\n%s", tex)
	}
	tex = write(t, rows, Options{Format: LaTeX, Columns: []string{"row", "n_s"}})
	if !strings.Contains(tex, `\# & {$n_s$}`) || !strings.Contains(tex, "\n2 & ") {
		t.Errorf("LaTeX with row:\n%s", tex)
	}
}
