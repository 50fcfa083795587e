package kinetic

import (
	"math"
	"testing"
)

// TestDiskMap: on the Poincaré disk |chi| < sqrt(6 alpha) with
// K = 1/(1 - chi^2/(6 alpha))^2 the canonical field is
// chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha)), and the boundary is at
// infinite canonical distance (Kallosh, Linde & Roest 2013,
// arXiv:1311.0472). Checked for the discrete set 3 alpha = 1 and 7
// (Ferrara & Kallosh 2016, arXiv:1610.04163) and extreme alpha.
//
// Tolerances: x to 1e-13 sqrt(6 alpha) (the map's relative accuracy on the
// field's own scale); phi(x) to 1e-13 max(1, |phi|) plus the phi-width of
// four units in the last place of x, 4 sqrt(K) ulp(x): near the boundary
// the float64 chi itself resolves phi no better than that.
func TestDiskMap(t *testing.T) {
	for _, alpha := range []float64{1e-2, 1.0 / 3, 1, 7.0 / 3, 1e2} {
		s := math.Sqrt(6 * alpha)
		m := mustMap(t, diskK(alpha), 0, -s, s, nil)
		if lo, hi := m.PhiRange(); !math.IsInf(lo, -1) || !math.IsInf(hi, 1) {
			t.Errorf("alpha=%g: canonical image (%g, %g), want (-Inf, +Inf)", alpha, lo, hi)
		}
		// The table reaches within a few thousand ulps of the boundary,
		// 1 - tanh(u) ~ 2e-12 at u = 13.
		if e := m.Resolved(); !(e.PhiHi >= 13*s && e.PhiLo <= -13*s) {
			t.Errorf("alpha=%g: resolved canonical range [%g, %g], want beyond ±13 sqrt(6 alpha) = %g", alpha, e.PhiLo, e.PhiHi, 13*s)
		}
		worstX, worstPhi := 0.0, 0.0
		for i := -48; i <= 48; i++ {
			u := float64(i) / 4
			x, err := m.X(u * s)
			if err != nil {
				t.Fatalf("alpha=%g: X(%g): %v", alpha, u*s, err)
			}
			want := s * math.Tanh(u)
			worstX = math.Max(worstX, math.Abs(x-want)/s)
			if math.Abs(x-want) > 1e-13*s {
				t.Errorf("alpha=%g: chi(phi=%g) = %.17g, want %.17g", alpha, u*s, x, want)
			}
			pw := s * math.Atanh(want/s)
			tol := 1e-13*math.Max(1, math.Abs(pw)) + 4*math.Sqrt(m.Kinetic(want).V)*ulp(want)
			p := m.Phi(want)
			worstPhi = math.Max(worstPhi, math.Abs(p-pw)/tol)
			if !within(p, pw, tol) {
				t.Errorf("alpha=%g: phi(chi=%.17g) = %.17g, want %.17g (tolerance %g)", alpha, want, p, pw, tol)
			}
		}
		t.Logf("alpha=%g: max |chi - chi_exact|/sqrt(6 alpha) = %.2g; max phi deviation %.2g of its tolerance; %d nodes", alpha, worstX, worstPhi, m.Stats().Nodes)
	}
}

