package model

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

func within(got, want, rel, abs float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

func mustNew(t testing.TB, family string, p map[string]float64) *Model {
	t.Helper()
	f, err := Lookup(family)
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// tanhPower returns d^k/du^k of tanh^m(u), k = 0..3, with T = tanh u and
// S = sech^2 u, using dT/du = S and dS/du = -2 T S (derived here):
//
//	m T^(m-1) S,
//	m T^(m-2) S ((m-1) S - 2 T^2),
//	m(m-1)(m-2) T^(m-3) S^3 - (4m(m-1) + 2m^2) T^(m-1) S^2 + 4m T^(m+1) S.
func tanhPower(u, m float64) [4]float64 {
	T := math.Tanh(u)
	c := math.Cosh(u)
	S := 1 / (c * c)
	p := func(k float64) float64 { return math.Pow(T, k) }
	return [4]float64{
		p(m),
		m * p(m-1) * S,
		m * p(m-2) * S * ((m-1)*S - 2*T*T),
		m*(m-1)*(m-2)*p(m-3)*S*S*S - (4*m*(m-1)+2*m*m)*p(m-1)*S*S + 4*m*p(m+1)*S,
	}
}

// plateauPower returns d^k/dphi^k of (1 - e^(-b phi))^m, with w = 1 - E,
// E = e^(-b phi) (derived here):
//
//	m w^(m-1) b E,
//	b^2 (m(m-1) w^(m-2) E^2 - m w^(m-1) E),
//	b^3 (m(m-1)(m-2) w^(m-3) E^3 - 3m(m-1) w^(m-2) E^2 + m w^(m-1) E).
func plateauPower(phi, b, m float64) [4]float64 {
	E := math.Exp(-b * phi)
	w := 1 - E
	p := func(k float64) float64 { return math.Pow(w, k) }
	return [4]float64{
		p(m),
		m * p(m-1) * b * E,
		b * b * (m*(m-1)*p(m-2)*E*E - m*p(m-1)*E),
		b * b * b * (m*(m-1)*(m-2)*p(m-3)*E*E*E - 3*m*(m-1)*p(m-2)*E*E + m*p(m-1)*E),
	}
}

// TestFamiliesAgainstAnalyticDerivatives checks V and its first three
// derivatives for every family, written with jets, against derivatives
// differentiated by hand from the published potentials:
//   - t-model tanh^(2n)(phi/sqrt(6 alpha)) and e-model
//     (1 - exp(-sqrt(2/(3 alpha)) phi))^(2n): Kallosh & Linde 2013,
//     arXiv:1306.5220; Kallosh, Linde & Roest 2013, arXiv:1311.0472;
//   - Starobinsky (1 - exp(-sqrt(2/3) phi))^2: Starobinsky 1980, PLB 91, 99
//     (its Einstein-frame form with the reduced Planck mass: common practice);
//   - power law phi^p: Linde 1983, PLB 129, 177;
//   - natural 1 + cos(phi/f): Freese, Frieman & Olinto 1990, PRL 65, 3233;
//   - hilltop 1 - (phi/mu)^p: Boubekeur & Lyth 2005, hep-ph/0502047.
//
// Tolerance: relative 1e-13 (a handful of roundings through the jet
// arithmetic; the two sides are computed in different orders).
func TestFamiliesAgainstAnalyticDerivatives(t *testing.T) {
	type row struct {
		family string
		params map[string]float64
		want   func(phi float64) [4]float64
		phis   []float64
	}
	tm := func(alpha, n float64) func(float64) [4]float64 {
		s := math.Sqrt(6 * alpha)
		return func(phi float64) [4]float64 {
			d := tanhPower(phi/s, 2*n)
			return [4]float64{d[0], d[1] / s, d[2] / (s * s), d[3] / (s * s * s)}
		}
	}
	em := func(alpha, n float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 { return plateauPower(phi, math.Sqrt(2/(3*alpha)), 2*n) }
	}
	pl := func(p float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			return [4]float64{math.Pow(phi, p), p * math.Pow(phi, p-1), p * (p - 1) * math.Pow(phi, p-2), p * (p - 1) * (p - 2) * math.Pow(phi, p-3)}
		}
	}
	nat := func(f float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			x := phi / f
			return [4]float64{1 + math.Cos(x), -math.Sin(x) / f, -math.Cos(x) / (f * f), math.Sin(x) / (f * f * f)}
		}
	}
	ht := func(mu, p float64) func(float64) [4]float64 {
		return func(phi float64) [4]float64 {
			mp := math.Pow(mu, p)
			return [4]float64{1 - math.Pow(phi, p)/mp, -p * math.Pow(phi, p-1) / mp, -p * (p - 1) * math.Pow(phi, p-2) / mp, -p * (p - 1) * (p - 2) * math.Pow(phi, p-3) / mp}
		}
	}
	rows := []row{
		{"t-model", map[string]float64{"alpha": 1}, tm(1, 1), []float64{0.3, 1, 3, 8}},
		{"t-model", map[string]float64{"alpha": 7.0 / 3, "n": 2}, tm(7.0/3, 2), []float64{0.3, 1, 3, 8}},
		{"t-model", map[string]float64{"alpha": 0.1, "n": 1.5}, tm(0.1, 1.5), []float64{0.1, 0.5, 1.5}},
		{"e-model", map[string]float64{"alpha": 1}, em(1, 1), []float64{0.3, 1, 3, 8}},
		{"e-model", map[string]float64{"alpha": 1.0 / 3, "n": 2}, em(1.0/3, 2), []float64{0.3, 1, 3, 8}},
		{"e-model", map[string]float64{"alpha": 50, "n": 0.75}, em(50, 0.75), []float64{0.5, 5, 30}},
		{"starobinsky", nil, em(1, 1), []float64{0.3, 1, 5.5, 12}},
		{"power-law", map[string]float64{"p": 2}, pl(2), []float64{0.5, 3, 15}},
		{"power-law", map[string]float64{"p": 2.0 / 3}, pl(2.0 / 3), []float64{0.5, 3, 15}},
		{"power-law", map[string]float64{"p": 4}, pl(4), []float64{0.5, 3, 15}},
		{"natural", map[string]float64{"f": 5}, nat(5), []float64{0.2, 4, 12}},
		{"hilltop", map[string]float64{"mu": 10}, ht(10, 2), []float64{0.5, 4, 9}},
		{"hilltop", map[string]float64{"mu": 0.5, "p": 4}, ht(0.5, 4), []float64{0.05, 0.2, 0.45}},
	}
	for _, r := range rows {
		m := mustNew(t, r.family, r.params)
		for _, phi := range r.phis {
			j := m.At(phi)
			w := r.want(phi)
			for k, g := range [4]float64{j.V, j.D1, j.D2, j.D3} {
				abs := 0.0
				if w[k] == 0 {
					abs = 1e-15
				}
				if !within(g, w[k], 1e-13, abs) {
					t.Errorf("%s at phi=%g: derivative %d = %.17g, want %.17g", m.Describe(), phi, k, g, w[k])
				}
			}
		}
	}
}

