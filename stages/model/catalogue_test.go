package model

import (
	"math"
	"strconv"
	"testing"
)

// jetOf evaluates the model's potential and its derivatives at phi.
func jetOf(m *Model, phi float64) [4]float64 {
	j := m.At(phi)
	return [4]float64{j.V, j.D1, j.D2, j.D3}
}

// checkDerivs compares V, V', V”, V”' with hand-written values, to a
// relative tol (plus abs for values that vanish).
func checkDerivs(t *testing.T, what string, got, want [4]float64, tol, abs float64) {
	t.Helper()
	for k := range got {
		if !within(got[k], want[k], tol, abs) {
			t.Errorf("%s: derivative %d = %.17g, want %.17g", what, k, got[k], want[k])
		}
	}
}

// TestCatalogueDerivatives checks V and its first three derivatives of the
// catalogue's new families, written with jets, against derivatives of the
// published potentials differentiated by hand (derived here; each formula
// beside its family):
//   - hilltop p = 2, 4: Boubekeur & Lyth 2005, hep-ph/0502047;
//   - Coleman–Weinberg 1 + x^4 (4 ln x - 1), x = phi/v: V' = 16 x^3 ln x/v,
//     V” = (48 x^2 ln x + 16 x^2)/v^2, V”' = (96 x ln x + 80 x)/v^3
//     (Coleman & Weinberg 1973, PRD 7, 1888);
//   - brane 1 - mu^p phi^-p: p mu^p phi^(-p-1), -p(p+1) mu^p phi^(-p-2),
//     p(p+1)(p+2) mu^p phi^(-p-3) (Kachru et al. 2003, hep-th/0308055);
//   - exponential plateau 1 - e^(-q phi): q E, -q^2 E, q^3 E with
//     E = e^(-q phi) (Stewart 1995, hep-ph/9405389);
//   - loop 1 + alpha ln phi: alpha/phi, -alpha/phi^2, 2 alpha/phi^3 (Dvali,
//     Shafi & Schaefer 1994, hep-ph/9406319);
//   - radion-assisted gauge phi^2/D, D = alpha + phi^2: 2 alpha phi/D^2,
//     2 alpha (alpha - 3 phi^2)/D^3, -24 alpha phi (alpha - phi^2)/D^4
//     (Fairbairn, Lopez Honorez & Tytgat 2003, hep-ph/0302160);
//   - two-plateau e^(-2 gamma)(e^w - 1), w = gamma (1 + tanh u),
//     u = phi/s, s = sqrt(6 alpha): with T = tanh u, S = sech^2 u,
//     w' = gamma S/s, w” = -2 gamma S T/s^2, w”' = gamma S (6 T^2 - 2)/s^3
//     (w itself as 2 gamma/(1 + e^(-2u)), which does not cancel on the tail),
//     V' = c e^w w', V” = c e^w (w'^2 + w”), V”' = c e^w (w'^3 + 3 w' w” + w”')
//     with c = e^(-2 gamma) (Akrami, Kallosh, Linde & Vardanyan 2018,
//     arXiv:1712.09693).
//
// Tolerance: relative 1e-12 (a handful of roundings through the jets and
// through the different forms: the jets use 2 gamma/(1 + e^(-2u)) for
// gamma (1 + tanh u), the Coleman–Weinberg jets the series of
// 1 - (1 - t) e^t near the minimum).
func TestCatalogueDerivatives(t *testing.T) {
	type row struct {
		family string
		params map[string]float64
		phis   []float64
		want   func(phi float64) [4]float64
	}
	hill := func(mu, p float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			mp := math.Pow(mu, p)
			return [4]float64{1 - math.Pow(phi, p)/mp, -p * math.Pow(phi, p-1) / mp, -p * (p - 1) * math.Pow(phi, p-2) / mp, -p * (p - 1) * (p - 2) * math.Pow(phi, p-3) / mp}
		}
	}
	cw := func(v float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			x := phi / v
			L := math.Log(x)
			return [4]float64{1 + x*x*x*x*(4*L-1), 16 * x * x * x * L / v, (48*x*x*L + 16*x*x) / (v * v), (96*x*L + 80*x) / (v * v * v)}
		}
	}
	br := func(mu, p float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			m := math.Pow(mu, p)
			return [4]float64{1 - m*math.Pow(phi, -p), p * m * math.Pow(phi, -p-1), -p * (p + 1) * m * math.Pow(phi, -p-2), p * (p + 1) * (p + 2) * m * math.Pow(phi, -p-3)}
		}
	}
	ex := func(q float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			E := math.Exp(-q * phi)
			return [4]float64{1 - E, q * E, -q * q * E, q * q * q * E}
		}
	}
	lp := func(a float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			return [4]float64{1 + a*math.Log(phi), a / phi, -a / (phi * phi), 2 * a / (phi * phi * phi)}
		}
	}
	rg := func(a float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			D := a + phi*phi
			return [4]float64{phi * phi / D, 2 * a * phi / (D * D), 2 * a * (a - 3*phi*phi) / (D * D * D), -24 * a * phi * (a - phi*phi) / (D * D * D * D)}
		}
	}
	tp := func(alpha, gamma float64) func(float64) [4]float64 {
		s := math.Sqrt(6 * alpha)
		return func(phi float64) [4]float64 {
			u := phi / s
			T := math.Tanh(u)
			c := math.Cosh(u)
			S := 1 / (c * c)
			w := 2 * gamma / (1 + math.Exp(-2*u)) // gamma (1 + tanh u), without its cancellation on the tail
			w1, w2, w3 := gamma*S/s, -2*gamma*S*T/(s*s), gamma*S*(6*T*T-2)/(s*s*s)
			ce := math.Exp(-2*gamma) * math.Exp(w)
			return [4]float64{math.Exp(-2*gamma) * math.Expm1(w), ce * w1, ce * (w1*w1 + w2), ce * (w1*w1*w1 + 3*w1*w2 + w3)}
		}
	}
	rows := []row{
		{"hilltop-quadratic", map[string]float64{"mu": 10}, []float64{0.5, 4, 9}, hill(10, 2)},
		{"hilltop-quartic", map[string]float64{"mu": 0.5}, []float64{0.05, 0.2, 0.45}, hill(0.5, 4)},
		{"hilltop-quartic", map[string]float64{"mu": 20}, []float64{1, 10, 19}, hill(20, 4)},
		{"coleman-weinberg", map[string]float64{"v": 10}, []float64{0.3, 5, 8.7, 9.9}, cw(10)},
		{"coleman-weinberg", map[string]float64{"v": 0.01}, []float64{1e-5, 7e-4, 5e-3}, cw(0.01)},
		{"brane", map[string]float64{"mu": 1}, []float64{1.1, 2, 5}, br(1, 4)},
		{"brane", map[string]float64{"mu": 0.02, "p": 2}, []float64{0.03, 0.1, 0.3}, br(0.02, 2)},
		{"brane", map[string]float64{"mu": 3, "p": 1.5}, []float64{3.5, 10}, br(3, 1.5)},
		{"exponential-plateau", map[string]float64{"q": 0.816}, []float64{0.2, 3, 9}, ex(0.816)},
		{"exponential-plateau", map[string]float64{"q": 10}, []float64{0.05, 0.5, 1.2}, ex(10)},
		{"loop", map[string]float64{"alpha": 0.01}, []float64{0.008, 0.5, 3}, lp(0.01)},
		{"loop", map[string]float64{"alpha": 2}, []float64{0.7, 2, 20}, lp(2)},
		{"radion-assisted-gauge", map[string]float64{"alpha": 1}, []float64{0.3, 1, 5, 15}, rg(1)},
		{"radion-assisted-gauge", map[string]float64{"alpha": 1e-3}, []float64{0.01, 0.1, 0.5}, rg(1e-3)},
		{"two-plateau", map[string]float64{"alpha": 7.0 / 3, "gamma": 125}, []float64{-30, -5, 0, 4, 9, 20}, tp(7.0/3, 125)},
		{"two-plateau", map[string]float64{"alpha": 0.5, "gamma": 10}, []float64{-10, -1, 0.5, 3, 8}, tp(0.5, 10)},
	}
	for _, r := range rows {
		m := mustNew(t, r.family, r.params)
		for _, phi := range r.phis {
			checkDerivs(t, m.Describe()+" at phi="+ftoa(phi), jetOf(m, phi), r.want(phi), 1e-12, 1e-300)
		}
	}
}

func ftoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// TestCatalogueIdentities: the new names that are old potentials are the
// same functions (derived here from the formulas):
//   - hilltop-quadratic and hilltop-quartic are hilltop with p = 2 and 4,
//     to the bit (same operations);
//   - exponential-plateau with q is the e-model with n = 1/2 and
//     alpha = 2/(3 q^2) (Kallosh, Linde & Roest 2013, arXiv:1311.0472),
//     to 1e-14 relative (alpha -> q round-trips through a square root, and
//     the two compute 1 - e^(-q phi) differently);
//   - brane with p = 2 and mu^2 = alpha is, for phi^2 >> alpha, 1 - alpha/phi^2,
//     and radion-assisted gauge is 1 - alpha/(alpha + phi^2): their difference is
//     alpha^2/(phi^2 (alpha + phi^2)) (derived here), checked to 4e-16
//     absolute (two values near 1 subtracted).
func TestCatalogueIdentities(t *testing.T) {
	for _, c := range []struct {
		name string
		p    float64
		mu   float64
	}{{"hilltop-quadratic", 2, 7}, {"hilltop-quartic", 4, 0.3}} {
		a := mustNew(t, c.name, map[string]float64{"mu": c.mu})
		b := mustNew(t, "hilltop", map[string]float64{"mu": c.mu, "p": c.p})
		for _, phi := range []float64{0.01 * c.mu, 0.5 * c.mu, 0.99 * c.mu} {
			if a.At(phi) != b.At(phi) {
				t.Errorf("%s at %g: %v, hilltop p=%g: %v", c.name, phi, a.At(phi), c.p, b.At(phi))
			}
		}
	}
	for _, q := range []float64{0.1, 0.816, 3} {
		a := mustNew(t, "exponential-plateau", map[string]float64{"q": q})
		b := mustNew(t, "e-model", map[string]float64{"alpha": 2 / (3 * q * q), "n": 0.5})
		for _, phi := range []float64{0.05 / q, 1 / q, 10 / q} {
			checkDerivs(t, "exponential-plateau vs e-model", jetOf(a, phi), jetOf(b, phi), 1e-14, 0)
		}
	}
	const alpha = 0.04
	rg := mustNew(t, "radion-assisted-gauge", map[string]float64{"alpha": alpha})
	br := mustNew(t, "brane", map[string]float64{"mu": math.Sqrt(alpha), "p": 2})
	for _, phi := range []float64{0.5, 2, 10} {
		if d, want := br.At(phi).V-rg.At(phi).V, -alpha*alpha/(phi*phi*(alpha+phi*phi)); !within(d, want, 0, 4e-16) {
			t.Errorf("brane - radion-assisted gauge at %g = %g, want %g", phi, d, want)
		}
	}
}

