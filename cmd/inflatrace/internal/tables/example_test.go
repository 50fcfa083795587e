package tables_test

import (
	"os"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
	"github.com/inflatrace/inflatrace/stages/study"
)

// A LaTeX table of two invented predictions, ready to \input.
func ExampleWrite() {
	v := 1.62e16
	rows := []study.Result{
		{Label: "att(alpha=1) | N*=55 | x", Model: "alpha-attractor", Params: map[string]float64{"alpha": 1}, NStar: 55, Ns: 0.963636, R: 0.0039669, EnergyScaleGeV: &v},
		{Label: "att(alpha=10) | N*=55 | x", Model: "alpha-attractor", Params: map[string]float64{"alpha": 10}, NStar: 55, Ns: 0.963636, R: 0.039669},
	}
	tables.Write(os.Stdout, rows, tables.Options{Format: tables.LaTeX, Columns: []string{"param.alpha", "N_star", "n_s", "r", "energy_scale_GeV"}, Digits: 3})
	// Output:
	// \begin{tabular}{rrrrr}
	// \hline
	// $\alpha$ & $N_*$ & $n_s$ & $r$ & $V_*^{1/4}$ [GeV] \\
	// \hline
	// $1$ & $55.0$ & $0.964$ & $0.00397$ & $1.62\times10^{16}$ \\
	// $10$ & $55.0$ & $0.964$ & $0.0397$ & --- \\
	// \hline
	// \end{tabular}
}
