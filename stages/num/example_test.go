package num_test

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num"
)

// The potential V = tanh^2(phi) and its first three derivatives at
// phi = 0.5, exactly (to rounding) in one evaluation; by hand, with
// T = tanh(0.5) and S = 1 - T^2: 2TS, 2S(1 - 3T^2), 8TS(3T^2 - 2).
func ExampleJet() {
	v := num.PowConst(num.Tanh(num.Var(0.5)), 2)
	fmt.Printf("V=%.6f V'=%.6f V''=%.6f V'''=%.6f\n", v.V, v.D1, v.D2, v.D3)
	// Output: V=0.213552 V'=0.726862 V''=0.565209 V'''=-3.952220
}

// The integrable end-point singularity of 1/sqrt(x) on [0, 1].
func ExampleIntegrate() {
	r, err := num.Integrate(func(x float64) float64 { return 1 / math.Sqrt(x) }, 0, 1, nil)
	fmt.Printf("%.10f %v\n", r.Value, err)
	// Output: 2.0000000000 <nil>
}

// The real root of Wallis's cubic x^3 - 2x - 5.
func ExampleBrent() {
	r, err := num.Brent(func(x float64) float64 { return x*x*x - 2*x - 5 }, 2, 3, nil)
	fmt.Printf("%.12f %v\n", r.X, err)
	// Output: 2.094551481542 <nil>
}