// TestDomainGuards: outside their field domain, where the formulas turn
// into another branch or a negative potential, the new families return NaN
// (so no search strays there); inside the range they are finite.
func TestDomainGuards(t *testing.T) {
	for _, c := range []struct {
		family  string
		params  map[string]float64
		outside []float64
	}{
		{"hilltop-quadratic", map[string]float64{"mu": 10}, []float64{-1, 10.5}},
		{"hilltop-quartic", map[string]float64{"mu": 1}, []float64{1.01}},
		{"coleman-weinberg", map[string]float64{"v": 10}, []float64{-1, 11.6}},
		{"brane", map[string]float64{"mu": 1}, []float64{0.5}},
		{"exponential-plateau", map[string]float64{"q": 1}, []float64{-0.1}},
		{"loop", map[string]float64{"alpha": 1}, []float64{0.3}},
		{"radion-assisted-gauge", map[string]float64{"alpha": 1}, []float64{-2}},
	} {
		m := mustNew(t, c.family, c.params)
		for _, phi := range c.outside {
			if j := m.At(phi); !math.IsNaN(j.V) || !math.IsNaN(j.D1) {
				t.Errorf("%s at %g (outside): %v, want NaN", m.Describe(), phi, j)
			}
		}
		for _, f := range []float64{1e-6, 0.5, 1 - 1e-6} {
			phi := m.Lo + (m.Hi-m.Lo)*f
			if j := m.At(phi); math.IsNaN(j.V) || math.IsInf(j.D1, 0) {
				t.Errorf("%s at %g (inside): %v", m.Describe(), phi, j)
			}
		}
	}
}

