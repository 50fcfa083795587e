package compare

import (
	"math"
	"sort"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Chi2Level and linInterpQuantile replace two calls into gonum (whose
// arithmetic a fusing build may round differently); they must keep
// gonum's definitions: distuv.ChiSquared{K: 2}.Quantile and stat.Quantile
// with stat.LinInterp (gonum v0.17.0, the reference library).
func TestOwnQuantilesAgreeWithGonum(t *testing.T) {
	for _, P := range []float64{1e-9, 0.1, 0.5, P68, 0.9, P95, 0.99, 0.9973, 1 - 1e-12} {
		want := distuv.ChiSquared{K: 2}.Quantile(P)
		if got := Chi2Level(P); math.Abs(got-want) > 1e-12*math.Max(1, want) {
			t.Errorf("Chi2Level(%g) = %.17g, gonum %.17g", P, got, want)
		}
	}
	for _, n := range []int{1, 2, 3, 7, 100, 1001} {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Sin(float64(7*i+1)) * float64(i%13)
		}
		sort.Float64s(x)
		for _, p := range []float64{0, 1e-3, 0.05, 1 - P95, 1 - P68, 0.5, 0.95, 0.999, 1} {
			want := stat.Quantile(p, stat.LinInterp, x, nil)
			if got := linInterpQuantile(p, x); math.Abs(got-want) > 1e-15*math.Max(1, math.Abs(want)) {
				t.Errorf("n=%d: quantile(%g) = %.17g, gonum %.17g", n, p, got, want)
			}
		}
	}
}