// TestNativePotentials checks the native-field potentials and their
// derivatives: t-model (chi^2/(6 alpha))^n on the disk and e-model
// (1 - 1/y)^(2n) on the half-plane (Kallosh, Linde & Roest 2013,
// arXiv:1311.0472; derivatives by hand), and that V(x) equals V(phi(x)).
func TestNativePotentials(t *testing.T) {
	for _, c := range []struct {
		family string
		alpha  float64
		n      float64
		xs     []float64
		want   func(alpha, n, x float64) [4]float64
	}{
		{"t-model", 1, 1, []float64{0.1, 1, 2.2}, func(a, n, x float64) [4]float64 {
			// (x^2/c)^n with c = 6 alpha: 2n x^(2n-1)/c^n, ...
			c := math.Pow(6*a, n)
			m := 2 * n
			return [4]float64{math.Pow(x, m) / c, m * math.Pow(x, m-1) / c, m * (m - 1) * math.Pow(x, m-2) / c, m * (m - 1) * (m - 2) * math.Pow(x, m-3) / c}
		}},
		{"t-model", 2, 1.5, []float64{0.1, 1, 3.3}, func(a, n, x float64) [4]float64 {
			c := math.Pow(6*a, n)
			m := 2 * n
			return [4]float64{math.Pow(x, m) / c, m * math.Pow(x, m-1) / c, m * (m - 1) * math.Pow(x, m-2) / c, m * (m - 1) * (m - 2) * math.Pow(x, m-3) / c}
		}},
		{"e-model", 1, 1, []float64{1.5, 4, 100}, func(a, n, y float64) [4]float64 {
			// (1 - 1/y)^2 = 1 - 2/y + 1/y^2.
			return [4]float64{1 - 2/y + 1/(y*y), 2/(y*y) - 2/(y*y*y), -4/(y*y*y) + 6/(y*y*y*y), 12/(y*y*y*y) - 24/(y*y*y*y*y)}
		}},
	} {
		m := mustNew(t, c.family, map[string]float64{"alpha": c.alpha, "n": c.n})
		nf := m.Native
		if nf == nil {
			t.Fatalf("%s has no native field", m.Describe())
		}
		for _, x := range c.xs {
			j := nf.V(num.Var(x))
			w := c.want(c.alpha, c.n, x)
			for k, g := range [4]float64{j.V, j.D1, j.D2, j.D3} {
				if !within(g, w[k], 1e-13, 1e-15) {
					t.Errorf("%s native %s=%g: derivative %d = %.17g, want %.17g", m.Describe(), nf.Name, x, k, g, w[k])
				}
			}
			if v := m.At(nf.ToCanonical(x)).V; !within(v, j.V, 1e-12, 0) {
				t.Errorf("%s: V(%s=%g) = %.17g but V(phi(x)) = %.17g", m.Describe(), nf.Name, x, j.V, v)
			}
		}
	}
}

