package expr

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// propertyCases are smooth expressions with points inside their domains.
var propertyCases = []struct {
	src    string
	params map[string]float64
	at     []float64
}{
	{"tanh(x/sqrt(6*alpha))^2", map[string]float64{"alpha": 0.5}, []float64{-2, 0.3, 1.1, 4}},
	{"(1 - exp(-sqrt(2/(3*alpha))*x))^2", map[string]float64{"alpha": 1}, []float64{-0.5, 0.7, 3, 6}},
	{"1 + cos(x/f)", map[string]float64{"f": 3}, []float64{0.2, 2, 5}},
	{"lambda/4 * x^4 / (1 + xi*x^2)^2", map[string]float64{"lambda": 0.1, "xi": 10}, []float64{0.1, 0.4, 1}},
	// The Higgs-like kinetic function in the Jordan-frame field.
	{"(1 + xi*x^2 + 6*xi^2*x^2) / (1 + xi*x^2)^2", map[string]float64{"xi": 10}, []float64{0.1, 0.4, 1}},
	{"x^4", nil, []float64{-1.3, 0.5, 2}},
	{"exp(-x^2) * sin(3*x)", nil, []float64{-1, 0.2, 0.9}},
	{"log(1 + x^2)", nil, []float64{-2, 0.5, 3}},
	{"sqrt(1 + x^2) - x/2", nil, []float64{-2, 0.5, 3}},
	{"atanh(x/3) + acosh(2 + x^2)", nil, []float64{-1, 0.5, 2}},
	{"x^x", nil, []float64{0.5, 1.2, 2}},
	{"pow(2, x) / (1 + x^2)", nil, []float64{-1, 0.5, 2}},
	{"asinh(x) * cosh(x/2)", nil, []float64{-1.5, 0.4, 2}},
	{"tan(x/2) + sinh(x)/3", nil, []float64{-1, 0.4, 1.5}},
	{"abs(x - 3) * x^2.5", nil, []float64{0.5, 1, 2}},
	{"V0 * x^2 * (1 - 2/3*x + x^2/4)^-1.5", map[string]float64{"V0": 2}, []float64{0.1, 0.8, 1.6}},
}

// Derivatives agree with high-order central differences of Value: a cross-
// check of the jet rules against the values alone. The tolerances, relative
// to the largest component, are loose: the stencils amplify rounding by
// about 1/h^k, so with h = 5e-3 the third derivative is good to ~1e-8.
func TestDerivativesMatchFiniteDifferences(t *testing.T) {
	const h = 5e-3
	tol := [3]float64{1e-10, 1e-8, 1e-6}
	for _, c := range propertyCases {
		e := mustCompile(t, c.src, c.params)
		for _, x := range c.at {
			j := e.At(x)
			scale := math.Max(math.Max(math.Abs(j.V), math.Abs(j.D1)), math.Max(math.Abs(j.D2), math.Abs(j.D3)))
			d := fd(e.Value, x, h)
			for k, ad := range []float64{j.D1, j.D2, j.D3} {
				if math.Abs(ad-d[k]) > tol[k]*scale {
					t.Errorf("%s at x=%g: derivative %d = %.12g, finite differences %.12g", c.src, x, k+1, ad, d[k])
				}
			}
		}
	}
}

