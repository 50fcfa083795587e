package root

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

const customHead = "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n"

// A user-written model in a study runs through every stage like a family,
// and its copy of a built-in family gives the same numbers.
func TestUserWrittenModelInAStudy(t *testing.T) {
	h := newHarness(t)
	study := customHead + `[[model]]
label = "my T-model"
potential = "(chi^2/(6*alpha))^n"
kinetic = "1/(1 - chi^2/(6*alpha))^2"
field = "chi"
domain = [-2.449489742783178, 2.449489742783178]
field_range = [0.001, 2.4494]
alpha = 1
n = 1

[[model]]
family = "t-model"
alpha = 1
`
	res := decodeRun(t, h.mustRun("run", h.write("u.toml", study), "--json")).Results
	if len(res) != 2 || res[0]["model"] != "custom" || res[0]["kinetic"] == nil {
		t.Fatalf("results %v", res)
	}
	a, b := res[0]["n_s"].(float64), res[1]["n_s"].(float64)
	if d := (a - b) / b; d > 1e-9 || d < -1e-9 {
		t.Errorf("user-written T-model n_s %.15g, built-in %.15g", a, b)
	}
}

func TestUserWrittenModelErrors(t *testing.T) {
	h := newHarness(t)
	cases := []struct {
		name, model string
		code        int
		want        []string
	}{
		{"syntax", "potential = \"phi^2 +* 3\"\nfield_range = [1, 10]\n", app.ExitUsage, []string{"syntax.toml:9:", "model[0].potential", "column"}},
		{"unknown name", "potential = \"phi^2 * lam\"\nfield_range = [1, 10]\n", app.ExitUsage, []string{"unknown", "lam", "sin"}},
		{"constant", "potential = \"3\"\nfield_range = [1, 10]\n", app.ExitUsage, []string{"depend"}},
		{"no range", "potential = \"phi^2\"\n", app.ExitUsage, []string{"field_range"}},
		{"both", "family = \"starobinsky\"\npotential = \"phi^2\"\nfield_range = [1, 10]\n", app.ExitUsage, []string{"not both"}},
		{"V negative", "potential = \"phi^2 - 4\"\nfield_range = [0.5, 30]\n", app.ExitRunFailed, []string{"V = ", "<= 0"}},
		{"kinetic pole", "potential = \"x^2\"\nkinetic = \"1/(1 - x^2)^2\"\nfield = \"x\"\ndomain = [-3, 3]\nfield_range = [0.1, 2.5]\n", app.ExitRunFailed, []string{"pole"}},
	}
	for _, c := range cases {
		p := h.write(strings.ReplaceAll(c.name, " ", "-")+".toml", customHead+"[[model]]\n"+c.model)
		_, errs, code := h.run("run", p)
		if code != c.code {
			t.Errorf("%s: exit %d, want %d: %s", c.name, code, c.code, errs)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%s: stderr lacks %q:\n%s", c.name, w, errs)
			}
		}
	}
}

// The catalogue lists at least 14 families, each with a formula, a
// reference and its parameters' units and ranges; the two-plateau model
// records its asymptotic equation of state, w = -1 + 2/(9 alpha)
// (Akrami, Kallosh, Linde & Vardanyan 2018, arXiv:1712.09693, abstract):
// -0.9048 for alpha = 7/3.
func TestCatalogue(t *testing.T) {
	h := newHarness(t)
	var cat []struct {
		Name, Kind, Formula, Reference string
		Params                         []struct{ Name, Unit, Interval string }
	}
	if err := json.Unmarshal([]byte(h.mustRun("models", "--json")), &cat); err != nil {
		t.Fatal(err)
	}
	if len(cat) < 14 {
		t.Fatalf("%d families, want at least 14", len(cat))
	}
	for _, f := range cat {
		if f.Formula == "" || f.Reference == "" || f.Kind == "" {
			t.Errorf("family %s lacks a formula, reference or kind", f.Name)
		}
		for _, p := range f.Params {
			if p.Unit == "" || p.Interval == "" {
				t.Errorf("%s.%s lacks unit or range", f.Name, p.Name)
			}
		}
	}
	out := h.mustRun("predict", "--family", "two-plateau", "--param", "alpha=7/3", "--param", "gamma=40", "--efolds", "55", "--json")
	if !strings.Contains(out, `"model": "two-plateau"`) {
		t.Fatalf("predict two-plateau: %s", out)
	}
	show := h.mustRun("show", "latest", "--json")
	if !strings.Contains(show, `"w_asymptotic"`) || !strings.Contains(show, "-0.904761904761904") {
		t.Errorf("the two-plateau model's asymptotic w is not recorded")
	}
}
