package model_test

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// Build the T-model with alpha = 1 (n defaults to 1) and evaluate the
// potential and its slope at phi = 2: tanh^2(2/sqrt 6) = 0.453142 and
// 2 tanh sech^2/sqrt 6 = 0.300570 (by hand).
func ExampleFamily_New() {
	f, err := model.Lookup("t-model")
	if err != nil {
		fmt.Println(err)
		return
	}
	m, err := f.New(map[string]float64{"alpha": 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	j := m.At(2)
	fmt.Println(m.Describe(), m.Native.MapFormula)
	fmt.Printf("V=%.6f V'=%.6f\n", j.V, j.D1)
	// Output:
	// t-model(alpha=1, n=1) chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha))
	// V=0.453142 V'=0.300570
}

// An unknown family name lists the built-in ones.
func ExampleLookup() {
	_, err := model.Lookup("quintic")
	fmt.Println(err)
	// Output: unknown model family "quintic" (known: brane, coleman-weinberg, e-model, exponential-plateau, higgs, hilltop, hilltop-quadratic, hilltop-quartic, loop, natural, power-law, radion-assisted-gauge, starobinsky, t-model, two-plateau)
}

// A model written on its own field with a kinetic function and no
// closed-form canonical map: the Higgs-like field h with
// K(h) = (1 + xi h^2 + 6 xi^2 h^2)/(1 + xi h^2)^2 and V = h^4/(1 + xi h^2)^2
// for xi = 100 (Bezrukov & Shaposhnikov 2008, arXiv:0710.3755). NewNative
// normalises h numerically; the search range is given in h. At h = 0.2 the
// exact canonical field is 1.98153 and at h = 1 it is 5.66601 (the closed
// form in kinetic's tests, derived there); the potential at h = 0.2 is
// 0.0016/25 = 6.4e-5.
func ExampleNewNative() {
	const xi = 100.0
	K := func(h num.Jet) num.Jet {
		h2 := num.Mul(h, h)
		om := num.AddConst(num.Scale(xi, h2), 1)
		return num.Div(num.Add(om, num.Scale(6*xi*xi, h2)), num.Mul(om, om))
	}
	V := func(h num.Jet) num.Jet {
		h2 := num.Mul(h, h)
		om := num.AddConst(num.Scale(xi, h2), 1)
		return num.Div(num.Mul(h2, h2), num.Mul(om, om))
	}
	m, err := model.NewNative(model.NativeSpec{
		Family: "my-higgs", Params: map[string]float64{"xi": xi}, Field: "h",
		V: V, K: K, Origin: 0, Lo: math.Inf(-1), Hi: math.Inf(1),
		SearchLo: 0, SearchHi: 1, SearchInField: true,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	phi := m.Native.ToCanonical(0.2)
	fmt.Printf("%s: phi(h=0.2)=%.5f V=%.3g, searched 0 < phi < %.4f\n", m.Describe(), phi, m.At(phi).V, m.Hi)
	// Output: my-higgs(xi=100): phi(h=0.2)=1.98153 V=6.4e-05, searched 0 < phi < 5.6660
}
