package slowroll_test

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// The exact prediction for the Starobinsky potential 55 e-folds before
// epsilon_H = 1, beside the second-order slow-roll formulas evaluated
// with the exact Hubble-flow parameters of the same pivot.
func ExampleExact() {
	f, _ := model.Lookup("starobinsky")
	m, _ := f.New(nil)
	r, err := slowroll.Exact(m, 55, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	sr := slowroll.SecondOrder(r.Flow)
	fmt.Printf("exact:        n_s = %.5f  r = %.5f  alpha_s = %.6f\n", r.Ns, r.R, r.AlphaS)
	fmt.Printf("second order: n_s = %.5f  r = %.5f  alpha_s = %.6f\n", sr.Ns, sr.R, sr.AlphaS)
	fmt.Printf("A_s = %.4g V0\n", r.PsV0)
	// Output:
	// exact:        n_s = 0.96490  r = 0.00355  alpha_s = -0.000620
	// second order: n_s = 0.96489  r = 0.00355  alpha_s = -0.000636
	// A_s = 18.54 V0
}

// Second-order slow roll from the potential alone, with the end of
// inflation calibrated once on a short exact background.
func ExampleSolution_SecondOrderAt() {
	f, _ := model.Lookup("power-law")
	m, _ := f.New(map[string]float64{"p": 2})
	sol, _ := slowroll.Solve(m, nil)
	cal, _ := sol.CalibrateEnd(nil)
	_, h, o, err := sol.SecondOrderAt(60, &cal)
	fmt.Printf("eps1 = %.5f eps2 = %.5f: n_s = %.5f r = %.4f (%v)\n", h.Eps1, h.Eps2, o.Ns, o.R, err)
	// Output:
	// eps1 = 0.00836 eps2 = 0.01668: n_s = 0.96645 r = 0.1322 (<nil>)
}
