package nodes

import (
	"context"
	"math"
	"reflect"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/infer"
)

// TestInferParamsRoundTrip: an inference's parameters decode to the same
// specification (priors sorted by name), so that the node recomputed by
// verify is the node that was recorded.
func TestInferParamsRoundTrip(t *testing.T) {
	for _, free := range []bool{false, true} {
		s := inferBench(free)
		vs, err := InferParams(s)
		if err != nil {
			t.Fatal(err)
		}
		if err := inferSpec.CheckParams(vs); err != nil {
			t.Fatalf("parameters refused by the stage's declaration: %v", err)
		}
		got, err := inferFrom(vs)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, s) {
			t.Errorf("round trip:\n got %+v\nwant %+v", got, s)
		}
	}
}

// TestStarobinskyNeedsStiffReheating: against ACT DR6 + Planck + DESI BAO
// (P-ACT-LB: n_s = 0.9743 ± 0.0034, Louis et al. 2025, arXiv:2503.14452;
// with BK18, r < 0.038 at 95%, Calabrese et al. 2025, arXiv:2503.14454),
// the Starobinsky model needs a stiff reheating era: Drees & Xu 2025
// (arXiv:2504.20757, abstract) find w_reh >~ 0.462 at 2 sigma, which
// excludes w_reh = 0. Here: the 95% profile-likelihood lower bound on
// w_reh (Delta chi^2 = 3.841) over w_reh in [0, 1] and T_reh from the BBN
// bound to its maximum. Their predictions go beyond first-order slow
// roll and their 2 sigma is their own reading of the data, so the bound
// is compared to 0.03.
func TestStarobinskyNeedsStiffReheating(t *testing.T) {
	s := inferBench(true)
	s.Params = []infer.Prior{{Name: "alpha", Kind: infer.Fixed, Value: 1}, {Name: "n", Kind: infer.Fixed, Value: 1}}
	s.W = infer.Prior{Name: "w_reh", Kind: infer.Uniform, Lo: 0, Hi: 1}
	s.Constraint = compare.Gaussian{Name: "p-act-lb-bk18", MeanNs: 0.9743, SigmaNs: 0.0034, SigmaR: 0.038 / compare.HalfNormal95}
	params, err := InferParams(s)
	if err != nil {
		t.Fatal(err)
	}
	out, err := Infer{}.Run(context.Background(), params, nil)
	if err != nil {
		t.Fatal(err)
	}
	lo := out["w_reh:profile_lo95"].Float
	if math.Abs(lo-0.462) > 0.03 {
		t.Errorf("95%% profile lower bound on w_reh = %.4f, Drees & Xu 2025 find about 0.462", lo)
	}
	if out["w_reh:lo95"].Float <= 0 {
		t.Errorf("the posterior's 95%% interval of w_reh reaches %g: w_reh = 0 not disfavoured", out["w_reh:lo95"].Float)
	}
	t.Logf("w_reh: profile 95%% lower bound %.4f, posterior median %.3f [%.3f, %.3f] (68%%); log10 T_reh profile 95%% upper %.2f",
		lo, out["w_reh:median"].Float, out["w_reh:lo68"].Float, out["w_reh:hi68"].Float, out["log10_T_reh_GeV:profile_hi95"].Float)
}

// TestInferProductOfSets: the product of a set's likelihood with itself
// is the likelihood of the same set with every sigma divided by sqrt 2
// (Delta chi^2 adds: 2 (x/sigma)^2 = (x/(sigma/sqrt 2))^2), so both give
// the same ln Z; and a product's parameters round-trip.
func TestInferProductOfSets(t *testing.T) {
	s := inferBench(false)
	s.Forecasts = nil
	twice := s
	g := s.Constraint
	g.Name = "copy"
	twice.Also = []compare.Gaussian{g}
	narrow := s
	narrow.Constraint.SigmaNs /= math.Sqrt2
	narrow.Constraint.SigmaR /= math.Sqrt2
	a, b := runInferSpec(t, twice), runInferSpec(t, narrow)
	if d := math.Abs(a["ln_Z"].Float - b["ln_Z"].Float); d > 1e-9 {
		t.Errorf("ln Z of the product %.10f, of the narrower set %.10f", a["ln_Z"].Float, b["ln_Z"].Float)
	}
}

// TestInferEfoldPriors: with a prior on N* itself, the Starobinsky
// model's n_s stays within 1 - 2/N* over the prior's range (the large-N
// relation n_s = 1 - 2/N*, Mukhanov & Chibisov 1981 and Starobinsky 1983,
// from memory; to 0.002 for first-order corrections); with a prior on
// N_reh at w_reh = 1/3, reheating is radiation and N* is the instantaneous
// one whatever N_reh (Liddle & Leach 2003, PRD 68, 103503,
// astro-ph/0305263).
func TestInferEfoldPriors(t *testing.T) {
	base := inferBench(false)
	base.Params = []infer.Prior{{Name: "alpha", Kind: infer.Fixed, Value: 1}, {Name: "n", Kind: infer.Fixed, Value: 1}}
	base.Forecasts = nil
	ns := base
	ns.NStar = &infer.Prior{Name: "N_star", Kind: infer.Uniform, Lo: 50, Hi: 60}
	out := runInferSpec(t, ns)
	if lo, hi := out["n_s:lo95"].Float, out["n_s:hi95"].Float; lo < 1-2.0/50-0.002 || hi > 1-2.0/60+0.002 {
		t.Errorf("n_s 95%% interval [%.5f, %.5f] for N* in [50, 60]", lo, hi)
	}
	if _, ok := out["log10_T_reh_GeV:median"]; ok {
		t.Error("a reheating temperature recorded where N* was given directly")
	}
	nr := base
	nr.W = infer.Prior{Name: "w_reh", Kind: infer.Fixed, Value: 1.0 / 3}
	nr.NReh = &infer.Prior{Name: "N_reh", Kind: infer.Uniform, Lo: 0, Hi: 10}
	out = runInferSpec(t, nr)
	if lo, hi := out["N_star:lo95"].Float, out["N_star:hi95"].Float; hi-lo > 1e-6 {
		t.Errorf("N* 95%% interval [%.6f, %.6f] at w_reh = 1/3: reheating then changes nothing", lo, hi)
	}
}

// runInferSpec runs an inference node of sp, checking first that its
// parameters decode to sp.
func runInferSpec(t *testing.T, sp InferSpec) pipeline.Values {
	t.Helper()
	vs, err := InferParams(sp)
	if err != nil {
		t.Fatal(err)
	}
	if back, err := inferFrom(vs); err != nil || !reflect.DeepEqual(back, sp) {
		t.Fatalf("round trip: %v\n got %+v\nwant %+v", err, back, sp)
	}
	out, err := Infer{}.Run(context.Background(), vs, nil)
	if err != nil {
		t.Fatal(err)
	}
	return out
}
