package kinetic

import (
	"math"
	"reflect"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// TestXJetAgainstAnalyticMaps: XJet's derivatives, which come from K's jet,
// against the derivatives of the analytic maps (Kallosh, Linde & Roest
// 2013, arXiv:1311.0472), differentiated by hand (derived here):
//
//	disk, chi = s tanh u, u = phi/s: chi' = sech^2 u,
//	  chi'' = -(2/s) sech^2 u tanh u, chi''' = (2/s^2) sech^2 u (3 tanh^2 u - 1);
//	half-plane, y = e^(b phi): y^(k) = b^k y.
//
// Tolerance 1e-10 relative to max(1, |value|) (the brief's target; the
// measured deviations are about 1e-15, logged).
func TestXJetAgainstAnalyticMaps(t *testing.T) {
	for _, alpha := range []float64{1e-2, 1, 7.0 / 3, 1e2} {
		s := math.Sqrt(6 * alpha)
		disk := mustMap(t, diskK(alpha), 0, -s, s, nil)
		b := math.Sqrt(2 / (3 * alpha))
		half := mustMap(t, halfPlaneK(alpha), 1, 0, math.Inf(1), nil)
		worst := 0.0
		for _, u := range []float64{-6, -3, -1, -0.2, 0, 0.37, 1, 2.5, 5, 8} {
			T := math.Tanh(u)
			c := math.Cosh(u)
			S := 1 / (c * c)
			checks := []struct {
				name string
				got  num.Jet
				want [4]float64
			}{
				{"disk", disk.XJet(num.Var(u * s)), [4]float64{s * T, S, -2 / s * S * T, 2 / (s * s) * S * (3*T*T - 1)}},
				{"half-plane", half.XJet(num.Var(u / b)), func() [4]float64 {
					y := math.Exp(u)
					return [4]float64{y, b * y, b * b * y, b * b * b * y}
				}()},
			}
			for _, ch := range checks {
				for k, g := range [4]float64{ch.got.V, ch.got.D1, ch.got.D2, ch.got.D3} {
					w := ch.want[k]
					d := math.Abs(g-w) / math.Max(1, math.Abs(w))
					worst = math.Max(worst, d)
					if d > 1e-10 {
						t.Errorf("%s alpha=%g u=%g: derivative %d = %.17g, want %.17g", ch.name, alpha, u, k, g, w)
					}
				}
			}
		}
		t.Logf("alpha=%g: max relative deviation of x and its derivatives %.2g", alpha, worst)
	}
}

// TestXJetComposes: XJet applied to a jet phi(t) with its own derivatives
// gives x(phi(t)) by Faà di Bruno's formula to third order (common
// practice; num.Compose): with phi(t) = 0.3 + 2t + 3t^2 + 4t^3 at t = 0,
// i.e. the jet (0.3, 2, 6, 24), on the disk with alpha = 1.
func TestXJetComposes(t *testing.T) {
	s := math.Sqrt(6.0)
	m := mustMap(t, diskK(1), 0, -s, s, nil)
	p := num.Jet{V: 0.3, D1: 2, D2: 6, D3: 24}
	u := p.V / s
	T := math.Tanh(u)
	c := math.Cosh(u)
	S := 1 / (c * c)
	x1, x2, x3 := S, -2/s*S*T, 2/(s*s)*S*(3*T*T-1)
	want := [4]float64{s * T, x1 * p.D1, x2*p.D1*p.D1 + x1*p.D2, x3*p.D1*p.D1*p.D1 + 3*x2*p.D1*p.D2 + x1*p.D3}
	got := m.XJet(p)
	for k, g := range [4]float64{got.V, got.D1, got.D2, got.D3} {
		if d := math.Abs(g-want[k]) / math.Max(1, math.Abs(want[k])); d > 1e-12 {
			t.Errorf("derivative %d = %.17g, want %.17g", k, g, want[k])
		}
	}
}

// TestRoundTrips: X(Phi(x)) = x and Phi(X(phi)) = phi over the resolved
// range (property), for the disk, the half-plane and the Higgs field.
// Tolerances: x to 4 ulp(x) plus 1e-13 max(1, |phi|)/sqrt(K) (the map's
// phi accuracy seen in x); phi to 1e-13 max(1, |phi|) plus 4 sqrt(K) ulp(x).
func TestRoundTrips(t *testing.T) {
	maps := []struct {
		name string
		m    *Map
	}{
		{"disk alpha=1", mustMap(t, diskK(1), 0, -math.Sqrt(6), math.Sqrt(6), nil)},
		{"disk alpha=1/100", mustMap(t, diskK(1e-2), 0, -math.Sqrt(6e-2), math.Sqrt(6e-2), nil)},
		{"half-plane alpha=1", mustMap(t, halfPlaneK(1), 1, 0, math.Inf(1), nil)},
		{"higgs xi=1e4", mustMap(t, higgsK(1e4), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})},
	}
	for _, c := range maps {
		e := c.m.Resolved()
		for i := 0; i <= 400; i++ {
			f := float64(i) / 400
			phi := math.Min(e.PhiLo+(e.PhiHi-e.PhiLo)*f, e.PhiHi)
			x, err := c.m.X(phi)
			if err != nil {
				t.Fatalf("%s: X(%g): %v", c.name, phi, err)
			}
			sk := math.Sqrt(c.m.Kinetic(x).V)
			if back := c.m.Phi(x); !within(back, phi, 1e-13*math.Max(1, math.Abs(phi))+4*sk*ulp(x)) {
				t.Errorf("%s: Phi(X(%.17g)) = %.17g", c.name, phi, back)
			}
			// A native value spread over the resolved native range.
			x0 := e.XLo + (e.XHi-e.XLo)*f
			if c.name == "half-plane alpha=1" || c.name == "higgs xi=1e4" {
				x0 = math.Copysign(math.Pow(10, -6+12*f), e.XHi)
			}
			p0 := c.m.Phi(x0)
			if math.IsNaN(p0) {
				continue
			}
			x1, err := c.m.X(p0)
			if err != nil {
				t.Fatalf("%s: X(Phi(%g)): %v", c.name, x0, err)
			}
			sk0 := math.Sqrt(c.m.Kinetic(x0).V)
			if !within(x1, x0, 4*ulp(x0)+1e-13*math.Max(1, math.Abs(p0))/sk0) {
				t.Errorf("%s: X(Phi(%.17g)) = %.17g", c.name, x0, x1)
			}
		}
	}
}

