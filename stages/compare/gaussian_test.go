package compare

import (
	"math"
	"strings"
	"testing"
)

// TestChi2Levels: Delta chi^2 enclosing probability P for two parameters.
// The chi^2 distribution with two degrees of freedom is exponential, so
// the level is exactly -2 ln(1 - P) (common practice; any statistics
// handbook). Printed values: 2.30 (68.27%), 4.61 (90%), 5.99 (95%),
// 6.18 (95.45%), 9.21 (99%), 11.83 (99.73%) — PDG Review of Particle
// Physics, "Statistics", table of Delta chi^2 for coverage 1 - alpha with
// m = 2 parameters (from memory; each row agrees with the exact formula
// to its printed digits, which is what makes them usable here).
func TestChi2Levels(t *testing.T) {
	for _, c := range []struct {
		P, want float64
	}{
		{0.6827, 2.30}, {0.90, 4.61}, {0.95, 5.99}, {0.9545, 6.18}, {0.99, 9.21}, {0.9973, 11.83},
	} {
		if got := Chi2Level(c.P); math.Abs(got-c.want) > 0.005 {
			t.Errorf("Chi2Level(%g) = %.4f, table %.2f", c.P, got, c.want)
		}
	}
	// The exact one- and two-sigma probabilities erf(k/sqrt 2): 2.29575
	// and 6.18007 (-2 ln erfc(k/sqrt 2), computed; the 2.2958 quoted in the
	// package doc is 2.29575 rounded up).
	if got := Chi2Level(math.Erf(1 / math.Sqrt2)); math.Abs(got-2.29575) > 1e-5 {
		t.Errorf("Chi2Level(68.27%%) = %.6f, want 2.29575", got)
	}
	if got := Chi2Level(math.Erf(2 / math.Sqrt2)); math.Abs(got-6.1801) > 5e-5 {
		t.Errorf("Chi2Level(95.45%%) = %.6f, want 6.1801", got)
	}
}

// TestSigmas: Delta chi^2 for two parameters to equivalent one-dimensional
// Gaussian sigmas. Table values 2.2958, 6.1801, 11.83 (as above) give 1, 2,
// 3 to 1e-3 (their printed digits limit the agreement, e.g. 11.83 for
// 11.829); zero and negative Delta chi^2 give 0.
func TestSigmas(t *testing.T) {
	for _, c := range []struct {
		d, want, tol float64
	}{
		{2.2958, 1, 1e-3}, {6.1801, 2, 1e-3}, {11.83, 3, 1e-3},
		{0, 0, 0}, {-3, 0, 0},
	} {
		if got := Sigmas(c.d); math.Abs(got-c.want) > c.tol {
			t.Errorf("Sigmas(%g) = %.6f, want %g ± %g", c.d, got, c.want, c.tol)
		}
	}
}

// lnErfc is ln erfc(y): from math.Erfc while it is representable, else the
// asymptotic series erfc(y) ~ exp(-y^2)/(y sqrt pi) (1 - 1/(2y^2) +
// 3/(4y^4) - 15/(8y^6)) (Abramowitz & Stegun 1964, eq. 7.1.23; number
// from memory), whose next term is below 1e-8 for y > 20.
func lnErfc(y float64) float64 {
	if e := math.Erfc(y); e > 1e-290 {
		return math.Log(e)
	}
	u := 1 / (2 * y * y)
	return -y*y - math.Log(y*math.Sqrt(math.Pi)) + math.Log(1-u+3*u*u-15*u*u*u)
}

// TestSigmasRoundTrip: a k-sigma two-sided tail has probability
// p = erfc(k/sqrt 2), and Delta chi^2 = -2 ln p for two parameters, so
// Sigmas(-2 ln erfc(k/sqrt 2)) = k (property of the definition). Checked
// from 0.5 to 60 sigma; beyond ~37 sigma (p < 1e-300) the package inverts
// the two-term asymptotic series, whose truncation error at 37 sigma is
// ~3e-8 in sigma, hence 1e-7 relative there. Below, 1e-11: for
// 1e-8 <= p < 1 math.Erfcinv(p) = Erfinv(1 - p) carries p to relative
// eps/p, about 1.5e-12 in sigma at 5 sigma.
func TestSigmasRoundTrip(t *testing.T) {
	for _, k := range []float64{0.5, 1, 2, 3, 5, 8, 8.3, 9, 12, 20, 30, 37, 40, 60} {
		d := -2 * lnErfc(k/math.Sqrt2)
		tol := 1e-11
		if d > 1380 {
			tol = 1e-7
		}
		if got := Sigmas(d); !(math.Abs(got-k) <= tol*k) {
			t.Errorf("Sigmas(%.6g) = %.15g, want %g (rel %g)", d, got, k, tol)
		}
	}
}

