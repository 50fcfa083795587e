package slowroll_test

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// Chaotic inflation with V = phi^2, 60 e-folds before the end: the
// textbook n_s = 1 - 2/(N + 1/2) = 0.966942 and r = 8/(N + 1/2) = 0.132231.
func ExampleSolution_Evaluate() {
	f, _ := model.Lookup("power-law")
	m, _ := f.New(map[string]float64{"p": 2})
	sol, err := slowroll.Solve(m, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	p, o, err := sol.Evaluate(60)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("phi_end=%.6f phi*=%.6f n_s=%.6f r=%.6f\n", sol.End.Phi, p.Phi, o.Ns, o.R)
	// Output: phi_end=1.414214 phi*=15.556349 n_s=0.966942 r=0.132231
}

// A range in which inflation never ends is refused.
func ExampleSolve_rangeError() {
	f, _ := model.Lookup("power-law")
	m, _ := f.New(map[string]float64{"p": 2})
	r, _ := m.WithRange(5, 20)
	_, err := slowroll.Solve(r, nil)
	fmt.Println(err)
	// Output: power-law(p=2): inflation never ends: epsilon_V < 1 everywhere (largest 0.08) (field range 5 < phi < 20 M_p)
}