// TestDeterminism: two builds of the same map give the same table and the
// same bits from XJet (package doc: deterministic to the bit).
func TestDeterminism(t *testing.T) {
	a := mustMap(t, higgsK(1e4), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})
	b := mustMap(t, higgsK(1e4), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})
	if !reflect.DeepEqual(a.nodes, b.nodes) || a.stats != b.stats {
		t.Fatal("two builds differ")
	}
	for _, phi := range []float64{-3, 0.1, 1, 5.4321, 9} {
		if ja, jb := a.XJet(num.Var(phi)), b.XJet(num.Var(phi)); ja != jb {
			t.Errorf("phi=%g: %v vs %v", phi, ja, jb)
		}
		if x, _ := a.X(phi); x != a.XJet(num.Var(phi)).V {
			t.Errorf("phi=%g: X and XJet differ", phi)
		}
	}
}

// TestFiniteEnds: the canonical image of an end where the integral of
// sqrt(K) converges (derived here in each case):
//   - K = 1/(1 - x) on (-1, 1): phi = 2(1 - sqrt(1 - x)), so phi(1) = 2 (an
//     integrable pole) and phi(-1) = 2(1 - sqrt 2) (a regular end);
//   - K = 1/(1 + x^2)^2 on the real line: phi = atan x, image (-pi/2, pi/2).
//
// Tolerances: the regular end and the convergent infinite ends to 1e-14
// (the tail beyond the table is below rounding); the pole end to 1e-9 (its
// tail, 2 sqrt(gap) ~ 2e-6, is extrapolated geometrically from the last
// octaves, whose increments carry the noise of x's last bits there).
func TestFiniteEnds(t *testing.T) {
	m := mustMap(t, func(x num.Jet) num.Jet { return num.Recip(num.AddConst(num.Neg(x), 1)) }, 0, -1, 1, nil)
	lo, hi := m.PhiRange()
	if !within(lo, 2*(1-math.Sqrt2), 1e-14) || !within(hi, 2, 1e-9) {
		t.Errorf("K = 1/(1-x): image (%.17g, %.17g), want (%.17g, 2)", lo, hi, 2*(1-math.Sqrt2))
	}
	for _, x := range []float64{-0.9, -0.5, 0.3, 0.9, 0.999999} {
		if p, w := m.Phi(x), 2*(1-math.Sqrt(1-x)); !within(p, w, 1e-13) {
			t.Errorf("K = 1/(1-x): phi(%g) = %.17g, want %.17g", x, p, w)
		}
	}
	a := mustMap(t, func(x num.Jet) num.Jet { q := num.AddConst(num.Mul(x, x), 1); return num.Recip(num.Mul(q, q)) }, 0, math.Inf(-1), math.Inf(1), nil)
	if lo, hi := a.PhiRange(); !within(lo, -math.Pi/2, 1e-14) || !within(hi, math.Pi/2, 1e-14) {
		t.Errorf("K = 1/(1+x^2)^2: image (%.17g, %.17g), want ±pi/2", lo, hi)
	}
	for _, x := range []float64{-1e6, -3, 0.5, 40} {
		if p := a.Phi(x); !within(p, math.Atan(x), 1e-14) {
			t.Errorf("K = 1/(1+x^2)^2: phi(%g) = %.17g, want atan = %.17g", x, p, math.Atan(x))
		}
	}
}