// TestTwoPlateauTail: towards phi -> -inf the two-plateau potential is
// the exponential 2 gamma e^(-2 gamma) e^(lambda phi) with
// lambda = sqrt(2/(3 alpha)) (from 1 + tanh u ≈ 2 e^(2u), derived here),
// so d ln V/dphi -> lambda and epsilon_V -> lambda^2/2 = 1/(3 alpha): the
// exponent behind the asymptotic w = -1 + lambda^2/3 (Akrami, Kallosh,
// Linde & Vardanyan 2018, arXiv:1712.09693). At u = -12 the corrections
// are O(gamma e^(2u)) ~ 1e-8 for gamma = 125; tolerance 1e-6.
func TestTwoPlateauTail(t *testing.T) {
	for _, alpha := range []float64{0.5, 1, 7.0 / 3, 5} {
		m := mustNew(t, "two-plateau", map[string]float64{"alpha": alpha, "gamma": 125})
		s := math.Sqrt(6 * alpha)
		lambda := math.Sqrt(2 / (3 * alpha))
		phi := -12 * s
		j := m.At(phi)
		if !within(j.D1/j.V, lambda, 1e-6, 0) {
			t.Errorf("alpha=%g: d ln V/dphi on the tail = %.10g, want lambda = %.10g", alpha, j.D1/j.V, lambda)
		}
		if want := 2 * 125 * math.Exp(-250) * math.Exp(lambda*phi); !within(j.V, want, 1e-6, 0) {
			t.Errorf("alpha=%g: V on the tail = %g, want %g", alpha, j.V, want)
		}
		// The upper plateau: V -> 1 - e^(-2 gamma) = 1 at float64 precision.
		if v := m.At(40 * s).V; v != 1 {
			t.Errorf("alpha=%g: plateau V = %.17g, want 1", alpha, v)
		}
	}
}

// TestAsymptoticW: the two-plateau family's asymptotic equation of state
// w = -1 + 2/(9 alpha) (Akrami, Kallosh, Linde & Vardanyan 2018,
// arXiv:1712.09693, abstract) and its value -1 + 2/21 = -0.9048 for
// alpha = 7/3 (the abstract's example; the arithmetic to four decimals,
// 5e-5). Where lambda^2 = 2/(3 alpha) >= 6 (alpha <= 1/9) there
// is no scalar-dominated attractor (Copeland, Liddle & Wands 1998,
// gr-qc/9711068, from memory) and ok is false.
func TestAsymptoticW(t *testing.T) {
	f, err := Lookup("two-plateau")
	if err != nil {
		t.Fatal(err)
	}
	m := mustNew(t, "two-plateau", map[string]float64{"alpha": 7.0 / 3, "gamma": 125})
	w, ok := f.AsymptoticW(m.Params)
	if !ok || math.Abs(w-(-0.9048)) > 5e-5 {
		t.Errorf("alpha=7/3: w = %.6f (ok %v), -1 + 2/(9 alpha) = -0.9048", w, ok)
	}
	for _, alpha := range []float64{0.2, 1, 3, 100} {
		w, ok := f.AsymptoticW(map[string]float64{"alpha": alpha, "gamma": 50})
		if !ok || !within(w, -1+2/(9*alpha), 0, 1e-15) {
			t.Errorf("alpha=%g: w = %g (ok %v), want %g", alpha, w, ok, -1+2/(9*alpha))
		}
	}
	for _, alpha := range []float64{1.0 / 9, 0.05} {
		if w, ok := f.AsymptoticW(map[string]float64{"alpha": alpha, "gamma": 50}); ok {
			t.Errorf("alpha=%g: w = %g reported, want no attractor", alpha, w)
		}
	}
}
