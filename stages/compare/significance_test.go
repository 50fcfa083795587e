package compare

import (
	"math"
	"math/rand/v2"
	"testing"
)

// sigmasByBisection solves erfc(n/sqrt 2) = exp(-d/2) for n with math.Erfc
// alone: the two-sided tail of a one-dimensional Gaussian beyond n sigma
// equals the chi^2 (two degrees of freedom) survival probability of d. It
// is independent of Sigmas, which uses math.Erfcinv.
func sigmasByBisection(d float64) float64 {
	p := math.Exp(-d / 2)
	lo, hi := 0.0, 40.0
	for i := 0; i < 200; i++ {
		mid := (lo + hi) / 2
		if math.Erfc(mid/math.Sqrt2) > p {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// TestTwoReadingsAtPublishedLimit: a model with n_s at the mean and r
// exactly on a published one-sided 95% limit. The published limits below
// are BICEP/Keck Collaboration 2021 (arXiv:2110.00483, abstract:
// r_0.05 < 0.036 at 95%), Tristram et al. 2022 (arXiv:2112.07961,
// abstract: r < 0.032 at 95%) and Balkenhol et al. 2025 (arXiv:2512.10613,
// abstract: r < 0.034 at 95%). With r a half-normal of sigma_r =
// r95/1.959964 the two-parameter Delta chi^2 there is 1.959964^2 = 3.8415
// (the chi^2 quantile of 95% for one degree of freedom, common practice),
// which for two parameters is only 1.45 sigma and inside the 95.45% region
// (Delta chi^2 <= 6.18), yet the model sits on the one-dimensional bound:
// ExceedsR95 must be false there and true one ulp above.
func TestTwoReadingsAtPublishedLimit(t *testing.T) {
	for _, c := range []struct {
		name string
		r95  float64
	}{
		{"BICEP/Keck 2021", 0.036}, {"Tristram et al. 2022", 0.032}, {"Balkenhol et al. 2025", 0.034},
	} {
		g := Gaussian{Name: c.name, MeanNs: 0.9649, SigmaNs: 0.0042, SigmaR: c.r95 / HalfNormal95}
		// The bound used is the published one, to rounding.
		if got := g.R95(); math.Abs(got-c.r95) > 2*ulp(c.r95) {
			t.Errorf("%s: R95 = %v, published %v", c.name, got, c.r95)
		}
		at := g.Compare(g.MeanNs, g.R95())
		// Delta chi^2 = HalfNormal95^2 = 3.8415 (to 1e-12: rounding of the
		// quadratic form).
		if math.Abs(at.DeltaChi2-HalfNormal95*HalfNormal95) > 1e-12 || math.Abs(at.DeltaChi2-3.8415) > 5e-5 {
			t.Errorf("%s: Delta chi^2 on the limit = %.6f, want 3.8415", c.name, at.DeltaChi2)
		}
		// 1.45 sigma for two parameters: exp(-3.8415/2) = 0.1465 is the
		// two-sided tail beyond 1.452 sigma (bisection on erfc; computed).
		if want := sigmasByBisection(at.DeltaChi2); math.Abs(at.Sigmas-want) > 1e-9 || math.Abs(at.Sigmas-1.452) > 1e-3 {
			t.Errorf("%s: %.6f sigma on the limit, want %.6f (about 1.45)", c.name, at.Sigmas, want)
		}
		if at.Inside68 || !at.Inside95 {
			t.Errorf("%s: on the limit inside_68 = %v, inside_95 = %v; want false, true (3.84 lies between 2.30 and 6.18)", c.name, at.Inside68, at.Inside95)
		}
		if at.ExceedsR95 || at.R95 != g.R95() {
			t.Errorf("%s: on the bound r95 = %v: exceeds_r95 = %v, want false", c.name, at.R95, at.ExceedsR95)
		}
		above := g.Compare(g.MeanNs, math.Nextafter(g.R95(), math.Inf(1)))
		if !above.ExceedsR95 || !above.Inside95 {
			t.Errorf("%s: one ulp above the bound: exceeds_r95 = %v, inside_95 = %v; want true, true", c.name, above.ExceedsR95, above.Inside95)
		}
		below := g.Compare(g.MeanNs+3*g.SigmaNs, math.Nextafter(g.R95(), 0))
		if below.ExceedsR95 {
			t.Errorf("%s: below the bound (n_s 3 sigma off) reported as exceeding it", c.name)
		}
		// The one-dimensional bound is a marginal: a correlation with n_s
		// does not move it.
		rho := g
		rho.Rho = -0.4
		if rho.R95() != g.R95() {
			t.Errorf("%s: correlation moved R95 from %v to %v", c.name, g.R95(), rho.R95())
		}
	}
}

func ulp(x float64) float64 { return math.Nextafter(x, math.Inf(1)) - x }

// TestR95MeanSigma: for r given as mean +/- sigma the bound is the upper
// end of the central 95% interval, mean + 1.959964 sigma (common
// practice); the flag flips there.
func TestR95MeanSigma(t *testing.T) {
	g := Gaussian{Name: "detection", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0.01, SigmaR: 0.003}
	want := 0.01 + 1.959964*0.003
	if got := g.R95(); math.Abs(got-want) > 1e-8 {
		t.Fatalf("R95 = %v, want %v", got, want)
	}
	if g.Compare(0.965, g.R95()).ExceedsR95 || !g.Compare(0.965, math.Nextafter(g.R95(), 1)).ExceedsR95 {
		t.Error("exceeds_r95 does not flip at mean + 1.96 sigma")
	}
	// At the mean the two-parameter reading is zero and nothing is exceeded.
	if c := g.Compare(0.965, 0.01); c.DeltaChi2 != 0 || c.ExceedsR95 {
		t.Errorf("at the mean: %+v", c)
	}
}

// TestKDER95: for samples the bound is the 95% quantile of their r. Drawn
// from a half-normal in r (sigma 0.01) it must be the half-normal's 95%
// quantile 1.959964 sigma within sampling error: the standard error of the
// p-quantile is sqrt(p(1-p)/n)/f(q) (the asymptotic variance of a sample
// quantile, common practice), 0.042 sigma for n = 2000 with
// f(q) = 2 phi(1.96)/sigma; the tolerance is four of them. The flag flips
// at the bound, as for a Gaussian.
func TestKDER95(t *testing.T) {
	const n, sR = 2000, 0.01
	rng := rand.New(rand.NewPCG(7, 3))
	pts := make([]Point, n)
	for i := range pts {
		pts[i] = Point{Ns: 0.965 + 0.004*rng.NormFloat64(), R: math.Abs(sR * rng.NormFloat64())}
	}
	k, err := NewKDE("half-normal", "test samples", pts)
	if err != nil {
		t.Fatal(err)
	}
	phi := math.Exp(-HalfNormal95*HalfNormal95/2) / math.Sqrt(2*math.Pi)
	se := math.Sqrt(0.95*0.05/n) / (2 * phi / sR)
	if got := k.R95(); math.Abs(got-HalfNormal95*sR) > 4*se {
		t.Errorf("KDE R95 = %.5f, want %.5f ± %.5f", got, HalfNormal95*sR, 4*se)
	}
	// Between 94% and 96% of the samples lie at or below it (it is an
	// interpolated order statistic).
	below := 0
	for _, p := range pts {
		if p.R <= k.R95() {
			below++
		}
	}
	if f := float64(below) / n; f < 0.94 || f > 0.96 {
		t.Errorf("%.4f of the samples at or below R95, want 0.95", f)
	}
	mp, _ := k.Max()
	if c := k.Compare(mp.Ns, k.R95()); c.ExceedsR95 || c.R95 != k.R95() {
		t.Errorf("on the bound: %+v", c)
	}
	if c := k.Compare(mp.Ns, math.Nextafter(k.R95(), 1)); !c.ExceedsR95 {
		t.Errorf("one ulp above the bound: %+v", c)
	}
	var _ Constraint = k
}
