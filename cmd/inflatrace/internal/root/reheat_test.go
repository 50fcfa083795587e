package root

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

const reheatStudy = `[[reheating]]
history = "temperature"
w_reh = [0, 0.25]
T_reh_GeV = [1e9, 1e-3]

[[reheating]]
history = "duration"
w_reh = 0
N_reh = 10

[[reheating]]
history = "kination"
T_reh_GeV = 1e7

[[reheating]]
history = "band"
n_w = 5
n_T = 10

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "starobinsky"
`

func TestReheatingHistoriesEndToEnd(t *testing.T) {
	h := newHarness(t)
	p := filepath.Join(h.dir, "reheat.toml")
	if err := os.WriteFile(p, []byte(reheatStudy), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code := h.run("run", p, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	res := decodeRun(t, out).Results
	if len(res) != 4+1+1+1 {
		t.Fatalf("%d results, want 7 (4 temperature, duration, kination, band)", len(res))
	}
	byLabel := map[string]map[string]any{}
	for _, r := range res {
		byLabel[r["label"].(string)] = r
	}
	// Matter-like reheating to 1e9 GeV: N* = 50.67 (published-values.md B6,
	// computed for A_s = 2.099e-9; here A_s = 2.1e-9 moves it by 1e-4).
	r := byLabel["starobinsky | w=0 T_reh=1e+09 GeV | cmb-combined-2025"]
	if n := r["N_star"].(float64); n < 50.66 || n > 50.68 {
		t.Errorf("N* = %v, want 50.67", n)
	}
	if r["below_bbn"] != false || r["T_max_GeV"] == nil || r["N_reh"] == nil {
		t.Errorf("temperature history lacks its reheating figures: %v", r)
	}
	low := byLabel["starobinsky | w=0 T_reh=0.001 GeV | cmb-combined-2025"]
	if low["below_bbn"] != true || !strings.Contains(errs, "below the nucleosynthesis bound") {
		t.Errorf("T_reh = 1 MeV not flagged below the BBN bound: %v\n%s", low["below_bbn"], errs)
	}
	kin := byLabel["starobinsky | kination T_reh=1e+07 GeV | cmb-combined-2025"]
	if kin["N_star"].(float64) <= r["N_star"].(float64)+5 {
		t.Errorf("kination N* %v should exceed matter-like N* %v by several e-folds", kin["N_star"], r["N_star"])
	}
	band := byLabel["starobinsky | band w in [0, 0.3333333333333333]"]
	b, ok := band["band"].(map[string]any)
	if !ok {
		t.Fatalf("band result lacks its span: %v", band)
	}
	ns := b["N_star"].([]any)
	if !(ns[0].(float64) < 45 && ns[1].(float64) > 55.5) || b["points"].(float64) != 50 {
		t.Errorf("band %v", b)
	}
}

func TestReheatingRefusals(t *testing.T) {
	h := newHarness(t)
	base := "[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"starobinsky\"\n\n"
	cases := []struct {
		name, text string
		code       int
		want       string
	}{
		{"w too soft", base + "[[reheating]]\nhistory = \"temperature\"\nw_reh = -0.34\nT_reh_GeV = 1e9\n", app.ExitUsage, "w_reh = -0.34"},
		{"above the maximum", base + "[[reheating]]\nhistory = \"temperature\"\nw_reh = 0\nT_reh_GeV = 1e17\n", app.ExitRunFailed, "above the instantaneous maximum"},
		{"missing T", base + "[[reheating]]\nhistory = \"kination\"\n", app.ExitUsage, "needs T_reh_GeV"},
		{"stray key", base + "[[reheating]]\nhistory = \"instantaneous\"\nN_star = 50\n", app.ExitUsage, "unknown key \"N_star\""},
	}
	for _, c := range cases {
		p := filepath.Join(h.dir, strings.ReplaceAll(c.name, " ", "-")+".toml")
		if err := os.WriteFile(p, []byte(c.text), 0o644); err != nil {
			t.Fatal(err)
		}
		out, errs, code := h.run("run", p, "--json")
		if code != c.code || !strings.Contains(errs, c.want) {
			t.Errorf("%s: exit %d (want %d), stderr %q lacks %q", c.name, code, c.code, errs, c.want)
		}
		if c.code == app.ExitRunFailed {
			var r runJSON
			if err := json.Unmarshal([]byte(out), &r); err != nil || r.Failed != 1 {
				t.Errorf("%s: %v %+v", c.name, err, r)
			}
		}
	}
}