// TestSigmasContinuousAndMonotone: Sigmas is increasing and continuous,
// including across the switch to the asymptotic inverse at p = 1e-300
// (Delta chi^2 = 600 ln 10 = 1381.55). Property; the step 1e-3 in
// Delta chi^2 moves sigma by ~1.3e-5 there, far above the jump left by
// the truncated series (~4e-8).
func TestSigmasContinuousAndMonotone(t *testing.T) {
	sw := 600 * math.Ln10
	lo, hi := Sigmas(sw*(1-1e-12)), Sigmas(sw*(1+1e-12))
	if math.Abs(hi-lo) > 1e-7*lo {
		t.Errorf("jump at the asymptotic switch: %.15g -> %.15g", lo, hi)
	}
	prev := 0.0
	for d := 1e-3; d < 3000; d *= 1.01 {
		s := Sigmas(d)
		if !(s > prev) || math.IsInf(s, 0) {
			t.Fatalf("Sigmas(%g) = %g after %g", d, s, prev)
		}
		prev = s
	}
	prev = 0
	for d := sw - 1; d < sw+1; d += 1e-3 {
		s := Sigmas(d)
		if !(s > prev) {
			t.Fatalf("near the switch: Sigmas(%.4f) = %.12g after %.12g", d, s, prev)
		}
		prev = s
	}
}

// TestHalfNormal95: the 95% quantile of a half-normal is the two-sided 95%
// point of the standard normal, 1.959964 (any statistics table; common
// practice).
func TestHalfNormal95(t *testing.T) {
	if math.Abs(HalfNormal95-1.959964) > 5e-7 {
		t.Errorf("HalfNormal95 = %.9f, want 1.959964", HalfNormal95)
	}
}

var planckLike = Gaussian{Name: "test", MeanNs: 0.9649, SigmaNs: 0.0042, MeanR: 0, SigmaR: 0.036 / HalfNormal95}

// TestDeltaChi2Geometry: the bivariate-Gaussian quadratic form (common
// practice): zero at the mean; sum of squares when uncorrelated; along the
// major axis (equal standardized offsets t, same sign for rho > 0) it is
// 2t^2/(1 + rho), along the minor axis 2t^2/(1 - rho).
func TestDeltaChi2Geometry(t *testing.T) {
	if d := planckLike.DeltaChi2(planckLike.MeanNs, planckLike.MeanR); d != 0 {
		t.Errorf("at the mean: Delta chi^2 = %g", d)
	}
	g := planckLike
	if d, want := g.DeltaChi2(g.MeanNs+3*g.SigmaNs, g.MeanR+0.5*g.SigmaR), 9.25; !within(d, want, 1e-12) {
		t.Errorf("uncorrelated: %.15g, want %g", d, want)
	}
	// One-sided 95% limit on r with the likelihood peaked at 0: the limit
	// sits at Delta chi^2 = 1.959964^2 = 3.8415 (1-D 95%, common practice).
	if d := g.DeltaChi2(g.MeanNs, 0.036); !within(d, HalfNormal95*HalfNormal95, 1e-12) {
		t.Errorf("at r95: %.6f, want %.6f", d, HalfNormal95*HalfNormal95)
	}
	for _, rho := range []float64{-0.8, -0.3, 0.3, 0.8} {
		g := Gaussian{Name: "corr", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0.02, SigmaR: 0.01, Rho: rho}
		tt := 1.5
		s := math.Copysign(1, rho)
		major := g.DeltaChi2(g.MeanNs+tt*g.SigmaNs, g.MeanR+s*tt*g.SigmaR)
		minor := g.DeltaChi2(g.MeanNs+tt*g.SigmaNs, g.MeanR-s*tt*g.SigmaR)
		a := math.Abs(rho)
		if !within(major, 2*tt*tt/(1+a), 1e-12) || !within(minor, 2*tt*tt/(1-a), 1e-12) {
			t.Errorf("rho=%g: major %.12g (want %.12g), minor %.12g (want %.12g)", rho, major, 2*tt*tt/(1+a), minor, 2*tt*tt/(1-a))
		}
		if !(major < minor) {
			t.Errorf("rho=%g: along the major axis %g is not below the minor axis %g", rho, major, minor)
		}
	}
}

