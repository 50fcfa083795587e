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
		got = append(got, Polish(f, r.X, lo, br[1]))
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

// Where rounding noise makes |f| smaller on the side away from the root,
// Polish must still stay at the root and inside its bracket (a case found
// in a slow-roll end: f = epsilon_V - 1 of V = 1 - (1 - t) e^t,
// t = 4 ln(phi/10)).
func TestPolishStaysAtANoisyRoot(t *testing.T) {
	f := func(phi float64) float64 {
		tt := 4 * math.Log(phi/10)
		v := 1 - (1-tt)*math.Exp(tt)
		dv := tt * math.Exp(tt) * 4 / phi // dV/dphi
		u := dv / v
		return 0.5*u*u - 1
	}
	r, err := Brent(f, 8, 9.5, nil)
	if err != nil {
		t.Fatal(err)
	}
	x := Polish(f, r.X, 8, 9.5)
	if math.Abs(x-r.X) > 1e-12*r.X || x < 8 || x > 9.5 {
		t.Fatalf("Polish moved the root from %v to %v", r.X, x)
	}
}
