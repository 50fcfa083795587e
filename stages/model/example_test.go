package model_test

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/model"
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
	// Output: unknown model family "quintic" (known: e-model, hilltop, natural, power-law, starobinsky, t-model)
}
