package root

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

const shapeA = `[[reheating]]
history = "fixed-efolds"
N_star = 55

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = [1, 2, 3]
`

// B shrinks the alpha list, adds a model and changes N*: before pairing by
// identity, diff failed ("intermediate configuration {model[1].family}:
// missing family", "gives 2 results: attribution needs every
// configuration to give the same results").
const shapeB = `[[reheating]]
history = "fixed-efolds"
N_star = 60

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = [1, 2]

[[model]]
family = "starobinsky"
`

// TestDiffAcrossStudyShapes: the diff answers when the studies evaluate
// different model points; removed and added results are listed as such;
// for every pair and quantity the contributions plus the remainder equal
// the total (a property that could fail).
func TestDiffAcrossStudyShapes(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", h.write("a.toml", shapeA))
	h.mustRun("tag", "latest", "va")
	h.mustRun("run", h.write("b.toml", shapeB))
	out := h.mustRun("diff", "va", "latest", "--json")
	var rep struct {
		Pairs []struct {
			A       string `json:"label_a"`
			Changes map[string]struct {
				A, B, Total   float64
				Contributions []float64
				Remainder     float64
			} `json:"changes"`
		} `json:"pairs"`
		Removed []struct{ Label string } `json:"removed"`
		Added   []struct{ Label string } `json:"added"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if len(rep.Pairs) != 2 {
		t.Errorf("%d pairs, want 2 (alpha = 1, 2)", len(rep.Pairs))
	}
	if len(rep.Removed) != 1 || !strings.Contains(rep.Removed[0].Label, "alpha=3") ||
		len(rep.Added) != 1 || !strings.Contains(rep.Added[0].Label, "starobinsky") {
		t.Errorf("removed %+v, added %+v: want alpha=3 removed and starobinsky added", rep.Removed, rep.Added)
	}
	for _, p := range rep.Pairs {
		ns, ok := p.Changes["n_s"]
		if !ok || ns.Total <= 0 {
			t.Errorf("%s: n_s change %+v, want an increase from N* = 55 to 60", p.A, ns)
		}
		for q, c := range p.Changes {
			sum := c.Remainder
			for _, x := range c.Contributions {
				sum += x
			}
			if math.Abs(sum-c.Total) > 1e-12*math.Max(1, math.Abs(c.Total)) {
				t.Errorf("%s %s: contributions + remainder = %g, total %g", p.A, q, sum, c.Total)
			}
		}
	}
}
