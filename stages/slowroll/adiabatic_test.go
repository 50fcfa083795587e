package slowroll

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/ode"
)

// TestAdiabaticDeSitter: in de Sitter (epsilon_H = 0, Z = 2, the massless
// field and the tensor mode) the Bunch–Davies mode has 2k|v|² = 1 + y
// with y = (aH/k)² exactly (Bunch & Davies 1978, Proc. R. Soc. A 360,
// 117), so s = (1/2) ln(1 + y) and s' = y/(1 + y); the adiabatic series
// is the convergent series of the logarithm, a_n = (-1)^(n+1)/(2n), and
// its eighth-order sum must be off by the first omitted term,
// y⁹/18 (1.4e-10 at x = 3, 1.4e-14 at x = 5; measured 1.3e-10 and
// 1.4e-14), and to rounding from x = 10 on (bound 1e-16; measured 0).
// A series wrong at any order n <= 8 fails at x = 3 or 5.
func TestAdiabaticDeSitter(t *testing.T) {
	for _, x := range []float64{3, 5, 10, 20, 100} {
		y := 1 / (x * x)
		s, u := adiabaticState(x, []float64{0}, []float64{2})
		es, eu := s-0.5*math.Log1p(y), u-y/(1+y)
		tol := math.Max(2*math.Pow(y, 9)/18, 1e-16)
		t.Logf("x = %g: s err %.2g, s' err %.2g (bound %.2g)", x, es, eu, tol)
		if math.Abs(es) > tol || math.Abs(eu) > 20*tol {
			t.Errorf("x = %g: s = %.17g, s' = %.17g, closed form %.17g, %.17g", x, s, u, 0.5*math.Log1p(y), y/(1+y))
		}
	}
}

// TestAdiabaticPowerLawHankel: on the power-law background (epsilon_H =
// 1/p, Z = 2 - 1/p, both constant) the Bunch–Davies mode is
// s = (1/2) ln[(π/2) y |H_ν^(1)(y)|²], ν = 3/2 + 1/(p - 1), y = x/(1 - 1/p)
// (Lyth & Stewart 1992, PLB 274, 168). Reference values of s and of
// s' = -(1 - 1/p) y ds/dy computed with mpmath 1.3.0 (hankel1 and diff,
// 40 digits), a general-purpose library. The series is asymptotic (its
// terms shrink until order about x), so the bounds depend on x: at
// x = 10 s to 3e-11 and s' to 5e-10 (measured worst 1.8e-11 and 2.8e-10,
// for p = 10, epsilon_H = 0.1), at x = 15 to 1e-13 and 1e-12, from x = 20
// on to 1e-15 and 1e-14. The second-order formula of the first version of
// the exact method (frozen Z, terms to 1/x⁴) is off by 3.5e-7 at x = 10.
func TestAdiabaticPowerLawHankel(t *testing.T) {
	ref := []struct {
		p, x, s, u float64
	}{
		{10, 10, 0.0047372315633103647275, 0.0085037354756909376674},
		{10, 15, 0.0021086080181598953198, 0.0037909600553360573034},
		{10, 20, 0.0011867102606674702828, 0.0021346516269638399687},
		{10, 30, 0.00052762210790295848004, 0.00094943910996046802284},
		{4, 10, 0.0043760356573844090822, 0.0065651292552929047809},
		{4, 15, 0.0019446847404222010291, 0.0029173437283128099949},
		{4, 20, 0.0010938301082734011208, 0.0016408573980437638147},
		{4, 30, 0.00048612751829910337394, 0.00072921518409669324587},
		{100, 10, 0.0049514802597963285575, 0.0097576004880530501469},
		{100, 15, 0.0022064520958052728701, 0.0043595709613484244936},
		{100, 20, 0.0012422744182251919717, 0.0024567853510868598796},
		{100, 30, 0.00055248610275057301437, 0.0010933452862012486954},
	}
	for _, r := range ref {
		eps := 1 / r.p
		s, u := adiabaticState(r.x, []float64{eps}, []float64{2 - eps})
		ts, tu := 1e-15, 1e-14
		switch {
		case r.x < 12:
			ts, tu = 3e-11, 5e-10
		case r.x < 18:
			ts, tu = 1e-13, 1e-12
		}
		t.Logf("p = %g, x = %g: s err %.2g, s' err %.2g", r.p, r.x, s-r.s, u-r.u)
		if math.Abs(s-r.s) > ts || math.Abs(u-r.u) > tu {
			t.Errorf("p = %g, x = %g: s = %.17g, s' = %.17g; Hankel %.17g, %.17g", r.p, r.x, s, u, r.s, r.u)
		}
	}
	// The old second-order iterate, for the record of what the higher
	// orders buy: W²/k² = 1 - Z y + (3/2) Z (1 - eps)² y², s = -(1/4) ln.
	y, eps, Z := 0.01, 0.1, 1.9
	old := -0.25 * math.Log1p(-Z*y+1.5*Z*(1-eps)*(1-eps)*y*y)
	if d := math.Abs(old - ref[0].s); d < 1e-7 {
		t.Errorf("the second-order iterate is off by only %.2g at x = 10: the reference cannot tell orders apart", d)
	}
}

