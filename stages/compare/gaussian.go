package compare

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// HalfNormal95 is the 95% quantile of a half-normal distribution in units
// of its sigma, sqrt(2) erfinv(0.95) = 1.959964: a one-sided 95% upper
// limit r95 on a parameter bounded below by zero, with its likelihood
// peaked at zero, corresponds to sigma_r = r95/1.959964 (common practice).
var HalfNormal95 = math.Sqrt2 * detmath.Erfinv(0.95)

// Gaussian is a bivariate Gaussian approximation of a published (n_s, r)
// constraint, with r restricted to r >= 0.
type Gaussian struct {
	Name     string
	Citation string
	MeanNs   float64
	SigmaNs  float64
	MeanR    float64
	SigmaR   float64
	Rho      float64 // correlation coefficient of n_s and r, in (-1, 1)
}

// Check refuses a malformed constraint, naming the field.
func (g Gaussian) Check() error {
	switch {
	case !(g.SigmaNs > 0) || math.IsInf(g.SigmaNs, 0):
		return fmt.Errorf("constraint %s: sigma of n_s = %g, want > 0", g.Name, g.SigmaNs)
	case !(g.SigmaR > 0) || math.IsInf(g.SigmaR, 0):
		return fmt.Errorf("constraint %s: sigma of r = %g, want > 0", g.Name, g.SigmaR)
	case !(g.Rho > -1 && g.Rho < 1):
		return fmt.Errorf("constraint %s: correlation %g, want -1 < rho < 1", g.Name, g.Rho)
	case math.IsNaN(g.MeanNs) || math.IsInf(g.MeanNs, 0) || math.IsNaN(g.MeanR) || math.IsInf(g.MeanR, 0):
		return fmt.Errorf("constraint %s: means must be finite", g.Name)
	}
	return nil
}

// chi2 is the quadratic form d^T C^-1 d.
func (g Gaussian) chi2(ns, r float64) float64 {
	x := (ns - g.MeanNs) / g.SigmaNs
	y := (r - g.MeanR) / g.SigmaR
	return (float64(x*x) - float64(float64(float64(2*g.Rho)*x)*y) + float64(y*y)) / (1 - float64(g.Rho*g.Rho))
}

// DeltaChi2 returns chi^2(n_s, r) minus its minimum over the allowed region
// r >= 0. When the mean has r < 0 the minimum lies on r = 0, where the
// conditional minimum of the quadratic form is (mean_r/sigma_r)^2.
func (g Gaussian) DeltaChi2(ns, r float64) float64 {
	min := 0.0
	if g.MeanR < 0 {
		y := g.MeanR / g.SigmaR
		min = y * y
	}
	return g.chi2(ns, r) - min
}

// Sigmas converts Delta chi^2 for k = 2 parameters to the number of
// standard deviations of a one-dimensional Gaussian with the same tail
// probability: p = exp(-Delta chi^2/2) (the chi^2 survival function for two
// degrees of freedom), n = sqrt(2) erfcinv(p). Delta chi^2 = 2.30 and 6.18
// give 1 and 2 sigma (68.27% and 95.45%). For p below the smallest float64
// the asymptotic expansion of erfc is inverted instead.
func Sigmas(dchi2 float64) float64 {
	if math.IsNaN(dchi2) {
		return math.NaN()
	}
	if !(dchi2 > 0) {
		return 0
	}
	p := detmath.Exp(-dchi2 / 2)
	target := float64(dchi2 / 2)
	if p >= 1e-8 {
		return math.Sqrt2 * detmath.Erfcinv(p)
	}
	// math.Erfcinv(p) is Erfinv(1 - p), which loses p below about 1e-16
	// (1 - p rounds to 1 and it returns +Inf). Start from the asymptotic
	// inverse and refine by Newton steps on ln erfc(x) = -dchi2/2, which
	// math.Erfc keeps accurate in the tail.
	x := asymptoticErfcinv(target)
	if p > 1e-300 {
		for i := 0; i < 20; i++ {
			e := detmath.Erfc(x)
			step := (detmath.Log(e) + target) / (float64(-2/math.SqrtPi*detmath.Exp(float64(-x*x))) / e)
			x -= step
			if math.Abs(step) <= 1e-15*x {
				break
			}
		}
	}
	return math.Sqrt2 * x
}

