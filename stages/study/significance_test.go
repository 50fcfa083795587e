package study

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// lineageAt is a result's lineage for a prediction (n_s, r) compared with
// the set given by params, with the compare outputs the stage reports.
func lineageAt(params pipeline.Values, ns, r float64) []StageOutputs {
	reheat := pipeline.Values{"n_s": pipeline.Float(ns, pipeline.UnitNone), "r": pipeline.Float(r, pipeline.UnitNone)}
	var out pipeline.Values
	if g, ok := nodes.GaussianFrom(params); ok {
		c := g.Compare(ns, r)
		out = pipeline.Values{
			"constraint": pipeline.String(g.Name),
			"delta_chi2": pipeline.Float(c.DeltaChi2, pipeline.UnitNone),
			"n_sigma":    pipeline.Float(c.Sigmas, pipeline.UnitNone),
			"inside_68":  pipeline.String(map[bool]string{true: "yes", false: "no"}[c.Inside68]),
			"inside_95":  pipeline.String(map[bool]string{true: "yes", false: "no"}[c.Inside95]),
		}
	}
	return []StageOutputs{
		{Stage: nodes.ReheatStage, Outputs: reheat},
		{Stage: nodes.CompareStage, Outputs: out, Params: params},
	}
}

// TestResultCarriesBothReadings: the BICEP/Keck 2018 limit as shipped
// (planck2018-bk18: r_0.05 < 0.036 at 95%, BICEP/Keck Collaboration 2021,
// arXiv:2110.00483, abstract). A model at the set's mean n_s exactly on
// the bound is reported at Delta chi^2 = 3.84, 1.45 sigma, inside_95 by
// the two-parameter reading, with r95 = 0.036 (to rounding) and
// exceeds_r95 false; one ulp above, exceeds_r95 is true and inside_95
// still true.
func TestResultCarriesBothReadings(t *testing.T) {
	g, err := Shipped("planck2018-bk18")
	if err != nil {
		t.Fatal(err)
	}
	params := nodes.GaussianParams(g)
	at := Assemble("at", "k", lineageAt(params, g.MeanNs, g.R95()))
	if at.R95 == nil || at.ExceedsR95 == nil || math.Abs(*at.R95-0.036) > 1e-17 {
		t.Fatalf("r95 = %v, exceeds_r95 = %v; want 0.036 and a flag", at.R95, at.ExceedsR95)
	}
	if *at.ExceedsR95 || !*at.Inside95 || math.Abs(*at.DeltaChi2-3.8415) > 5e-5 || math.Abs(*at.NSigma-1.452) > 1e-3 {
		t.Errorf("on the bound: exceeds %v, inside_95 %v, Delta chi^2 %v, %v sigma; want false, true, 3.84, 1.45",
			*at.ExceedsR95, *at.Inside95, *at.DeltaChi2, *at.NSigma)
	}
	above := Assemble("above", "k", lineageAt(params, g.MeanNs, math.Nextafter(g.R95(), 1)))
	if !*above.ExceedsR95 || !*above.Inside95 {
		t.Errorf("one ulp above the bound: exceeds %v, inside_95 %v; want true, true", *above.ExceedsR95, *above.Inside95)
	}
	// A bound the compare stage reports itself is the one shown.
	lin := lineageAt(params, g.MeanNs, 0.02)
	lin[1].Outputs["r95"] = pipeline.Float(0.01, pipeline.UnitNone)
	lin[1].Outputs["exceeds_r95"] = pipeline.String("yes")
	if res := Assemble("own", "k", lin); *res.R95 != 0.01 || !*res.ExceedsR95 {
		t.Errorf("the stage's own r95 was overridden: %v %v", *res.R95, *res.ExceedsR95)
	}
	// Without the parameters (a lineage read from elsewhere) nothing is
	// invented.
	lin = lineageAt(params, g.MeanNs, 0.02)
	lin[1].Params = nil
	if res := Assemble("bare", "k", lin); res.R95 != nil || res.ExceedsR95 != nil {
		t.Errorf("r95 reported without the constraint's parameters: %v", res.R95)
	}
}

// TestOneDimensionalBound: forecasts have none; a sample set's is the 95%
// quantile of its r, the same number its density estimate uses.
func TestOneDimensionalBound(t *testing.T) {
	f, err := ShippedForecast("litebird")
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := OneDimensionalBound(nodes.ForecastParams(f)); ok {
		t.Error("a forecast has a one-dimensional bound")
	}
	pts := make([]compare.Point, 200)
	for i := range pts {
		pts[i] = compare.Point{Ns: 0.96 + 1e-4*float64(i%7), R: 1e-4 * float64(i)}
	}
	k, err := compare.NewKDE("line", "test", pts)
	if err != nil {
		t.Fatal(err)
	}
	r95, ok := OneDimensionalBound(nodes.SamplesParams("line", "test", pts))
	if !ok || r95 != k.R95() {
		t.Errorf("sample bound %v (%v), the estimate's %v", r95, ok, k.R95())
	}
	// r runs evenly over 0 .. 0.0199: its 95% quantile is near 0.95 x 0.0199.
	if math.Abs(r95-0.95*0.0199) > 2e-4 {
		t.Errorf("sample bound %v, want about %v", r95, 0.95*0.0199)
	}
}

// TestShippedDataStatements: what the shipped files must say beside their
// numbers.
func TestShippedDataStatements(t *testing.T) {
	// The P-ACT-LB table value rounds to the abstract's n_s = 0.974 ± 0.003
	// (Louis et al. 2025, arXiv:2503.14452, abstract).
	g, err := Shipped("act-dr6-bk18-2025")
	if err != nil {
		t.Fatal(err)
	}
	if math.Round(g.MeanNs*1000) != 974 || math.Round(g.SigmaNs*1000) != 3 {
		t.Errorf("act-dr6-bk18-2025: n_s = %v ± %v does not round to the abstract's 0.974 ± 0.003", g.MeanNs, g.SigmaNs)
	}
	// CMB-S4: DOE and NSF stopped supporting the project on 9 July 2025
	// (statement on cmb-s4.org); the citation, which travels with every
	// comparison into the ledger, says so.
	f, err := ShippedForecast("cmb-s4")
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"design target", "9 July 2025"} {
		if !strings.Contains(f.Citation, want) {
			t.Errorf("cmb-s4 citation %q lacks %q", f.Citation, want)
		}
	}
	// The BK18 limit is cited to BICEP/Keck 2021 and the PR4 limit to
	// Tristram et al. 2022.
	for name, want := range map[string]string{"planck2018-bk18": "arXiv:2110.00483", "planck-pr4-bk18-bao-2022": "arXiv:2112.07961"} {
		g, err := Shipped(name)
		if err != nil || !strings.Contains(g.Citation, want) {
			t.Errorf("%s: citation %q (%v), want %s", name, g.Citation, err, want)
		}
	}
}
