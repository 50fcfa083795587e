package model_test

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

func build(t testing.TB, family string, p map[string]float64) *model.Model {
	t.Helper()
	f, err := model.Lookup(family)
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func solve(t testing.TB, m *model.Model) *slowroll.Solution {
	t.Helper()
	sol, err := slowroll.Solve(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

func evaluate(t testing.TB, sol *slowroll.Solution, N float64) (slowroll.Point, slowroll.Observables) {
	t.Helper()
	p, o, err := sol.Evaluate(N)
	if err != nil {
		t.Fatalf("%s at N=%g: %v", sol.Model.Describe(), N, err)
	}
	return p, o
}

func near(got, want, rel, abs float64) bool {
	return got == want || math.Abs(got-want) <= rel*math.Abs(want)+abs
}

// bisect finds a root of f in [a, b] (f(a), f(b) of opposite signs) to
// the float64 resolution; a reference solver independent of the package
// under test.
func bisect(f func(float64) float64, a, b float64) float64 {
	fa := f(a)
	for i := 0; i < 200; i++ {
		m := a + (b-a)/2
		if m == a || m == b {
			break
		}
		if fm := f(m); (fm > 0) == (fa > 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return a + (b-a)/2
}

// catalogue lists every family with default-ish parameters (typical values
// from each family's reference or the ranges its comment discusses).
var catalogue = []struct {
	family string
	params map[string]float64
}{
	{"t-model", map[string]float64{"alpha": 1}},
	{"e-model", map[string]float64{"alpha": 1}},
	{"starobinsky", nil},
	{"power-law", map[string]float64{"p": 2.0 / 3}},
	{"power-law", map[string]float64{"p": 1}},
	{"power-law", map[string]float64{"p": 4.0 / 3}},
	{"power-law", map[string]float64{"p": 2}},
	{"natural", map[string]float64{"f": 7}},
	{"hilltop", map[string]float64{"mu": 10}},
	{"hilltop-quadratic", map[string]float64{"mu": 15}},
	{"hilltop-quartic", map[string]float64{"mu": 0.1}},
	{"hilltop-quartic", map[string]float64{"mu": 10}},
	{"coleman-weinberg", map[string]float64{"v": 0.01}},
	{"coleman-weinberg", map[string]float64{"v": 10}},
	{"coleman-weinberg", map[string]float64{"v": 100}},
	{"brane", map[string]float64{"mu": 0.01}},
	{"brane", map[string]float64{"mu": 1}},
	{"brane", map[string]float64{"mu": 5, "p": 2}},
	{"exponential-plateau", map[string]float64{"q": 0.5}},
	{"exponential-plateau", map[string]float64{"q": 5}},
	{"loop", map[string]float64{"alpha": 0.01}},
	{"loop", map[string]float64{"alpha": 1}},
	{"radion-assisted-gauge", map[string]float64{"alpha": 1e-3}},
	{"radion-assisted-gauge", map[string]float64{"alpha": 1}},
	{"radion-assisted-gauge", map[string]float64{"alpha": 100}},
	{"higgs", map[string]float64{"xi": 1}},
	{"higgs", map[string]float64{"xi": 1e4}},
	{"higgs", map[string]float64{"xi": 1e8}},
	{"two-plateau", map[string]float64{"alpha": 7.0 / 3, "gamma": 125}},
	{"two-plateau", map[string]float64{"alpha": 1, "gamma": 125}},
	{"two-plateau", map[string]float64{"alpha": 0.2, "gamma": 30}},
}

// TestCatalogueSlowRoll: for every family at typical parameters slow roll
// finds an end of inflation inside the field range, and it is the only
// one: an independent scan of epsilon_V - 1 on 4000 points (uniform and
// refined towards both edges) finds exactly one crossing with inflation
// behind it along the roll (the field moving downhill). N* = 55 can be
// evaluated, the range holds 200 e-folds (the catalogue's promise,
// ranges.go), and the first-order predictions are physical
// (0 < r < 1, 0.8 < n_s < 1).
func TestCatalogueSlowRoll(t *testing.T) {
	for _, c := range catalogue {
		m := build(t, c.family, c.params)
		sol := solve(t, m)
		if !(sol.End.Phi > m.Lo && sol.End.Phi < m.Hi) {
			t.Errorf("%s: end %g outside (%g, %g)", m.Describe(), sol.End.Phi, m.Lo, m.Hi)
		}
		if n := countEnds(m); n != 1 {
			t.Errorf("%s: %d ends of inflation in (%g, %g)", m.Describe(), n, m.Lo, m.Hi)
		}
		_, o := evaluate(t, sol, 55)
		if !(o.R > 0 && o.R < 1 && o.Ns > 0.8 && o.Ns < 1) {
			t.Errorf("%s: N=55 gives n_s = %g, r = %g", m.Describe(), o.Ns, o.R)
		}
		if _, err := sol.PhiAt(200); err != nil {
			t.Errorf("%s: 200 e-folds: %v", m.Describe(), err)
		}
	}
}

// countEnds counts the points where epsilon_V crosses 1 with inflation
// (epsilon_V < 1) uphill of the crossing and none downhill.
func countEnds(m *model.Model) int {
	var xs []float64
	const n = 1000
	w := m.Hi - m.Lo
	for i := 1; i < n; i++ {
		f := float64(i) / n
		xs = append(xs, m.Lo+w*f)
	}
	for k := 0; k < 1000; k++ { // geometric towards both edges, 1e-12 .. 1e-3 of the width
		g := math.Pow(10, -12+9*float64(k)/1000)
		xs = append(xs, m.Lo+w*g, m.Hi-w*g)
	}
	sortFloats(xs)
	ends := 0
	for i := 0; i+1 < len(xs); i++ {
		a, b := slowroll.At(m, xs[i]), slowroll.At(m, xs[i+1])
		if !(a.V > 0 && b.V > 0) || (a.Epsilon < 1) == (b.Epsilon < 1) {
			continue
		}
		downhill := -math.Copysign(1, m.At(0.5*(xs[i]+xs[i+1])).D1) // +1: field grows
		if (downhill > 0 && a.Epsilon < 1) || (downhill < 0 && b.Epsilon < 1) {
			ends++
		}
	}
	return ends
}

func sortFloats(xs []float64) {
	for i := 1; i < len(xs); i++ {
		for j := i; j > 0 && xs[j] < xs[j-1]; j-- {
			xs[j], xs[j-1] = xs[j-1], xs[j]
		}
	}
}

// closedForm is a family's first-order slow roll in closed form (derived
// here for each family, see below): epsilon_V and eta_V as functions of
// phi, N(phi) up to a constant, and a bracket of the end of inflation.
type closedForm struct {
	eps, eta, efolds func(phi float64) float64
	endLo, endHi     float64
}

// check compares the slow-roll solution with the closed form: the end of
// inflation (epsilon_V = 1) to 1e-12, and phi*, n_s = 1 - 6 eps + 2 eta and
// r = 16 eps at N = 50 and 60 to 1e-9 relative (the tolerance of the
// slow-roll package's own closed-form tests: e-folds to 1e-12, any wrong
// coefficient is >= 1e-3).
func (cf closedForm) check(t *testing.T, m *model.Model) {
	t.Helper()
	sol := solve(t, m)
	end := bisect(func(phi float64) float64 { return cf.eps(phi) - 1 }, cf.endLo, cf.endHi)
	if !near(sol.End.Phi, end, 1e-12, 1e-15) {
		t.Errorf("%s: end %.17g, closed form %.17g", m.Describe(), sol.End.Phi, end)
	}
	nEnd := cf.efolds(end)
	for _, N := range []float64{50, 60} {
		back := m.Hi
		if sol.End.Direction > 0 {
			back = m.Lo
		}
		phi := bisect(func(p float64) float64 { return math.Abs(cf.efolds(p)-nEnd) - N }, end, back)
		p, o := evaluate(t, sol, N)
		e, h := cf.eps(phi), cf.eta(phi)
		for _, c := range []struct {
			what      string
			got, want float64
		}{{"phi*", p.Phi, phi}, {"n_s", o.Ns, 1 - 6*e + 2*h}, {"r", o.R, 16 * e}} {
			if !near(c.got, c.want, 1e-9, 1e-300) {
				t.Errorf("%s N=%g: %s = %.15g, closed form %.15g", m.Describe(), N, c.what, c.got, c.want)
			}
		}
	}
}

// TestClosedFormSlowRoll: first-order slow roll of the catalogue's new
// families against their closed forms, all derived here from the
// potentials (epsilon_V = (V'/V)^2/2, eta_V = V”/V, N = ∫ V/V' dphi;
// Liddle, Parsons & Barrow 1994, astro-ph/9408015):
//   - hilltop-quartic, V = 1 - y^4, y = phi/mu: eps = 8 phi^6/(mu^8 V^2),
//     eta = -12 phi^2/(mu^4 V), N = mu^4/(8 phi^2) + phi^2/8;
//   - brane, V = 1 - (mu/phi)^p: eps = p^2 mu^(2p)/(2 phi^(2p+2) V^2),
//     eta = -p (p+1) mu^p/(phi^(p+2) V), N = phi^2 ((phi/mu)^p/(p+2) - 1/2)/p;
//   - exponential-plateau, V = 1 - e^(-q phi): eps = q^2 E^2/(2 V^2),
//     eta = -q^2 E/V, N = (e^(q phi) - q phi)/q^2, E = e^(-q phi);
//   - loop, V = 1 + alpha ln phi: eps = alpha^2/(2 phi^2 V^2),
//     eta = -alpha/(phi^2 V), N = phi^2/(2 alpha) + (phi^2/2)(ln phi - 1/2);
//   - radion-assisted gauge, V = phi^2/(alpha + phi^2): eps = 2 alpha^2/(phi^2 D^2),
//     eta = 2 alpha (alpha - 3 phi^2)/(phi^2 D^2), D = alpha + phi^2,
//     N = phi^2/4 + phi^4/(8 alpha);
//   - hilltop-quadratic, V = 1 - phi^2/mu^2: eps = 2 phi^2/(mu^4 V^2),
//     eta = -2/(mu^2 V), N = -(mu^2/2) ln phi + phi^2/4.
func TestClosedFormSlowRoll(t *testing.T) {
	hq := func(mu float64) closedForm {
		V := func(p float64) float64 { y := p / mu; return 1 - y*y*y*y }
		return closedForm{
			eps:    func(p float64) float64 { v := V(p); return 8 * math.Pow(p, 6) / (math.Pow(mu, 8) * v * v) },
			eta:    func(p float64) float64 { return -12 * p * p / (mu * mu * mu * mu * V(p)) },
			efolds: func(p float64) float64 { return mu*mu*mu*mu/(8*p*p) + p*p/8 },
			endLo:  1e-6 * mu, endHi: mu * (1 - 1e-12),
		}
	}
	hq2 := func(mu float64) closedForm {
		V := func(p float64) float64 { return 1 - p*p/(mu*mu) }
		return closedForm{
			eps:    func(p float64) float64 { v := V(p); return 2 * p * p / (mu * mu * mu * mu * v * v) },
			eta:    func(p float64) float64 { return -2 / (mu * mu * V(p)) },
			efolds: func(p float64) float64 { return -mu*mu/2*math.Log(p) + p*p/4 },
			endLo:  1e-6 * mu, endHi: mu * (1 - 1e-12),
		}
	}
	br := func(mu, q float64) closedForm {
		V := func(p float64) float64 { return 1 - math.Pow(mu/p, q) }
		return closedForm{
			eps: func(p float64) float64 {
				v := V(p)
				return q * q * math.Pow(mu/p, 2*q) / (2 * p * p * v * v)
			},
			eta:    func(p float64) float64 { return -q * (q + 1) * math.Pow(mu/p, q) / (p * p * V(p)) },
			efolds: func(p float64) float64 { return p * p * (math.Pow(p/mu, q)/(q+2) - 0.5) / q },
			endLo:  mu * (1 + 1e-12), endHi: mu + 100,
		}
	}
	ex := func(q float64) closedForm {
		return closedForm{
			eps:    func(p float64) float64 { E := math.Exp(-q * p); v := 1 - E; return q * q * E * E / (2 * v * v) },
			eta:    func(p float64) float64 { E := math.Exp(-q * p); return -q * q * E / (1 - E) },
			efolds: func(p float64) float64 { return (math.Exp(q*p) - q*p) / (q * q) },
			endLo:  1e-9 / q, endHi: 50 / q,
		}
	}
	lp := func(a float64) closedForm {
		V := func(p float64) float64 { return 1 + a*math.Log(p) }
		return closedForm{
			eps:    func(p float64) float64 { v := V(p); return a * a / (2 * p * p * v * v) },
			eta:    func(p float64) float64 { return -a / (p * p * V(p)) },
			efolds: func(p float64) float64 { return p*p/(2*a) + p*p/2*(math.Log(p)-0.5) },
			endLo:  math.Exp(-1/a) * (1 + 1e-9), endHi: 100,
		}
	}
	rg := func(a float64) closedForm {
		return closedForm{
			eps:    func(p float64) float64 { D := a + p*p; return 2 * a * a / (p * p * D * D) },
			eta:    func(p float64) float64 { D := a + p*p; return 2 * a * (a - 3*p*p) / (p * p * D * D) },
			efolds: func(p float64) float64 { return p*p/4 + p*p*p*p/(8*a) },
			endLo:  1e-9, endHi: 100,
		}
	}
	for _, c := range []struct {
		family string
		params map[string]float64
		cf     closedForm
	}{
		{"hilltop-quartic", map[string]float64{"mu": 0.01}, hq(0.01)},
		{"hilltop-quartic", map[string]float64{"mu": 1}, hq(1)},
		{"hilltop-quartic", map[string]float64{"mu": 12}, hq(12)},
		{"hilltop-quadratic", map[string]float64{"mu": 15}, hq2(15)},
		{"brane", map[string]float64{"mu": 0.01}, br(0.01, 4)},
		{"brane", map[string]float64{"mu": 1}, br(1, 4)},
		{"brane", map[string]float64{"mu": 5, "p": 2}, br(5, 2)},
		{"brane", map[string]float64{"mu": 0.3, "p": 6}, br(0.3, 6)},
		{"exponential-plateau", map[string]float64{"q": 0.1}, ex(0.1)},
		{"exponential-plateau", map[string]float64{"q": 0.816}, ex(0.816)},
		{"exponential-plateau", map[string]float64{"q": 5}, ex(5)},
		{"loop", map[string]float64{"alpha": 0.01}, lp(0.01)},
		{"loop", map[string]float64{"alpha": 1}, lp(1)},
		{"radion-assisted-gauge", map[string]float64{"alpha": 1e-3}, rg(1e-3)},
		{"radion-assisted-gauge", map[string]float64{"alpha": 1}, rg(1)},
		{"radion-assisted-gauge", map[string]float64{"alpha": 100}, rg(100)},
	} {
		c.cf.check(t, build(t, c.family, c.params))
	}
}

// TestHiggsClosedFormSlowRoll: the Higgs model's first-order slow roll in
// the Jordan-frame field h, derived here from V = h^4/Omega^4,
// K = (Omega^2 + 6 xi^2 h^2)/Omega^4 (Bezrukov & Shaposhnikov 2008,
// arXiv:0710.3755), u = xi h^2:
//
//	epsilon_V = 8/(h^2 (1 + u + 6 xi u)),
//	N(h) = (1 + 6 xi) h^2/8 - (3/4) ln(1 + u) + const,
//	eta_V = (V_hh/K - V_h K_h/(2K^2))/V,
//
// end at (xi + 6 xi^2) h^4 + h^2 - 8 = 0. The model maps phi to h
// numerically (Native.FromCanonical); the closed forms are evaluated at
// that h. Tolerances: the end and h* to 1e-12 relative, n_s and r to 1e-9.
func TestHiggsClosedFormSlowRoll(t *testing.T) {
	for _, xi := range []float64{1e-2, 1, 1e2, 1e4, 1e6} {
		m := build(t, "higgs", map[string]float64{"xi": xi})
		sol := solve(t, m)
		a := xi + 6*xi*xi
		hEnd := math.Sqrt((-1 + math.Sqrt(1+32*a)) / (2 * a))
		if h := m.Native.FromCanonical(sol.End.Phi); !near(h, hEnd, 1e-12, 0) {
			t.Errorf("xi=%g: end at h = %.17g, closed form %.17g", xi, h, hEnd)
		}
		efolds := func(h float64) float64 { return (1+6*xi)*h*h/8 - 0.75*math.Log1p(xi*h*h) }
		for _, N := range []float64{50, 60} {
			h := bisect(func(h float64) float64 { return efolds(h) - efolds(hEnd) - N }, hEnd, 1e3)
			p, o := evaluate(t, sol, N)
			if hm := m.Native.FromCanonical(p.Phi); !near(hm, h, 1e-11, 0) {
				t.Errorf("xi=%g N=%g: h* = %.17g, closed form %.17g", xi, N, hm, h)
			}
			u := xi * h * h
			q := 1 + u
			V := h * h * h * h / (q * q)
			Vh := 4 * h * h * h / (q * q * q)
			Vhh := 12 * h * h * (1 - u) / (q * q * q * q)
			K := (1 + (1+6*xi)*u) / (q * q)
			Kh := 2 * xi * h * (6*xi - 1 - (1+6*xi)*u) / (q * q * q)
			eps := 8 / (h * h * (1 + u + 6*xi*u))
			eta := (Vhh/K - Vh*Kh/(2*K*K)) / V
			if !near(o.Ns, 1-6*eps+2*eta, 1e-9, 0) || !near(o.R, 16*eps, 1e-9, 0) {
				t.Errorf("xi=%g N=%g: (n_s, r) = (%.15g, %.15g), closed form (%.15g, %.15g)", xi, N, o.Ns, o.R, 1-6*eps+2*eta, 16*eps)
			}
		}
	}
}

// slowrollAt returns epsilon_V just inside the lower end of the range.
func slowrollAt(m *model.Model, phi float64) float64 {
	return slowroll.At(m, phi+1e-9*(m.Hi-m.Lo)).Epsilon
}
