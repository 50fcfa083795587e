package tables

import (
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/study"
)

// TestWrittenParams: parameters as the study wrote them in the label,
// kept only where the text reads back to exactly the recorded value;
// otherwise the shortest round-trip form.
func TestWrittenParams(t *testing.T) {
	for _, c := range []struct {
		label  string
		method string
		params map[string]float64
		want   string
	}{
		{"E-model(alpha=1/3, n=1) | N*=50 | x", "", map[string]float64{"alpha": 1.0 / 3, "n": 1}, "alpha=1/3, n=1"},
		{"T-model(alpha=7/3, n=1) [second] | N*=50 | x", "second", map[string]float64{"alpha": 7.0 / 3, "n": 1}, "alpha=7/3, n=1"},
		// A label whose text does not read back to the value: not trusted.
		{"E-model(alpha=1/3, n=1) | N*=50 | x", "", map[string]float64{"alpha": 0.3333, "n": 1}, "alpha=0.3333, n=1"},
		// A value of a range, written in shortest form by the study too.
		{"hilltop(mu=0.0012589254117941673, p=4) | N*=55", "", map[string]float64{"mu": 0.0012589254117941673, "p": 4}, "mu=0.0012589254117941673, p=4"},
		// A decimal written with more digits than it needs, kept as written.
		{"m(f=0.50) | N*=55", "", map[string]float64{"f": 0.5}, "f=0.50"},
		// No parameter list in the label.
		{"Starobinsky | N*=55 | x", "", nil, ""},
		{"weird label | N*=55", "", map[string]float64{"x": 1.0 / 3}, "x=0.3333333333333333"},
	} {
		r := study.Result{Label: c.label, Method: c.method, Params: c.params}
		if got := paramText(r.Params, WrittenParams(r)); got != c.want {
			t.Errorf("%q: %q, want %q", c.label, got, c.want)
		}
	}
}

// TestWrittenInTables: Markdown and LaTeX show 1/3 and 7/3 where the
// study wrote them; CSV's param.NAME stays an exact number.
func TestWrittenInTables(t *testing.T) {
	md := write(t, compared(), Options{Format: Markdown, Columns: []string{"params", "param.alpha"}})
	if !strings.Contains(md, "| alpha=1/3, n=1 | 1/3 |") || !strings.Contains(md, "| alpha=7/3, n=1 | 7/3 |") {
		t.Errorf("Markdown:\n%s", md)
	}
	tex := write(t, compared(), Options{Format: LaTeX, Columns: []string{"params", "param.alpha"}})
	if !strings.Contains(tex, `$\alpha=1/3$, $n=1$ & $1/3$ \\`) {
		t.Errorf("LaTeX:\n%s", tex)
	}
	csv := write(t, compared(), Options{Format: CSV, Columns: []string{"params", "param.alpha"}})
	if !strings.Contains(csv, "\"alpha=1/3, n=1\",0.3333333333333333\r\n") {
		t.Errorf("CSV:\n%s", csv)
	}
}
