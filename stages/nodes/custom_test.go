package nodes

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// A user-written copy of each analytic built-in family reproduces the
// built-in first-order predictions to a relative 1e-9 in n_s and r at
// N* = 55 — written on the canonical field, and for the alpha-attractors
// also on their native fields with the kinetic terms of Kallosh, Linde &
// Roest 2013 (arXiv:1311.0472), normalised numerically.
func TestUserWrittenCopiesReproduceBuiltins(t *testing.T) {
	cases := []struct {
		family string
		params map[string]float64
		custom Custom
	}{
		{"t-model", map[string]float64{"alpha": 1.0 / 3, "n": 1}, Custom{Potential: "tanh(phi/sqrt(6*alpha))^(2*n)"}},
		{"t-model", map[string]float64{"alpha": 7.0 / 3, "n": 1}, Custom{Potential: "(chi^2/(6*alpha))^n", Kinetic: "1/(1 - chi^2/(6*alpha))^2", Field: "chi"}},
		{"e-model", map[string]float64{"alpha": 2, "n": 1}, Custom{Potential: "(1 - exp(-sqrt(2/(3*alpha))*phi))^(2*n)"}},
		{"e-model", map[string]float64{"alpha": 1.0 / 3, "n": 1}, Custom{Potential: "(1 - 1/y)^(2*n)", Kinetic: "3*alpha/(2*y^2)", Field: "y", Origin: 1}},
		{"starobinsky", map[string]float64{}, Custom{Potential: "(1 - exp(-sqrt(2/3)*phi))^2"}},
		{"power-law", map[string]float64{"p": 2.0 / 3}, Custom{Potential: "phi^p"}},
		{"power-law", map[string]float64{"p": 2}, Custom{Potential: "phi^2"}},
		{"natural", map[string]float64{"f": 7}, Custom{Potential: "1 + cos(phi/f)"}},
		{"hilltop", map[string]float64{"mu": 15, "p": 4}, Custom{Potential: "1 - (phi/mu)^p"}},
	}
	for _, c := range cases {
		fam, err := model.Lookup(c.family)
		if err != nil {
			t.Fatal(err)
		}
		builtin, err := fam.New(c.params)
		if err != nil {
			t.Fatal(err)
		}
		cu := c.custom
		cu.Params = c.params
		cu.DomainLo, cu.DomainHi = math.Inf(-1), math.Inf(1)
		if cu.Field == "" {
			cu.Field = "phi"
		}
		// The same canonical search range, expressed in the native field.
		if builtin.Native != nil && cu.Kinetic != "" {
			nf := builtin.Native
			cu.DomainLo, cu.DomainHi = nf.Lo, nf.Hi
			cu.SearchLo = nf.FromCanonical(builtin.Lo + 1e-9)
			cu.SearchHi = nf.FromCanonical(math.Min(builtin.Hi, 40))
		} else {
			cu.SearchLo, cu.SearchHi = builtin.Lo, builtin.Hi
		}
		user, err := cu.Model()
		if err != nil {
			t.Fatalf("%s %v: %v", c.family, cu.Potential, err)
		}
		want := predict(t, builtin)
		got := predict(t, user)
		for _, q := range []struct {
			name string
			a, b float64
		}{{"n_s", got.Ns, want.Ns}, {"r", got.R, want.R}} {
			if rel := math.Abs(q.a-q.b) / math.Abs(q.b); rel > 1e-9 {
				t.Errorf("%s %v via %q: %s = %.15g, built-in %.15g (rel %.2g)", c.family, c.params, cu.Potential, q.name, q.a, q.b, rel)
			}
		}
	}
}

func predict(t *testing.T, m *model.Model) slowroll.Observables {
	t.Helper()
	sol, err := slowroll.Solve(m, nil)
	if err != nil {
		t.Fatalf("%s: %v", m.Describe(), err)
	}
	_, o, err := sol.Evaluate(55)
	if err != nil {
		t.Fatalf("%s: %v", m.Describe(), err)
	}
	return o
}

func TestUserWrittenErrors(t *testing.T) {
	cases := []struct {
		c    Custom
		want string
	}{
		{Custom{Potential: "phi^2 +", Field: "phi"}, "column"},
		{Custom{Potential: "phi^2 * lam", Field: "phi"}, "lam"},
		{Custom{Potential: "2 + 3", Field: "phi"}, "depend"},
		{Custom{Potential: "phi^2", Kinetic: "1/(", Field: "phi"}, "kinetic"},
	}
	for _, c := range cases {
		err := CompileCustom(c.c)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q / %q: error %v, want one mentioning %q", c.c.Potential, c.c.Kinetic, err, c.want)
		}
	}
	// A pole of K inside the search range is refused, saying where.
	bad := Custom{Potential: "x^2", Kinetic: "1/(1 - x^2)^2", Field: "x", DomainLo: -2, DomainHi: 2, SearchLo: 0.1, SearchHi: 1.5}
	if _, err := bad.Model(); err == nil {
		t.Error("a kinetic pole inside the domain was accepted")
	}
}