// TestTruncationAtZero: with a negative mean r the best allowed point lies
// on r = 0. Minimising the quadratic form over n_s at fixed r = 0 gives
// x = rho y and the value y^2 = (mean_r/sigma_r)^2 for any rho (derived
// here; the package's doc comment), so Delta chi^2 is 0 at
// (mean_ns + rho sigma_ns y', 0), y' = -mean_r/sigma_r, and >= 0 on the
// allowed region (property, on a grid).
func TestTruncationAtZero(t *testing.T) {
	for _, rho := range []float64{0, 0.4, -0.6} {
		g := Gaussian{Name: "neg", MeanNs: 0.965, SigmaNs: 0.004, MeanR: -0.005, SigmaR: 0.01, Rho: rho}
		y := (0 - g.MeanR) / g.SigmaR
		best := g.MeanNs + rho*g.SigmaNs*y
		if d := g.DeltaChi2(best, 0); math.Abs(d) > 1e-12 {
			t.Errorf("rho=%g: Delta chi^2 at the best allowed point = %g", rho, d)
		}
		for i := -20; i <= 20; i++ {
			for j := 0; j <= 20; j++ {
				ns := g.MeanNs + float64(i)*g.SigmaNs/4
				r := float64(j) * g.SigmaR / 4
				if d := g.DeltaChi2(ns, r); d < -1e-12 {
					t.Errorf("rho=%g: Delta chi^2(%g, %g) = %g < 0", rho, ns, r, d)
				}
			}
		}
	}
	// A non-negative mean is itself allowed: no truncation.
	g := Gaussian{Name: "pos", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0.003, SigmaR: 0.01}
	if d := g.DeltaChi2(0.965, 0); !within(d, 0.09, 1e-12) {
		t.Errorf("positive mean: Delta chi^2 at r = 0 is %g, want 0.09", d)
	}
}

func TestCompare(t *testing.T) {
	g := Gaussian{Name: "c", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0, SigmaR: 0.01}
	for _, c := range []struct {
		ns             float64
		in68, in95     bool
		sigmasAtLeast  float64
		sigmasAtMost   float64
		deltaChi2Check float64
	}{
		{0.965, true, true, 0, 0, 0},
		{0.965 + 0.004*math.Sqrt(2.2), true, true, 0.9, 1, 2.2},
		{0.965 + 0.004*math.Sqrt(2.4), false, true, 1, 1.1, 2.4},
		{0.965 + 0.004*math.Sqrt(6.1), false, true, 1.9, 2, 6.1},
		{0.965 + 0.004*math.Sqrt(6.3), false, false, 2, 2.1, 6.3},
	} {
		cmp := g.Compare(c.ns, 0)
		if cmp.Inside68 != c.in68 || cmp.Inside95 != c.in95 || !within(cmp.DeltaChi2, c.deltaChi2Check, 1e-10) ||
			cmp.Sigmas < c.sigmasAtLeast || cmp.Sigmas > c.sigmasAtMost || cmp.Sigmas != Sigmas(cmp.DeltaChi2) {
			t.Errorf("n_s = %g: %+v", c.ns, cmp)
		}
	}
}

func TestCheck(t *testing.T) {
	ok := Gaussian{Name: "ok", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0, SigmaR: 0.01, Rho: 0.2}
	if err := ok.Check(); err != nil {
		t.Fatal(err)
	}
	nan, inf := math.NaN(), math.Inf(1)
	for _, c := range []struct {
		set  func(g *Gaussian)
		want string
	}{
		{func(g *Gaussian) { g.SigmaNs = 0 }, "sigma of n_s"},
		{func(g *Gaussian) { g.SigmaNs = -1 }, "sigma of n_s"},
		{func(g *Gaussian) { g.SigmaNs = nan }, "sigma of n_s"},
		{func(g *Gaussian) { g.SigmaNs = inf }, "sigma of n_s"},
		{func(g *Gaussian) { g.SigmaR = 0 }, "sigma of r"},
		{func(g *Gaussian) { g.SigmaR = nan }, "sigma of r"},
		{func(g *Gaussian) { g.Rho = 1 }, "correlation"},
		{func(g *Gaussian) { g.Rho = -1 }, "correlation"},
		{func(g *Gaussian) { g.Rho = 1.5 }, "correlation"},
		{func(g *Gaussian) { g.Rho = nan }, "correlation"},
		{func(g *Gaussian) { g.MeanNs = nan }, "means must be finite"},
		{func(g *Gaussian) { g.MeanR = inf }, "means must be finite"},
	} {
		g := ok
		c.set(&g)
		err := g.Check()
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "constraint ok") {
			t.Errorf("%+v: error %v, want one naming %q", g, err, c.want)
		}
	}
}

func within(got, want, rel float64) bool {
	return got == want || math.Abs(got-want) <= rel*math.Abs(want)
}
