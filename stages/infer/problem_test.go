package infer

import (
	"math"
	"sort"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// cmb2025 is the n_s-r constraint of Balkenhol et al. 2025 (arXiv:
// 2512.10613, abstract: n_s = 0.9682 ± 0.0032, r < 0.034 at 95%), as a
// Gaussian with sigma_r = 0.034/1.96 (common practice for a one-sided
// limit).
var cmb2025 = compare.Gaussian{Name: "cmb-2025", MeanNs: 0.9682, SigmaNs: 0.0032, MeanR: 0, SigmaR: 0.034 / compare.HalfNormal95}

func starobinskyReheating(w float64) Problem {
	return Problem{
		Family: "e-model", Params: []Prior{{Name: "alpha", Kind: Fixed, Value: 1}, {Name: "n", Kind: Fixed, Value: 1}},
		W: Prior{Name: "w_reh", Kind: Fixed, Value: w}, As: 2.1e-9, History: reheat.DefaultHistory(), Like: cmb2025,
	}
}

// TestReheatingPosteriorIsPhysical: for the Starobinsky model (the
// E-model at alpha = 1) with w_reh = 0, every node's T_reh lies between
// the BBN bound and the instantaneous maximum, N* falls as T_reh falls
// (less expansion after inflation leaves fewer e-folds for the pivot's
// exit; Liddle & Leach 2003, PRD 68, 103503, astro-ph/0305263), and the
// evidence converges to the stated tolerance.
func TestReheatingPosteriorIsPhysical(t *testing.T) {
	f, d, err := starobinskyReheating(0).Integrand()
	if err != nil {
		t.Fatal(err)
	}
	res, err := Integrate(f, d, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.LnZErr > 0.01 {
		t.Errorf("ln Z error %.3g above 0.01", res.LnZErr)
	}
	lo := math.Log10(reheat.DefaultBBNBoundGeV)
	order := make([]int, len(res.LnF))
	for i := range order {
		order[i] = i
		if T := res.Derived[i][1]; T < lo-1e-9 || T > 16.5 {
			t.Fatalf("node %d: log10 T_reh = %g outside [BBN, T_max]", i, T)
		}
	}
	sort.Slice(order, func(a, b int) bool { return res.Derived[order[a]][1] < res.Derived[order[b]][1] })
	for j := 1; j < len(order); j++ {
		a, b := res.Derived[order[j-1]], res.Derived[order[j]]
		if b[3] < a[3]-1e-9 {
			t.Fatalf("N* = %.6f at log10 T_reh = %.4f, below %.6f at the cooler %.4f", b[3], b[1], a[3], a[1])
		}
	}
	q := res.Quantiles(func(i int) float64 { return res.Derived[i][1] }, 0.05, 0.5)
	t.Logf("ln Z = %.4f ± %.2g (%d evaluations); log10 T_reh: 5%% %.2f, median %.2f", res.LnZ, res.LnZErr, res.Evals, q[0].Value, q[1].Value)
}
