package model

import (
	"math"
	"testing"
)

// TestPlateauReach: the E-model's count from phi = 0, c (e^(b phi) - 1 -
// b phi) (families.go; against quadrature in TestClosedFormEfolds), is
// rangeEfolds at plateauReach(c, b) to 1e-13 relative (Newton's method
// stops at rounding), for c over 24 decades: from the monomial limit
// (large c, x = b phi small) to the steep plateau (small c, where the
// start sqrt(2 T) alone would overflow e^x).
func TestPlateauReach(t *testing.T) {
	for i := 0; i <= 48; i++ {
		c := math.Pow(10, -12+24*float64(i)/48)
		for _, b := range []float64{1e-3, 1, 30} {
			phi := plateauReach(c, b)
			x := b * phi
			if N := c * expm1MinusX(x); !(math.Abs(N-rangeEfolds) <= 1e-13*rangeEfolds) {
				t.Errorf("c=%g b=%g: N(%g) = %.15g, want %d", c, b, phi, N, rangeEfolds)
			}
		}
	}
}

// TestAlphaAttractorRanges: the E-model's and T-model's ranges end at
// the larger of their plateau floors (30/b and 14 sqrt(6 alpha)) and the
// field where their closed-form e-folds from phi = 0 reach rangeEfolds
// ((3 alpha/(2n)) sinh^2(phi/sqrt(6 alpha)) = rangeEfolds for the
// T-model), to 1e-13 relative, over twenty decades of alpha and four of n
// (the floors hold 600 e-folds except below alpha ~ 1e-10 n).
func TestAlphaAttractorRanges(t *testing.T) {
	roots := 0 // ranges set by the e-fold count rather than the floor
	for i := 0; i <= 80; i++ {
		alpha := math.Pow(10, -14+20*float64(i)/80)
		for _, n := range []float64{0.01, 1, 100} {
			e := mustNew(t, "e-model", map[string]float64{"alpha": alpha, "n": n})
			b := math.Sqrt(2 / (3 * alpha))
			want := math.Max(30/b, plateauReach(3*alpha/(4*n), b))
			if !(math.Abs(e.Hi-want) <= 1e-13*want) {
				t.Errorf("e-model alpha=%g n=%g: range up to %.15g, want %.15g", alpha, n, e.Hi, want)
			}
			tm := mustNew(t, "t-model", map[string]float64{"alpha": alpha, "n": n})
			s := math.Sqrt(6 * alpha)
			if floor := 14 * s; tm.Hi != floor {
				roots++
				sh := math.Sinh(tm.Hi / s)
				if N := 3 * alpha / (2 * n) * sh * sh; !(math.Abs(N-rangeEfolds) <= 1e-13*rangeEfolds) || !(tm.Hi > floor) {
					t.Errorf("t-model alpha=%g n=%g: N(%g) = %.15g, want %d (floor %g)", alpha, n, tm.Hi, N, rangeEfolds, floor)
				}
			}
			if 30/b != e.Hi {
				roots++
			}
		}
	}
	if roots < 20 {
		t.Errorf("only %d ranges end at the e-fold count", roots)
	}
}
