package infer

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// planck18BK18 is the n_s of Planck 2018 VI (Aghanim et al. 2020,
// arXiv:1807.06209, Table 2, TT,TE,EE+lowE+lensing: 0.9649 ± 0.0042) with
// the BK18 limit r_0.05 < 0.036 at 95% (BICEP/Keck 2021, arXiv:2110.00483,
// abstract), as the shipped set planck2018-bk18 holds them.
var planck18BK18 = compare.Gaussian{Name: "planck2018-bk18", MeanNs: 0.9649, SigmaNs: 0.0042, SigmaR: 0.036 / compare.HalfNormal95}

// planckPriors is a problem with reheating priors in the spirit of Planck
// 2018 X (Akrami et al. 2020, arXiv:1807.06211, Sect. 5, from memory):
// w_reh uniform up to 1 and a thermalisation scale log-uniform from 1 TeV
// to the end of inflation. Planck's w prior starts at -1/3; ours must stay
// above it (-1/3 itself is not a reheating era), so it starts at -0.3.
func planckPriors(family string, params []Prior, w Prior, like Likelihood) Problem {
	return Problem{Family: family, Params: params, W: w, TLoGeV: 1e3, As: 2.1e-9, History: reheat.DefaultHistory(), Like: like}
}

// fit integrates p and returns ln Z and the least Delta chi^2 over the
// rule's nodes (the profile minimum: the nodes crowd where the likelihood
// is large).
func fit(t *testing.T, p Problem) (lnZ, lnZErr, chi2min float64) {
	t.Helper()
	f, d, err := p.Integrand()
	if err != nil {
		t.Fatal(err)
	}
	res, err := Integrate(f, d, nil)
	if err != nil {
		t.Fatal(err)
	}
	best := math.Inf(-1)
	for _, l := range res.LnF {
		best = math.Max(best, l)
	}
	return res.LnZ, res.LnZErr, -2 * best
}

// TestPublishedModelRanking compares evidences and exclusions with
// published statements, for the priors of planckPriors:
//
//   - Planck 2015 XX (Ade et al. 2016, arXiv:1502.02114, abstract): "V ∝
//     φ² and natural inflation are now disfavoured compared to models
//     predicting a smaller tensor-to-scalar ratio, such as R² inflation".
//     Its Table 6 gives ln B = -4.7 for φ² against R² (Planck TT+lowP,
//     quoted in secondary sources). With BK18's r < 0.036, three times
//     tighter than Planck 2015's r < 0.11, the quadratic model must now be
//     decisively disfavoured: ln B < -4.7, and "decisive" on Jeffreys'
//     scale. Natural inflation must be disfavoured too (ln B < 0).
//   - Stein & Kinney 2022 (arXiv:2106.02089, abstract): natural inflation
//     is disfavoured at more than 95% CL by Planck 2018 + BK15 + BAO for
//     conventional reheating (w_reh <= 1/3). With the BK18 + Planck PR4 +
//     BAO limit (r < 0.032, Tristram et al. 2022, arXiv:2112.07961,
//     abstract) its best point over f and T_reh must lie outside the 95%
//     region of (n_s, r): Delta chi^2 > 5.991 (two degrees of freedom).
//     Its f prior, log10 f in [0.3, 2.5], is Planck 2018 X's (from memory).
//   - The E-model alpha-attractor (alpha log-uniform in [0.01, 100], our
//     choice; Planck 2018 X's alpha prior differs, from memory) contains
//     the Starobinsky point and is not disfavoured against it by more than
//     "substantial" (|log10 B| < 1): Planck 2018 X lists both among the
//     models its data favour (from memory).
func TestPublishedModelRanking(t *testing.T) {
	wAll := Prior{Name: "w_reh", Kind: Uniform, Lo: -0.3, Hi: 1}
	staro := []Prior{{Name: "alpha", Kind: Fixed, Value: 1}, {Name: "n", Kind: Fixed, Value: 1}}
	ref, refErr, refChi2 := fit(t, planckPriors("e-model", staro, wAll, planck18BK18))
	quad, quadErr, quadChi2 := fit(t, planckPriors("power-law", []Prior{{Name: "p", Kind: Fixed, Value: 2}}, wAll, planck18BK18))
	fPrior := []Prior{{Name: "f", Kind: LogUniform, Lo: math.Pow(10, 0.3), Hi: math.Pow(10, 2.5)}}
	nat, natErr, natChi2 := fit(t, planckPriors("natural", fPrior, wAll, planck18BK18))
	emod, emodErr, _ := fit(t, planckPriors("e-model", []Prior{{Name: "alpha", Kind: LogUniform, Lo: 0.01, Hi: 100}, {Name: "n", Kind: Fixed, Value: 1}}, wAll, planck18BK18))
	for _, e := range []float64{refErr, quadErr, natErr, emodErr} {
		if e > 0.01 {
			t.Errorf("ln Z error %.3g above the default tolerance 0.01", e)
		}
	}
	t.Logf("ln Z: Starobinsky %.3f (best Delta chi^2 %.2f), phi^2 %.3f (%.2f), natural %.3f (%.2f), E-model %.3f",
		ref, refChi2, quad, quadChi2, nat, natChi2, emod)
	if lnB := quad - ref; lnB > -4.7 || Grade(lnB) != "decisive" {
		t.Errorf("ln B(phi^2 / Starobinsky) = %.2f (%s): want below Planck 2015's -4.7 and decisive", lnB, Grade(lnB))
	}
	if lnB := nat - ref; lnB >= 0 {
		t.Errorf("ln B(natural / Starobinsky) = %.2f: natural inflation not disfavoured", lnB)
	}
	if lnB := emod - ref; math.Abs(lnB)/math.Ln10 >= 1 {
		t.Errorf("ln B(E-model / Starobinsky) = %.2f: the attractor family and its own alpha = 1 point differ by more than substantial evidence", lnB)
	}

	bao := compare.Gaussian{Name: "planck-pr4-bk18-bao-2022", MeanNs: 0.9649, SigmaNs: 0.0042, SigmaR: 0.032 / compare.HalfNormal95}
	conventional := Prior{Name: "w_reh", Kind: Uniform, Lo: -0.3, Hi: 1.0 / 3}
	_, _, chi2 := fit(t, planckPriors("natural", fPrior, conventional, bao))
	if chi2 <= 5.991 {
		t.Errorf("natural inflation with w_reh <= 1/3: best Delta chi^2 %.2f, inside the 95%% region (Stein & Kinney 2022 exclude it)", chi2)
	}
	_, _, stiff := fit(t, planckPriors("natural", fPrior, wAll, bao))
	t.Logf("natural inflation against %s: best Delta chi^2 %.2f for w_reh <= 1/3, %.2f for w_reh <= 1", bao.Name, chi2, stiff)
	if stiff > chi2 {
		t.Errorf("allowing stiffer reheating raised the best Delta chi^2 from %.2f to %.2f", chi2, stiff)
	}
}