// TestHalfPlaneMap: on the half-plane y > 0 with K = 3 alpha/(2 y^2) the
// canonical field is y = exp(sqrt(2/(3 alpha)) phi) (Kallosh, Linde & Roest
// 2013, arXiv:1311.0472), with y = 0 and y = infinity at infinite canonical
// distance. Tolerance: relative 1e-13 max(1, b |phi|) on y, since
// d ln y/dphi = b turns the map's 1e-13 max(1, |phi|) accuracy in phi into
// that; phi(y) to 1e-13 max(1, |phi|).
func TestHalfPlaneMap(t *testing.T) {
	for _, alpha := range []float64{1.0 / 3, 1, 7.0 / 3, 1e2} {
		b := math.Sqrt(2 / (3 * alpha))
		m := mustMap(t, halfPlaneK(alpha), 1, 0, math.Inf(1), nil)
		if lo, hi := m.PhiRange(); !math.IsInf(lo, -1) || !math.IsInf(hi, 1) {
			t.Errorf("alpha=%g: canonical image (%g, %g), want (-Inf, +Inf)", alpha, lo, hi)
		}
		worst := 0.0
		for i := -40; i <= 40; i++ {
			phi := float64(i) / b
			y, err := m.X(phi)
			if err != nil {
				t.Fatalf("alpha=%g: X(%g): %v", alpha, phi, err)
			}
			want := math.Exp(b * phi)
			dev := math.Abs(y-want) / want
			worst = math.Max(worst, dev/math.Max(1, b*math.Abs(phi)))
			if dev > 1e-13*math.Max(1, b*math.Abs(phi)) {
				t.Errorf("alpha=%g: y(phi=%g) = %.17g, want %.17g", alpha, phi, y, want)
			}
			pw := math.Log(want) / b
			if p := m.Phi(want); !within(p, pw, 1e-13*math.Max(1, math.Abs(pw))) {
				t.Errorf("alpha=%g: phi(y=%g) = %.17g, want %.17g", alpha, want, p, pw)
			}
		}
		t.Logf("alpha=%g: max |y - y_exact|/(y max(1, b|phi|)) = %.2g", alpha, worst)
	}
}

// TestHiggsMap: the Einstein-frame Higgs field with
// dphi/dh = sqrt((1 + xi h^2 + 6 xi^2 h^2)/(1 + xi h^2)^2) (Bezrukov &
// Shaposhnikov 2008, arXiv:0710.3755) against its exact integral
// (higgsPhi, derived here), from h = 1e-8/xi to phi = 100, to
// 1e-13 max(1, |phi|); the inverse to the same accuracy in phi. K is even
// and the origin 0, so the map is odd: phi(-h) = -phi(h), here to four
// ulps (the two sides are tabulated on mirrored nodes; only the choice of
// the nearer node and the direction of the last quadrature differ).
func TestHiggsMap(t *testing.T) {
	for _, xi := range []float64{1e-3, 1, 1e2, 1e4, 1e6} {
		m := mustMap(t, higgsK(xi), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})
		worst := 0.0
		for i := 0; i <= 200; i++ {
			h := math.Pow(10, -8+12*float64(i)/200) / math.Min(1, xi)
			pw := higgsPhi(xi, h)
			if pw > 100 {
				break
			}
			p := m.Phi(h)
			tol := 1e-13 * math.Max(1, pw)
			worst = math.Max(worst, math.Abs(p-pw)/math.Max(1, pw))
			if !within(p, pw, tol) {
				t.Errorf("xi=%g: phi(h=%g) = %.17g, exact %.17g", xi, h, p, pw)
			}
			if q := m.Phi(-h); math.Abs(q+p) > 4*ulp(p) {
				t.Errorf("xi=%g: phi(-h) = %.17g, -phi(h) = %.17g", xi, q, -p)
			}
			x, err := m.X(pw)
			if err != nil {
				t.Fatalf("xi=%g: X(%g): %v", xi, pw, err)
			}
			if back := higgsPhi(xi, x); !within(back, pw, tol+4*math.Sqrt(m.Kinetic(x).V)*ulp(x)) {
				t.Errorf("xi=%g: X(%.17g) = %.17g, whose exact phi is %.17g", xi, pw, x, back)
			}
		}
		t.Logf("xi=%g: max |phi - phi_exact|/max(1, phi) = %.2g (%d nodes)", xi, worst, m.Stats().Nodes)
	}
}

