package num

import (
	"math"
	"strings"
	"testing"
)

// Integrals with closed forms (elementary antiderivatives; common
// practice). Default settings ask for a relative error of 1e-12.
func TestIntegrateClosedForms(t *testing.T) {
	cases := []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
		tol  float64 // relative
		why  string
	}{
		{"e^x on [0,1]", math.Exp, 0, 1, math.E - 1, 1e-14, "smooth: one panel is exact to rounding"},
		{"sin on [0,pi]", math.Sin, 0, math.Pi, 2, 1e-14, "smooth"},
		{"4/(1+x^2) on [0,1]", func(x float64) float64 { return 4 / (1 + x*x) }, 0, 1, math.Pi, 1e-14, "smooth"},
		{"Gaussian on [-10,10]", func(x float64) float64 { return math.Exp(-x * x) }, -10, 10, math.Sqrt(math.Pi) * math.Erf(10), 1e-13, "peaked in a wide interval: needs bisection"},
		{"cos^2 on [0,2pi]", func(x float64) float64 { c := math.Cos(x); return c * c }, 0, 2 * math.Pi, math.Pi, 1e-13, "oscillatory"},
		{"1/sqrt(x) on [0,1]", func(x float64) float64 { return 1 / math.Sqrt(x) }, 0, 1, 2, 1e-10, "integrable end-point singularity: the adaptive error estimate is loose, so 1e-10 rather than 1e-12"},
		{"ln x on [0,1]", math.Log, 0, 1, -1, 1e-11, "logarithmic end-point singularity"},
		{"x^-0.9 on [0,1]", func(x float64) float64 { return math.Pow(x, -0.9) }, 0, 1, 10, 1e-11, "strong end-point singularity: some 450 bisections towards 0"},
		{"sqrt(x) on [0,4]", math.Sqrt, 0, 4, 16.0 / 3, 1e-12, "derivative singular at 0"},
		{"reversed e^x on [1,0]", math.Exp, 1, 0, -(math.E - 1), 1e-14, "a > b gives the negative"},
		{"reversed 1/sqrt(x) on [1,0]", func(x float64) float64 { return 1 / math.Sqrt(x) }, 1, 0, -2, 1e-10, "reversed and singular"},
		{"empty interval", math.Exp, 2, 2, 0, 0, "a = b"},
	}
	for _, c := range cases {
		r, err := Integrate(c.f, c.a, c.b, nil)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if !within(r.Value, c.want, c.tol, 0) {
			t.Errorf("%s: got %.17g, want %.17g (rel tol %g: %s)", c.name, r.Value, c.want, c.tol, c.why)
		}
	}
}

// TestIntegratePolynomialExactness: the 7-point Gauss rule is exact for
// degree <= 13 and its 15-point Kronrod extension for degree <= 22
// (Kronrod 1965; Piessens et al. 1983, QUADPACK, sect. 2.2; section number
// from memory). So up to
// degree 13 the embedded error estimate is rounding only and one panel
// is accepted; at degree 22 the value of the first panel is still exact.
func TestIntegratePolynomialExactness(t *testing.T) {
	for _, deg := range []int{0, 1, 5, 13} {
		f := func(x float64) float64 { return float64(deg+1) * math.Pow(x, float64(deg)) }
		r, err := Integrate(f, 0, 1, nil)
		if err != nil {
			t.Fatal(err)
		}
		if r.Intervals != 1 || r.Evals != 15 {
			t.Errorf("degree %d: %d intervals, %d evaluations; want 1 and 15", deg, r.Intervals, r.Evals)
		}
		if !within(r.Value, 1, 1e-15, 0) {
			t.Errorf("degree %d: integral %.17g, want 1", deg, r.Value)
		}
	}
	v, _ := gk15(func(x float64) float64 { return 23 * math.Pow(x, 22) }, 0, 1)
	if !within(v, 1, 1e-14, 0) {
		t.Errorf("Kronrod 15 on 23 x^22: %.17g, want 1", v)
	}
}