// TestEModelAlphaOneIsStarobinsky: the E-model with alpha = 1, n = 1 is the
// Starobinsky potential (Kallosh, Linde & Roest 2013, arXiv:1311.0472).
// Both are built from the same operations, so they agree to rounding.
func TestEModelAlphaOneIsStarobinsky(t *testing.T) {
	e := mustNew(t, "e-model", map[string]float64{"alpha": 1})
	s := mustNew(t, "starobinsky", nil)
	for _, phi := range []float64{0.1, 0.94, 2, 5.5, 10, 30} {
		a, b := e.At(phi), s.At(phi)
		for k, pair := range [][2]float64{{a.V, b.V}, {a.D1, b.D1}, {a.D2, b.D2}, {a.D3, b.D3}} {
			if !within(pair[0], pair[1], 1e-15, 0) {
				t.Errorf("phi=%g derivative %d: e-model %.17g, starobinsky %.17g", phi, k, pair[0], pair[1])
			}
		}
	}
}

// TestLargeAlphaApproachesMonomial: for alpha -> infinity at fixed phi both
// alpha-attractor potentials tend to the monomial phi^(2n) (Kallosh, Linde
// & Roest 2013, arXiv:1311.0472: large alpha gives chaotic inflation). The
// shape V(phi)/V(phi_ref) approaches (phi/phi_ref)^(2n); the deviation falls
// like 1/alpha for the t-model (tanh u = u - u^3/3 + ...) and like
// 1/sqrt(alpha) for the e-model (1 - e^(-u) = u - u^2/2 + ...).
func TestLargeAlphaApproachesMonomial(t *testing.T) {
	const phi, ref = 3.0, 1.0
	for _, c := range []struct {
		family string
		n      float64
		// shrink is the least factor by which the deviation must fall per
		// factor 100 in alpha: asymptotically 100 and 10; the margin covers
		// the first step, alpha = 1e2 -> 1e4, not yet asymptotic (8.5 for
		// the e-model with n = 2).
		shrink float64
	}{
		{"t-model", 1, 90}, {"t-model", 2, 90}, {"e-model", 1, 7}, {"e-model", 2, 7},
	} {
		prev := math.Inf(1)
		for _, alpha := range []float64{1e2, 1e4, 1e6, 1e8} {
			m := mustNew(t, c.family, map[string]float64{"alpha": alpha, "n": c.n})
			shape := m.At(phi).V / m.At(ref).V
			want := math.Pow(phi/ref, 2*c.n)
			dev := math.Abs(shape/want - 1)
			if dev*c.shrink > prev {
				t.Errorf("%s n=%g alpha=%g: deviation %.3g did not fall by %g from %.3g", c.family, c.n, alpha, dev, c.shrink, prev)
			}
			prev = dev
		}
		if prev > 1e-3 {
			t.Errorf("%s n=%g: deviation from phi^(2n) at alpha=1e8 is %.3g, want < 1e-3", c.family, c.n, prev)
		}
	}
}

// TestFieldRanges: inflation needs the range to cover the plateau; the
// canonical map's domain must match the field range (disk radius sqrt(6
// alpha): Kallosh, Linde & Roest 2013, arXiv:1311.0472; Ferrara & Kallosh
// 2016, arXiv:1610.04163, disk radius^2 = 3 alpha in their units).
func TestFieldRanges(t *testing.T) {
	for _, alpha := range []float64{1e-2, 1.0 / 3, 1, 7.0 / 3, 1e2} {
		m := mustNew(t, "t-model", map[string]float64{"alpha": alpha})
		s := math.Sqrt(6 * alpha)
		if m.Native.Lo != -s || m.Native.Hi != s {
			t.Errorf("t-model alpha=%g: disk (%g, %g), want (-%g, %g)", alpha, m.Native.Lo, m.Native.Hi, s, s)
		}
		if !(m.Hi > 7*s) {
			t.Errorf("t-model alpha=%g: range up to %g does not reach the plateau (7 sqrt(6 alpha) = %g)", alpha, m.Hi, 7*s)
		}
	}
	m := mustNew(t, "natural", map[string]float64{"f": 5})
	if !within(m.Hi, 5*math.Pi, 1e-15, 0) {
		t.Errorf("natural f=5: range up to %g, want the minimum at pi f", m.Hi)
	}
	h := mustNew(t, "hilltop", map[string]float64{"mu": 3})
	if h.Hi != 3 {
		t.Errorf("hilltop mu=3: range up to %g, want mu", h.Hi)
	}
}

// BenchmarkJetEModel times one evaluation of V and three derivatives of the
// e-model (alpha = 1) at phi = 5.
func BenchmarkJetEModel(b *testing.B) {
	m := mustNew(b, "e-model", map[string]float64{"alpha": 1})
	var sink num.Jet
	for i := 0; i < b.N; i++ {
		sink = m.At(5 + 1e-9*float64(i&7))
	}
	_ = sink
}