// Value performs the operations of Eval's value component, so they agree
// to the bit; and folding constant subtrees changes no component.
func TestValueAndFoldingAreExact(t *testing.T) {
	extra := []struct {
		src    string
		params map[string]float64
		at     []float64
	}{
		{"2 * x - 3 / x + (alpha - 1) * x^(alpha + 1) + 2^x - 1/alpha", map[string]float64{"alpha": 0.3}, []float64{0.5, 2}},
		{"pow(x, 2*alpha) + pow(alpha, x) + log(alpha) * sqrt(x) - (1 - x)", map[string]float64{"alpha": 1.7}, []float64{0.25, 3}},
		{"-x / 7 + 7 / -x - x * pi + pi * x^-3 + exp(-alpha) * tanh(x)", map[string]float64{"alpha": 2}, []float64{-1.5, 0.75}},
	}
	for _, c := range append(extra, propertyCases...) {
		e := mustCompile(t, c.src, c.params)
		raw := unfolded(t, c.src, c.params)
		for _, x := range c.at {
			j := e.At(x)
			if v := e.Value(x); v != j.V {
				t.Errorf("%s at %g: Value = %.17g, At().V = %.17g", c.src, x, v, j.V)
			}
			if u := raw.eval(num.Var(x)); !same(j, u) {
				t.Errorf("%s at %g: folded %v, unfolded %v", c.src, x, j, u)
			}
			if v := raw.value(x); v != j.V {
				t.Errorf("%s at %g: unfolded Value = %.17g, folded %.17g", c.src, x, v, j.V)
			}
		}
	}
}

// The canonical text compiles to the same tree: the same text again and
// the same results to the bit.
func TestCanonicalTextRoundTrips(t *testing.T) {
	for _, c := range propertyCases {
		e := mustCompile(t, c.src, c.params)
		f := mustCompile(t, e.String(), c.params)
		if f.String() != e.String() {
			t.Errorf("%q: canonical text %q reprints as %q", c.src, e.String(), f.String())
		}
		for _, x := range c.at {
			if !same(e.At(x), f.At(x)) {
				t.Errorf("%q at %g: %v, reprinted %v", c.src, x, e.At(x), f.At(x))
			}
		}
	}
}

// Eval with a non-trivial jet of the field applies the chain rule: sin(x)
// with x = t^2 is sin(t^2), whose derivatives in t are written by hand.
func TestEvalAppliesChainRule(t *testing.T) {
	e := mustCompile(t, "sin(x)", nil)
	for _, tv := range []float64{-1.3, 0.4, 1.1} {
		s, c := math.Sin(tv*tv), math.Cos(tv*tv)
		want := [4]float64{s, 2 * tv * c, 2*c - 4*tv*tv*s, -12*tv*s - 8*tv*tv*tv*c}
		got := comps(e.Eval(num.Jet{V: tv * tv, D1: 2 * tv, D2: 2}))
		for k := range got {
			if !within(got[k], want[k], 1e-13) {
				t.Errorf("t=%g: derivative %d = %.17g, want %.17g", tv, k, got[k], want[k])
			}
		}
	}
}

// Domain problems give NaN or Inf, not errors or panics.
func TestDomainProblemsGiveNaNOrInf(t *testing.T) {
	rows := []struct {
		src string
		x   float64
	}{
		{"log(x)", -1}, {"sqrt(x)", -1}, {"1/x", 0}, {"acosh(x)", 0.5},
		{"atanh(x)", 2}, {"x^0.5", -4}, {"x^x", -2}, {"log(x)", 0}, {"exp(x)", 1000},
	}
	for _, r := range rows {
		e := mustCompile(t, r.src, nil)
		j := e.At(r.x)
		bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
		if !bad(j.V) && !bad(j.D1) {
			t.Errorf("%s at %g = %v, want NaN or Inf", r.src, r.x, j)
		}
	}
}

func TestEvalDoesNotAllocate(t *testing.T) {
	e := mustCompile(t, "V0 * (1 - exp(-sqrt(2/(3*alpha))*x))^2 + tanh(x/sqrt(6*alpha))^2 * cos(x/f) / (1 + x^x)",
		map[string]float64{"V0": 1, "alpha": 1, "f": 4})
	var sink num.Jet
	var sinkV float64
	allocs := testing.AllocsPerRun(100, func() {
		sink = e.At(0.7)
		sinkV = e.Value(0.7)
	})
	if allocs != 0 {
		t.Errorf("At and Value allocate %v times per call", allocs)
	}
	_, _ = sink, sinkV
}