// TestAdiabaticTruncation: below x ≈ 8 the terms of the series start
// to grow within its first eight orders, and the sum stops at the
// smallest one (optimal truncation). On power-law backgrounds at x = 3
// to 5 (closed form as above, mpmath 1.3.0) the truncated sum must be off
// by less than its smallest term (measured 0.5 to 0.8 of it) and by
// less than the sum of all eight terms (measured off by 1.3e-5 to 1.1e-2,
// 2.5 to 160 times more).
func TestAdiabaticTruncation(t *testing.T) {
	for _, c := range []struct{ p, x, s float64 }{
		{4, 4, 0.027329152645120992458},
		{10, 3, 0.051093163581860905435},
		{10, 5, 0.018789348605208758222},
		{100, 3, 0.052527598757472947119},
	} {
		eps := 1 / c.p
		ts, _ := adiabaticTerms(c.x, []float64{eps}, []float64{2 - eps})
		s, _ := adiabaticState(c.x, []float64{eps}, []float64{2 - eps})
		n := adiabaticCut(ts[:])
		full := 0.0
		for _, v := range ts {
			full += v
		}
		t.Logf("p = %g, x = %g: %d terms, error %.3g, smallest term %.3g, all eight terms off by %.3g", c.p, c.x, n, s-c.s, ts[n-1], full-c.s)
		if e := math.Abs(s - c.s); e > math.Abs(ts[n-1]) || e >= math.Abs(full-c.s) {
			t.Errorf("p = %g, x = %g: truncated at %d terms the sum is off by %.3g (smallest term %.3g, all terms off by %.3g)", c.p, c.x, n, e, ts[n-1], full-c.s)
		}
	}
}

// TestSeriesAtDerivatives: the Taylor coefficients of the background at a
// mode start (seriesAt, from V, V', V”, V”' and the background equations)
// must be the derivatives of one another along a background trajectory:
// k c_k = d c_(k-1)/dN for epsilon_H (k = 1..3) and dZ_s/dN = Z_s',
// checked by central differences of step 0.01 e-folds on a trajectory
// integrated from the state at the start of the N* = 55 stencil with
// tolerances 1e-13, to 1e-6 relative (measured 2e-8 to 1.2e-7, the
// truncation of the differences), for plateau, monomial, natural and
// hilltop families. (Differences along the dense output are not enough:
// epsilon_H” depends on pi + V'/V, which cancels to 1e-3, so the
// interpolant's derivative error is amplified to 1e-4.) A wrong term of
// the third derivative of pi (e.g. its factor 2 replaced by 1) fails.
func TestSeriesAtDerivatives(t *testing.T) {
	for _, f := range []exFamily{
		{"e-model", map[string]float64{"alpha": 1}}, {"power-law", map[string]float64{"p": 2}},
		{"natural", map[string]float64{"f": 7}}, {"hilltop", map[string]float64{"mu": 10, "p": 4}},
	} {
		m := exModel(t, f.family, f.params)
		es, err := SolveExact(m, 55, nil)
		if err != nil {
			t.Fatal(err)
		}
		var y0 [2]float64
		if err := es.bg.state(es.bg.nEnd-62, y0[:]); err != nil {
			t.Fatal(err)
		}
		rhs := func(_ float64, y, dy []float64) {
			j := m.At(y[0])
			dy[0] = y[1]
			dy[1] = -(3 - 0.5*y[1]*y[1]) * (y[1] + j.D1/j.V)
		}
		const d = 0.01
		at := func(dN float64) modeSeries {
			r, err := ode.Solve(rhs, 0, dN, y0[:], &ode.Settings{RTol: 1e-13, ATol: 1e-16})
			if err != nil {
				t.Fatal(err)
			}
			return seriesAt(m, r.Y[0], r.Y[1])
		}
		c, lo, hi := seriesAt(m, y0[0], y0[1]), at(-d), at(d)
		checks := []struct {
			what        string
			coef, deriv float64
		}{
			{"epsilon_H'", c.eps[1], (hi.eps[0] - lo.eps[0]) / (2 * d)},
			{"epsilon_H''", 2 * c.eps[2], (hi.eps[1] - lo.eps[1]) / (2 * d)},
			{"epsilon_H'''", 6 * c.eps[3], 2 * (hi.eps[2] - lo.eps[2]) / (2 * d)},
			{"Z_s'", c.zs[1], (hi.zs[0] - lo.zs[0]) / (2 * d)},
		}
		for _, ch := range checks {
			rel := math.Abs(ch.coef/ch.deriv - 1)
			t.Logf("%s %s: %.6g, central difference %.6g (rel %.2g)", m.Describe(), ch.what, ch.coef, ch.deriv, rel)
			if rel > 1e-6 {
				t.Errorf("%s: %s = %.8g, central difference of the lower coefficient %.8g", m.Describe(), ch.what, ch.coef, ch.deriv)
			}
		}
	}
}
