package num

import (
	"math"
	"testing"
)

// Polish must return the same float64 whatever bracket the root finder
// started from: here sqrt(2) as the root of x^2 - 2 (common practice:
// the float64 nearest sqrt(2) is math.Sqrt2 rounded), found from brackets
// of different widths.
func TestPolishIsBracketIndependent(t *testing.T) {
	f := func(x float64) float64 { return x*x - 2 }
	var got []float64
	for _, br := range [][2]float64{{1, 2}, {0, 10}, {1.4, 1.5}, {-0.5, 3.7}} {
		lo := math.Max(br[0], 0)
		r, err := Brent(f, lo, br[1], &RootSettings{XTol: 1e-9})
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, Polish(f, r.X))
	}
	for _, g := range got[1:] {
		if g != got[0] {
			t.Fatalf("polished roots differ: %v", got)
		}
	}
	x := got[0]
	if f(x) < 0 || f(math.Nextafter(x, 0)) >= 0 {
		t.Fatalf("Polish returned %v: want the float just at or above the sign change", x)
	}
	if math.Abs(x-math.Sqrt2) > 2e-16 {
		t.Fatalf("Polish returned %v, want %v", x, math.Sqrt2)
	}
}
