package model

import (
	"math"
	"testing"
)

// bisectReach is reachAt's bisection with every midpoint evaluated: the
// reference reachAt must reproduce to the bit.
func bisectReach(efolds func(phi float64) float64, from, w float64) float64 {
	hi := reach(efolds, from, w)
	lo := from
	if d := hi - from; d > w {
		lo = from + d/2
	}
	for i := 0; i < 200 && hi-lo > 1e-9*math.Abs(hi); i++ {
		mid := lo + (hi-lo)/2
		if n := efolds(mid); n >= rangeEfolds || math.IsInf(n, 1) || math.IsNaN(n) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}

// TestReachAtIsTheBisection: reachAt answers the bisection's comparisons
// from a root bracket where it can, which must not change its result: for
// the e-model's and t-model's closed-form N(phi) (families.go) over twelve
// decades of alpha and four of n, and for a function whose crossing lies
// exactly on a bisection midpoint, it equals the plain bisection to the
// bit, and it counts fewer evaluations.
func TestReachAtIsTheBisection(t *testing.T) {
	type fn struct {
		name    string
		efolds  func(float64) float64
		from, w float64
	}
	var fns []fn
	for i := 0; i <= 48; i++ {
		alpha := math.Pow(10, -6+12*float64(i)/48)
		for _, n := range []float64{0.01, 0.5, 1, 3, 100} {
			b := math.Sqrt(2 / (3 * alpha))
			fns = append(fns, fn{"e-model", func(phi float64) float64 { return 3 * alpha / (4 * n) * (math.Expm1(b*phi) - b*phi) }, 0, 1 / (8 * b)})
			s := math.Sqrt(6 * alpha)
			fns = append(fns, fn{"t-model", func(phi float64) float64 { return 3 * alpha / (4 * n) * (math.Cosh(2*phi/s) - 1) }, 0, s / 8})
		}
	}
	// A straight line through rangeEfolds at phi = 3/4 of the bracket
	// [from + w, from + 2w] = [1, 2]: a dyadic midpoint of the bisection.
	fns = append(fns, fn{"line", func(phi float64) float64 { return rangeEfolds * (phi / 1.75) }, 0, 1})
	calls, plainCalls := 0, 0
	for _, f := range fns {
		counted := func(c *int) func(float64) float64 {
			return func(phi float64) float64 { *c++; return f.efolds(phi) }
		}
		got := reachAt(counted(&calls), f.from, f.w)
		want := bisectReach(counted(&plainCalls), f.from, f.w)
		if math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("%s: reachAt = %.17g, bisection %.17g", f.name, got, want)
		}
	}
	if !(calls < plainCalls) {
		t.Errorf("reachAt evaluated efolds %d times, the bisection %d", calls, plainCalls)
	}
	t.Logf("%d functions: %d evaluations, plain bisection %d", len(fns), calls, plainCalls)
}