func TestIntegrateErrors(t *testing.T) {
	cases := []struct {
		name string
		f    func(float64) float64
		a, b float64
		s    *QuadSettings
		want string
	}{
		{"pole at the centre", func(x float64) float64 { return 1 / x }, -1, 1, nil, "not finite"},
		{"pole inside", func(x float64) float64 { return 1 / (x - 0.5) }, 0, 1, nil, "not finite"},
		{"NaN inside", math.Sqrt, -1, 1, nil, "not finite"},
		// A divergent integral must not come back as a number: bisection
		// towards the pole ends on a node where 1/x overflows.
		{"divergent 1/x on [0,1]", func(x float64) float64 { return 1 / x }, 0, 1, nil, "not finite"},
		{"too few intervals", func(x float64) float64 { return 1 / math.Sqrt(x) }, 0, 1, &QuadSettings{MaxIntervals: 3}, "did not converge"},
	}
	for _, c := range cases {
		_, err := Integrate(c.f, c.a, c.b, c.s)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// TestIntegrateProperties: additivity over a split interval and an error
// estimate within the requested tolerance (properties of any quadrature).
func TestIntegrateProperties(t *testing.T) {
	f := func(x float64) float64 { return math.Exp(-x) * math.Cos(3*x) / math.Sqrt(x+0.01) }
	whole, err := Integrate(f, 0, 5, nil)
	if err != nil {
		t.Fatal(err)
	}
	left, _ := Integrate(f, 0, 1.3, nil)
	right, _ := Integrate(f, 1.3, 5, nil)
	if !within(left.Value+right.Value, whole.Value, 1e-11, 1e-13) {
		t.Errorf("additivity: %.17g + %.17g != %.17g", left.Value, right.Value, whole.Value)
	}
	if whole.ErrEst > 1e-12*math.Abs(whole.Value) && whole.ErrEst > 1e-13 {
		t.Errorf("returned error estimate %g above the requested tolerance", whole.ErrEst)
	}
	// A looser tolerance needs no more evaluations than a tighter one.
	loose, _ := Integrate(f, 0, 5, &QuadSettings{RelTol: 1e-6})
	if loose.Evals > whole.Evals {
		t.Errorf("RelTol 1e-6 used %d evaluations, the default %d", loose.Evals, whole.Evals)
	}
	if !within(loose.Value, whole.Value, 1e-6, 0) {
		t.Errorf("RelTol 1e-6: %.12g vs %.12g", loose.Value, whole.Value)
	}
}

// TestQuadRuleExactness checks the tabulated nodes and weights of both
// rule pairs against the exactness that defines them: an n-point Gauss
// rule integrates polynomials of degree <= 2n - 1 exactly, and its
// (2n+1)-point Kronrod extension those of degree <= 3n + 1 (n even) or
// 3n + 2 (n odd) (Kronrod 1965; Laurie 1997, Math. Comp. 66, 1133,
// "Calculation of Gauss-Kronrod quadrature rules", sect. 1; from memory):
// 1 and 5 for GK3 (the midpoint rule, whose extension is the 3-point
// Gauss rule), 5 and 11 for GK7, 13 and 22 for GK15. On [0, 1] the integral of x^k is
// 1/(k+1), and the estimate |K - G| vanishes where the Gauss rule is exact
// too. The next even degree, on [-1, 1] (where odd powers integrate to 0
// by symmetry alone), must be off for each rule, else a wrong node could
// pass. Tolerance 4e-16: sums of a few products of numbers below 1.
func TestQuadRuleExactness(t *testing.T) {
	for _, c := range []struct {
		name             string
		rule             func(func(float64) float64, float64, float64) (float64, float64)
		gaussDeg, kroDeg int
	}{{"GK3", gk3, 1, 5}, {"GK7", gk7, 5, 11}, {"GK15", gk15, 13, 22}} {
		pow := func(k int) func(float64) float64 { return func(x float64) float64 { return math.Pow(x, float64(k)) } }
		for k := 0; k <= c.kroDeg; k++ {
			kro, est := c.rule(pow(k), 0, 1)
			if want := 1 / float64(k+1); math.Abs(kro-want) > 4e-16 {
				t.Errorf("%s: x^%d on [0, 1]: %.17g, want %.17g", c.name, k, kro, want)
			}
			if k <= c.gaussDeg && est > 4e-16 {
				t.Errorf("%s: x^%d on [0, 1]: |K - G| = %g, want 0 (both rules exact)", c.name, k, est)
			}
		}
		beyond := func(deg int) int { return deg + 1 + (deg+1)%2 }
		k := beyond(c.kroDeg)
		if kro, _ := c.rule(pow(k), -1, 1); math.Abs(kro-2/float64(k+1)) <= 4e-16 {
			t.Errorf("%s: x^%d on [-1, 1] integrated exactly, beyond the Kronrod rule's degree", c.name, k)
		}
		k = beyond(c.gaussDeg)
		if _, est := c.rule(pow(k), -1, 1); est <= 4e-16 {
			t.Errorf("%s: x^%d on [-1, 1]: |K - G| = %g, but the Gauss rule is not exact there", c.name, k, est)
		}
	}
}

// TestIntegrateGK7: the GK7 rule gives the closed forms of
// TestIntegrateClosedForms too (more subintervals, about half the
// evaluations per subinterval), and a constant in one subinterval of 7
// evaluations.
func TestIntegrateGK7(t *testing.T) {
	s := &QuadSettings{Rule: GK7}
	for _, c := range []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
		tol  float64
	}{
		{"e^x on [0,1]", math.Exp, 0, 1, math.E - 1, 1e-14},
		{"4/(1+x^2) on [0,1]", func(x float64) float64 { return 4 / (1 + x*x) }, 0, 1, math.Pi, 1e-13},
		{"Gaussian on [-10,10]", func(x float64) float64 { return math.Exp(-x * x) }, -10, 10, math.Sqrt(math.Pi) * math.Erf(10), 1e-13},
		{"sqrt(x) on [0,4]", math.Sqrt, 0, 4, 16.0 / 3, 1e-12},
	} {
		r, err := Integrate(c.f, c.a, c.b, s)
		if err != nil || !within(r.Value, c.want, c.tol, 0) {
			t.Errorf("%s: got %.17g (%v), want %.17g", c.name, r.Value, err, c.want)
		}
	}
	r, err := Integrate(func(float64) float64 { return 2.5 }, -3, 7, s)
	if err != nil || r.Value != 25 || r.Evals != 7 || r.Intervals != 1 {
		t.Errorf("constant: %+v, %v; want 25 from 7 evaluations", r, err)
	}
	// GK3: a line in one panel of 3 evaluations; e^x on [0, 1] is not
	// accepted from one panel (the midpoint rule is off by 1e-2 there).
	s = &QuadSettings{Rule: GK3, MaxIntervals: 1}
	r, err = Integrate(func(x float64) float64 { return 1 + 2*x }, 0, 3, s)
	if err != nil || r.Value != 12 || r.Evals != 3 || r.Intervals != 1 {
		t.Errorf("GK3, a line: %+v, %v; want 12 from 3 evaluations", r, err)
	}
	if r, err := Integrate(math.Exp, 0, 1, s); err == nil {
		t.Errorf("GK3, e^x on [0, 1]: %+v accepted from one panel", r)
	}
}