// asymptoticErfcinv solves erfc(x) = exp(-target) for large x with
// erfc(x) ~ exp(-x^2)/(x sqrt(pi)) (1 - 1/(2x^2)), that is
// x^2 + ln x + ln sqrt(pi) - ln(1 - 1/(2x^2)) = target, by fixed-point
// iteration (Abramowitz & Stegun 1964, eq. 7.1.23).
func asymptoticErfcinv(target float64) float64 {
	x := math.Sqrt(target)
	for i := 0; i < 50; i++ {
		x = math.Sqrt(target - detmath.Log(x) - float64(0.5*detmath.Log(math.Pi)) + detmath.Log(1-0.5/(float64(x*x))))
	}
	return x
}

// Comparison is the result of comparing one prediction with a constraint.
// It carries two readings that answer different questions and need not
// agree.
//
// The two-parameter reading (DeltaChi2, Sigmas, Inside68, Inside95) places
// the point (n_s, r) in the joint (n_s, r) distribution: Delta chi^2 is
// turned into sigmas with two degrees of freedom, so a point exactly on a
// published one-dimensional 95% bound on r with n_s at its mean has
// Delta chi^2 = 1.959964^2 = 3.84, which is 1.45 sigma and inside the two-
// parameter 95.45% region.
//
// The one-dimensional reading (R95, ExceedsR95) asks only whether r is
// above the published 95% upper bound on r, marginalised over n_s: the
// statement "r < r95 at 95%" as the paper makes it.
type Comparison struct {
	DeltaChi2  float64
	Sigmas     float64
	Inside68   bool    // Delta chi^2 <= 2.2958 (68.27% for two parameters)
	Inside95   bool    // Delta chi^2 <= 6.1801 (95.45% for two parameters)
	R95        float64 // the one-dimensional 95% upper bound on r used
	ExceedsR95 bool    // r > R95
}

// R95 returns the one-dimensional 95% upper bound on r of the constraint,
// mean_r + 1.959964 sigma_r. For a published one-sided limit (mean_r = 0,
// sigma_r = upper_95/1.959964, see HalfNormal95) it is the 95% quantile of
// the half-normal, that is the published upper_95 to rounding (within an
// ulp or two); for r given as mean +/- sigma it is the upper end of the
// central 95% interval of the Gaussian (common practice). The correlation
// with n_s does not enter: the marginal of a bivariate Gaussian is the
// Gaussian of its own mean and sigma.
func (g Gaussian) R95() float64 { return g.MeanR + float64(HalfNormal95*g.SigmaR) }

// Chi2Level returns the Delta chi^2 enclosing probability P for two
// parameters: the quantile of the chi^2 distribution with two degrees of
// freedom, -2 ln(1 - P) in closed form (common practice; checked against
// gonum's distuv.ChiSquared in the tests).
func Chi2Level(P float64) float64 { return -2 * detmath.Log1p(-P) }

// The two levels Compare tests against, computed once.
var (
	chi2Level68 = Chi2Level(detmath.Erf(1 / math.Sqrt2))
	chi2Level95 = Chi2Level(detmath.Erf(2 / math.Sqrt2))
)

// Compare evaluates the prediction (n_s, r) against g.
func (g Gaussian) Compare(ns, r float64) Comparison {
	d := g.DeltaChi2(ns, r)
	r95 := g.R95()
	return Comparison{
		DeltaChi2:  d,
		Sigmas:     Sigmas(d),
		Inside68:   d <= chi2Level68,
		Inside95:   d <= chi2Level95,
		R95:        r95,
		ExceedsR95: r > r95,
	}
}