// TestHiggsLargeXi: for xi >> 1 and xi h^2 >> 1, Bezrukov & Shaposhnikov
// 2008 (arXiv:0710.3755) approximate the map by
// phi ≈ sqrt(3/2) ln(1 + xi h^2), dropping 1 + xi h^2 against 6 xi^2 h^2
// under the square root. Expanding the exact integral (derived here) gives
// the neglected terms: for u^2 = xi h^2 >> 1,
//
//	phi - sqrt(3/2) ln(1 + xi h^2) = (ln(2 sqrt(6) xi h) + 1/2)/(2 sqrt(6) xi) + O(ln(xi h)/xi^2),
//
// (the O(1/u^2) terms cancel). So in the regime xi >= 100, xi h^2 >= 10
// the approximation holds to (ln(2 sqrt(6) xi h) + 1)/(2 sqrt(6) xi) — a few
// 1e-4 at xi = 1e4 — which is the first tolerance; the second checks the
// expansion itself, to 0.02 ln(2 sqrt(6) xi h)/xi^2 (the remainder, measured
// against a 40-digit quadrature, is below 0.009 ln(...)/xi^2) plus the
// map's 1e-13 max(1, phi).
func TestHiggsLargeXi(t *testing.T) {
	for _, xi := range []float64{1e2, 1e4, 1e6} {
		m := mustMap(t, higgsK(xi), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})
		r6 := math.Sqrt(6)
		for _, u2 := range []float64{10, 30, 100, 1e3, 1e4, 1e6} {
			h := math.Sqrt(u2 / xi)
			p := m.Phi(h)
			approx := math.Sqrt(1.5) * math.Log1p(xi*h*h)
			L := math.Log(2 * r6 * xi * h)
			if bound := (L + 1) / (2 * r6 * xi); math.Abs(p-approx) > bound {
				t.Errorf("xi=%g xi h^2=%g: phi = %.12g, sqrt(3/2) ln(1 + xi h^2) = %.12g, difference %.3g beyond the neglected terms' %.3g", xi, u2, p, approx, p-approx, bound)
			}
			delta := (L + 0.5) / (2 * r6 * xi)
			if rest, tol := p-approx-delta, 0.02*L/(xi*xi)+1e-13*math.Max(1, p); math.Abs(rest) > tol {
				t.Errorf("xi=%g xi h^2=%g: phi - approx - correction = %.3g, want within %.3g", xi, u2, rest, tol)
			}
		}
	}
}

// TestHiggsSmallField: for xi h << 1 the Higgs field is canonical,
// phi ≈ h (Bezrukov & Shaposhnikov 2008, arXiv:0710.3755). Expanding the
// integrand (derived here), sqrt(1 + a t^2)/(1 + xi t^2) with
// a = xi + 6 xi^2 is 1 + (6 xi^2 - xi) t^2/2 + c4 t^4 + ..., with
// c4 = xi^2 - a xi/2 - a^2/8, so phi - h = (6 xi^2 - xi) h^3/6 + c4 h^5/5 + ...
// The first tolerance is the neglected cubic term (times 1.01, plus the
// map's relative 1e-13); the second checks the cubic term itself, to
// 1.1 |c4| h^5/5 plus 1e-13 phi.
func TestHiggsSmallField(t *testing.T) {
	for _, xi := range []float64{1, 1e2, 1e4} {
		m := mustMap(t, higgsK(xi), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})
		a := xi + 6*xi*xi
		c4 := xi*xi - a*xi/2 - a*a/8
		for _, xh := range []float64{1e-2, 1e-3, 1e-4, 1e-6} {
			h := xh / xi
			p := m.Phi(h)
			cubic := (6*xi*xi - xi) * h * h * h / 6
			if d := math.Abs(p - h); d > 1.01*cubic+1e-13*h {
				t.Errorf("xi=%g h=%g: phi - h = %.3g, neglected cubic term %.3g", xi, h, p-h, cubic)
			}
			if rest, tol := p-h-cubic, 1.1*math.Abs(c4)*math.Pow(h, 5)/5+1e-13*p; math.Abs(rest) > tol {
				t.Errorf("xi=%g h=%g: phi - h - cubic = %.3g, want within %.3g", xi, h, rest, tol)
			}
		}
	}
}
