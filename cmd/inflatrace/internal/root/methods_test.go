package root

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"
)

const methodsStudy = `[slow_roll]
method = ["first", "second", "exact"]

[[reheating]]
history = "fixed-efolds"
N_star = 55

[[reheating]]
history = "instantaneous"

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "starobinsky"
`

// One run records all three methods, so they can be compared: at N* = 55
// for Starobinsky, first order is off the exact n_s by O(epsilon^2)
// (about 1e-4 here) and second order by O(epsilon^3) (a few 1e-6): the
// size expected of each order (Stewart & Lyth 1993, gr-qc/9302019).
func TestMethodsInOneRun(t *testing.T) {
	h := newHarness(t)
	res := decodeRun(t, h.mustRun("run", h.write("m.toml", methodsStudy), "--json")).Results
	if len(res) != 6 {
		t.Fatalf("%d results, want 3 methods x 2 histories", len(res))
	}
	by := map[string]map[string]any{}
	for _, r := range res {
		by[r["method"].(string)+" "+r["reheating"].(string)] = r
	}
	ns := func(k string) float64 { return by[k]["n_s"].(float64) }
	first, second, exact := ns("first fixed-efolds"), ns("second fixed-efolds"), ns("exact fixed-efolds")
	if d := math.Abs(first - exact); d < 2e-5 || d > 5e-4 {
		t.Errorf("|n_s first - exact| = %.3g, want O(epsilon^2) ~ 1e-4", d)
	}
	if d := math.Abs(second - exact); d > 2e-5 {
		t.Errorf("|n_s second - exact| = %.3g, want O(epsilon^3) < 2e-5", d)
	}
	// The exact method normalises with the exact P_s, so its energy scale
	// differs from first order's by a relative O(epsilon) amount.
	e1, e3 := by["first instantaneous"]["energy_scale_GeV"].(float64), by["exact instantaneous"]["energy_scale_GeV"].(float64)
	if rel := math.Abs(e1-e3) / e3; rel == 0 || rel > 0.02 {
		t.Errorf("energy scale first %g vs exact %g", e1, e3)
	}
	out := h.mustRun("predict", "--family", "starobinsky", "--efolds", "55", "--method", "exact", "--json")
	if !strings.Contains(out, `"method": "exact"`) || !strings.Contains(out, "0.9648983") {
		t.Errorf("predict --method exact: %s", out)
	}
	// First order counted from the exact end (epsilon_H = 1): the end it
	// reports is the exact method's, and its pivot lies nearer the exact
	// pivot than first order counted from epsilon_V = 1 (the count's
	// error near the end is gone; what remains is the first-order count's
	// O(epsilon) error per e-fold). A property that could be false.
	pick := func(args ...string) map[string]any {
		var r map[string]any
		if err := json.Unmarshal([]byte(h.mustRun(append([]string{"predict", "--family", "starobinsky", "--efolds", "55", "--json"}, args...)...)), &r); err != nil {
			t.Fatal(err)
		}
		return r
	}
	fH, fV, xH := pick("--end", "epsilon_H=1"), pick("--end", "epsilon_V=1"), pick("--method", "exact", "--end", "epsilon_H=1")
	num := func(r map[string]any, k string) float64 { return r[k].(float64) }
	if d := math.Abs(num(fH, "phi_end") - num(xH, "phi_end")); d > 1e-9 {
		t.Errorf("first order at epsilon_H=1 reports phi_end %v, exact %v", fH["phi_end"], xH["phi_end"])
	}
	if fH["end"] != "epsilon_H=1" || fH["N_star_definition"] == "" || fH["phi_end_slow_roll"] == nil {
		t.Errorf("first order at epsilon_H=1: end %v, N_star_definition %v, phi_end_slow_roll %v", fH["end"], fH["N_star_definition"], fH["phi_end_slow_roll"])
	}
	// show says which end a result counted from and what N* means.
	shown := h.mustRun("show", "latest")
	if !strings.Contains(shown, "# end of inflation and N*") || !strings.Contains(shown, "exact / epsilon_H=1: e-folds of the exact background") ||
		!strings.Contains(shown, fmt.Sprintf("%.10g", num(xH, "phi_end"))) {
		t.Errorf("show does not state the end and N* definition:\n%s", shown)
	}
	if dH, dV := math.Abs(num(fH, "phi_star")-num(xH, "phi_star")), math.Abs(num(fV, "phi_star")-num(xH, "phi_star")); !(dH < dV/2) {
		t.Errorf("pivot from the exact end is %.3g from the exact pivot, from epsilon_V = 1 %.3g", dH, dV)
	}
}
