package canonical

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// TestHalfLineQuadrature: on the E-model's half-plane y > 0 with
// K(y) = 3 alpha/(2 y^2), the integral of sqrt(K) from 1 to y is
// sqrt(3 alpha/2) ln y (Kallosh, Linde & Roest 2013, arXiv:1311.0472).
// The quadrature in u = ln y reproduces it to 1e-14 relative from alpha =
// 1e-2 to 1e2 and for y up to e^245 (the top of the alpha = 1e-2 sample);
// the integrand is constant in u, so one Gauss–Kronrod panel suffices and
// only rounding is left. Where the quadrature in y itself is cheap (alpha
// = 1, y <= 100) the two agree to 1e-13 relative (the change of variables
// is exact; each quadrature is accurate to its 1e-13 tolerance).
func TestHalfLineQuadrature(t *testing.T) {
	quad := &num.QuadSettings{RelTol: 1e-13, AbsTol: 1e-14}
	for _, alpha := range []float64{1e-2, 0.1, 1.0 / 3, 1, 7.0 / 3, 10, 1e2} {
		m := mustNew(t, "e-model", map[string]float64{"alpha": alpha})
		integral := quadratureOfSqrtK(m.Native, quad, 0)
		for _, lnY := range []float64{-3, 1e-3, 0.5, 2, 10, 60, 245} {
			y := math.Exp(lnY)
			got, err := integral(y)
			if err != nil {
				t.Fatal(err)
			}
			want := math.Sqrt(1.5*alpha) * math.Log(y)
			if math.Abs(got-want) > 1e-14*math.Abs(want) {
				t.Errorf("alpha=%g, y=e^%g: quadrature %.17g, closed form %.17g", alpha, lnY, got, want)
			}
		}
	}
	m := mustNew(t, "e-model", map[string]float64{"alpha": 1})
	inU := quadratureOfSqrtK(m.Native, quad, 0)
	sqrtK := func(y float64) float64 { return math.Sqrt(m.Native.Kinetic(y)) }
	for _, y := range []float64{0.05, 0.7, 1.3, 10, 100} {
		a, err := inU(y)
		if err != nil {
			t.Fatal(err)
		}
		b, err := num.Integrate(sqrtK, 1, y, quad)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(a-b.Value) > 1e-13*math.Abs(b.Value) {
			t.Errorf("y=%g: in ln y %.17g, in y %.17g", y, a, b.Value)
		}
	}
}

// TestVerifyCatchesWrongHalfLineMaps: wrong maps and kinetic functions on
// the E-model's half-plane (quadrature in ln y, where the integrand is
// constant and each stretch is accepted from one panel of the 3-point
// Gauss rule with the midpoint rule embedded) fail Verify, naming the map.
func TestVerifyCatchesWrongHalfLineMaps(t *testing.T) {
	for _, alpha := range []float64{1e-2, 1, 1e2} {
		b := math.Sqrt(2 / (3 * alpha))
		for _, c := range []struct {
			name string
			to   func(y float64) float64
			from func(phi float64) float64
			k    func(y float64) float64
		}{
			{"map off by 1e-6", func(y float64) float64 { return (1 + 1e-6) * math.Log(y) / b },
				func(phi float64) float64 { return math.Exp(b * phi / (1 + 1e-6)) }, nil},
			{"kinetic function not squared", nil, nil, func(y float64) float64 { return 3 * alpha / (2 * y) }},
			{"kinetic function 1e-6 too large", nil, nil, func(y float64) float64 { return (1 + 1e-6) * 3 * alpha / (2 * y * y) }},
		} {
			m := mustNew(t, "e-model", map[string]float64{"alpha": alpha})
			cp := *m
			nf := *m.Native
			if c.to != nil {
				nf.ToCanonical, nf.FromCanonical = c.to, c.from
			}
			if c.k != nil {
				nf.Kinetic = c.k
			}
			cp.Native = &nf
			_, err := Verify(&cp, nil)
			if err == nil || !strings.Contains(err.Error(), "canonical map against the quadrature") {
				t.Errorf("alpha=%g, %s: error %v", alpha, c.name, err)
			}
		}
	}
}
