package root

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
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
	_, errs, code := h.run("predict", "--family", "starobinsky", "--efolds", "55", "--end", "epsilon_H=1")
	if code != app.ExitUsage || !strings.Contains(errs, "slow_roll.end") {
		t.Errorf("first order with epsilon_H=1: exit %d, %s", code, errs)
	}
}
