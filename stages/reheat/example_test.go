package reheat_test

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/reheat"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// Instantaneous reheating for the Starobinsky model with A_s = 2.099e-9
// and the default history gives N* = 55.56, n_s = 0.96532, r = 0.00343
// (computed at first order in slow roll from the matching k* = a* H* with
// entropy conservation, N* = ln(a_0 T_0/k*) + (1/3) ln(g_s0/g_s,reh) +
// ln(H*/T_reh), T_reh = (30 rho_end/(pi^2 g))^(1/4): Liddle & Leach 2003,
// PRD 68, 103503, astro-ph/0305263, equation number from memory).
func ExampleInstant() {
	f, _ := model.Lookup("starobinsky")
	m, _ := f.New(nil)
	sol, err := slowroll.Solve(m, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	pr, err := reheat.Instant(sol, reheat.DefaultHistory(), reheat.Normalisation{As: 2.099e-9})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("N*=%.2f n_s=%.5f r=%.5f H*=%.3g GeV\n", pr.N, pr.Obs.Ns, pr.Obs.R, reheat.GeV(pr.Scale.Hstar))
	// Output: N*=55.56 n_s=0.96532 r=0.00343 H*=1.45e+13 GeV
}
