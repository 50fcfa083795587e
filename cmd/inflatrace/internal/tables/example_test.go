package tables_test

import (
	"os"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
	"github.com/inflatrace/inflatrace/stages/study"
)

// A LaTeX table of one invented prediction compared with two invented
// constraint sets of the demo scenario: one row, a column group per set.
func ExampleWrite() {
	v, d1, d2, s1, s2 := 1.62e16, 0.52, 3.9, 0.31, 1.5
	rows := []study.Result{
		{Label: "att(alpha=1/3) | N*=55 | orrery-a", Model: "alpha-attractor", Params: map[string]float64{"alpha": 1.0 / 3}, NStar: 55, Ns: 0.963636, R: 0.0013223, EnergyScaleGeV: &v, Constraint: "orrery-a", DeltaChi2: &d1, NSigma: &s1},
		{Label: "att(alpha=1/3) | N*=55 | orrery-b", Model: "alpha-attractor", Params: map[string]float64{"alpha": 1.0 / 3}, NStar: 55, Ns: 0.963636, R: 0.0013223, EnergyScaleGeV: &v, Constraint: "orrery-b", DeltaChi2: &d2, NSigma: &s2},
	}
	tables.Write(os.Stdout, rows, tables.Options{Format: tables.LaTeX, Columns: []string{"param.alpha", "N_star", "n_s", "r", "delta_chi2", "n_sigma"}, Digits: 3})
	// Output:
	// \begin{tabular}{rS[table-format=2.1,group-digits=none]S[table-format=1.3,group-digits=none]S[table-format=1.5,group-digits=none]S[table-format=1.3,group-digits=none]S[table-format=1.3,group-digits=none]S[table-format=1.2,group-digits=none]S[table-format=1.2,group-digits=none]}
	// \toprule
	//  &  &  &  & \multicolumn{2}{c}{orrery-a} & \multicolumn{2}{c}{orrery-b} \\
	// \cmidrule(lr){5-6} \cmidrule(lr){7-8}
	// $\alpha$ & {$N_*$} & {$n_s$} & {$r$} & {$\Delta\chi^2$} & {$n_\sigma$} & {$\Delta\chi^2$} & {$n_\sigma$} \\
	// \midrule
	// $1/3$ & 55.0 & 0.964 & 0.00132 & 0.520 & 0.310 & 3.90 & 1.50 \\
	// \bottomrule
	// \end{tabular}
}