// TestPhiMax: with K = 1 the map is the identity (phi = x); the table stops
// at the first octave boundary beyond |phi| = PhiMax, and the image of the
// infinite ends is infinite.
func TestPhiMax(t *testing.T) {
	m := mustMap(t, func(x num.Jet) num.Jet { return num.Const(1) }, 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 50})
	e := m.Resolved()
	if !(e.PhiHi >= 50 && e.PhiHi <= 100 && e.PhiLo <= -50 && e.PhiLo >= -100) {
		t.Errorf("resolved [%g, %g], want just beyond ±50", e.PhiLo, e.PhiHi)
	}
	if lo, hi := m.PhiRange(); !math.IsInf(lo, -1) || !math.IsInf(hi, 1) {
		t.Errorf("image (%g, %g), want (-Inf, +Inf)", lo, hi)
	}
	for _, x := range []float64{-49, -1e-9, 0, 3.25, 50} {
		if p := m.Phi(x); !within(p, x, 1e-13*math.Max(1, math.Abs(x))) {
			t.Errorf("phi(%g) = %.17g", x, p)
		}
	}
}

// TestHermiteReproducesQuintics: the quintic Hermite interpolant of the
// inversion's starting guess is exact for quintic polynomials (common
// practice: two-point Hermite interpolation with value, first and second
// derivative has degree 5).
func TestHermiteReproducesQuintics(t *testing.T) {
	p := func(f float64) [3]float64 {
		c := [6]float64{0.3, -1.2, 0.7, 2.1, -0.4, 0.25}
		v, d1, d2 := 0.0, 0.0, 0.0
		for k := 5; k >= 0; k-- {
			v = v*f + c[k]
		}
		for k := 5; k >= 1; k-- {
			d1 = d1*f + float64(k)*c[k]
		}
		for k := 5; k >= 2; k-- {
			d2 = d2*f + float64(k*(k-1))*c[k]
		}
		return [3]float64{v, d1, d2}
	}
	mk := func(f float64) node { q := p(f); return node{x: q[0], phi: f, d1: q[1], d2: q[2]} }
	a, c := mk(0.5), mk(1.75)
	for _, f := range []float64{0.5, 0.6, 1, 1.3, 1.75} {
		if got, want := hermite(a, c, f), p(f)[0]; !within(got, want, 1e-14) {
			t.Errorf("hermite at %g = %.17g, want %.17g", f, got, want)
		}
	}
}
