package reheat

import (
	"math"
	"math/big"
	"testing"
)

// TestFourthRoot: two square roots give x^(1/4) within one unit in the
// last place of the fourth root taken in 200-bit arithmetic (math/big)
// over the whole float64 range, subnormals included (each root is
// correctly rounded; the second halves the first's relative error), and
// the special values of math.Pow(x, 0.25): 0, +Inf, NaN below zero.
func TestFourthRoot(t *testing.T) {
	for e := -1074; e <= 1023; e += 7 {
		for _, m := range []float64{1, 1.37, 1.999} {
			x := math.Ldexp(m, e)
			if x == 0 || math.IsInf(x, 0) {
				continue
			}
			r := new(big.Float).SetPrec(200).SetFloat64(x)
			r.Sqrt(r)
			r.Sqrt(r)
			want, _ := r.Float64()
			if got := fourthRoot(x); math.Abs(got-want) > math.Abs(want)*0x1p-52 {
				t.Errorf("fourthRoot(%g) = %.17g, want %.17g", x, got, want)
			}
		}
	}
	if fourthRoot(0) != 0 || !math.IsInf(fourthRoot(math.Inf(1)), 1) || !math.IsNaN(fourthRoot(-1)) || fourthRoot(16) != 2 {
		t.Errorf("special values: %g %g %g %g", fourthRoot(0), fourthRoot(math.Inf(1)), fourthRoot(-1), fourthRoot(16))
	}
}
