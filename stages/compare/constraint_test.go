package compare

import (
	"math"
	"testing"
)

// TestGaussianConstraint: the Gaussian's Constraint methods agree with
// Compare; its levels are the two-parameter chi^2 quantiles 2.29575 and
// 6.18007 (-2 ln(1 - P) at P = erf(1/sqrt 2), erf(2/sqrt 2); the chi^2
// distribution with two degrees of freedom is exponential).
func TestGaussianConstraint(t *testing.T) {
	var c Constraint = Gaussian{Name: "pl", MeanNs: 0.9649, SigmaNs: 0.0042, MeanR: 0, SigmaR: 0.036 / HalfNormal95}
	if c.Label() != "pl" {
		t.Errorf("Label = %q", c.Label())
	}
	d68, d95 := c.Levels()
	if math.Abs(d68-2.29575) > 1e-5 || math.Abs(d95-6.18007) > 1e-5 {
		t.Errorf("Levels = %.6f, %.6f, want 2.29575, 6.18007", d68, d95)
	}
	g := c.(Gaussian)
	for _, p := range []Point{{0.9649, 0}, {0.9649, 0.02}, {0.975, 0.001}, {0.955, 0.03}, {0.99, 0.05}} {
		cmp := g.Compare(p.Ns, p.R)
		in68, in95 := c.Inside(p.Ns, p.R)
		if in68 != cmp.Inside68 || in95 != cmp.Inside95 || c.DeltaChi2(p.Ns, p.R) != cmp.DeltaChi2 {
			t.Errorf("%v: Inside %v %v, Compare %+v", p, in68, in95, cmp)
		}
		if in68 != (cmp.DeltaChi2 <= d68) || in95 != (cmp.DeltaChi2 <= d95) {
			t.Errorf("%v: Inside disagrees with Levels", p)
		}
	}
}

// TestP68P95: erf(1/sqrt 2) = 0.682689, erf(2/sqrt 2) = 0.954500
// (Abramowitz & Stegun 1964, table 26.1, the normal probability within
// 1 and 2 sigma).
func TestP68P95(t *testing.T) {
	if math.Abs(P68-0.682689) > 1e-6 || math.Abs(P95-0.954500) > 1e-6 {
		t.Errorf("P68 = %.7f, P95 = %.7f", P68, P95)
	}
}
