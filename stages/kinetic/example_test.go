package kinetic_test

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/kinetic"
	"github.com/inflatrace/inflatrace/stages/num"
)

// The Poincaré disk of the alpha-attractors with alpha = 1:
// K(chi) = 1/(1 - chi^2/6)^2 on |chi| < sqrt 6. The map reproduces
// chi = sqrt(6) tanh(phi/sqrt 6) = 0.7727 at phi = 0.8 and
// dchi/dphi = sech^2(0.8/sqrt 6) = 0.9005 (by hand), and the boundary is at
// infinite canonical distance.
func ExampleNew() {
	K := func(chi num.Jet) num.Jet {
		q := num.AddConst(num.Scale(-1.0/6, num.Mul(chi, chi)), 1)
		return num.Recip(num.Mul(q, q))
	}
	m, err := kinetic.New(K, 0, -math.Sqrt(6), math.Sqrt(6), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	x := m.XJet(num.Var(0.8))
	lo, hi := m.PhiRange()
	fmt.Printf("chi=%.4f dchi/dphi=%.4f image=(%g, %g)\n", x.V, x.D1, lo, hi)
	// Output: chi=0.7727 dchi/dphi=0.9005 image=(-Inf, +Inf)
}

// A kinetic function that vanishes inside the domain is refused, with the
// place.
func ExampleNew_error() {
	K := func(x num.Jet) num.Jet { return x } // K(x) = x < 0 for x < 0
	_, err := kinetic.New(K, 0.5, -1, 1, nil)
	fmt.Println(err)
	// Output: kinetic: K(-0.25) = -0.25 is not positive inside the domain (-1, 1)
}
