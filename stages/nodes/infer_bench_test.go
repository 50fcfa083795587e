package nodes

import (
	"context"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/infer"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// inferBench is the E-model's alpha (log-uniform on [0.01, 100]) and
// T_reh, with w_reh fixed at 0 or uniform on [-0.3, 1], against the
// Balkenhol et al. 2025 constraint (arXiv:2512.10613, abstract: n_s =
// 0.9682 ± 0.0032, r < 0.034 at 95%) and a forecast of sigma(r) = 0.003
// (Simons Observatory 2019 baseline, arXiv:1808.07445, abstract).
func inferBench(freeW bool) InferSpec {
	s := InferSpec{
		Family: "e-model", Params: []infer.Prior{{Name: "alpha", Kind: infer.LogUniform, Lo: 0.01, Hi: 100}, {Name: "n", Kind: infer.Fixed, Value: 1}},
		W: infer.Prior{Name: "w_reh", Kind: infer.Fixed, Value: 0}, TLoGeV: reheat.DefaultBBNBoundGeV, As: 2.1e-9, History: reheat.DefaultHistory(),
		Constraint: compare.Gaussian{Name: "cmb-2025", MeanNs: 0.9682, SigmaNs: 0.0032, SigmaR: 0.034 / compare.HalfNormal95},
		Forecasts:  []compare.Forecast{{Name: "SO", SigmaR: 0.003}}, Tol: 0.01,
	}
	if freeW {
		s.W = infer.Prior{Name: "w_reh", Kind: infer.Uniform, Lo: -0.3, Hi: 1}
	}
	return s
}

// BenchmarkInferNode2D: one inference node, two dimensions (alpha, ln
// T_reh at w_reh = 0), ln Z to 0.01 and intervals refined. Target: under
// 5 s on 2 cores.
func BenchmarkInferNode2D(b *testing.B) { benchInferNode(b, false) }

// BenchmarkInferNode3D: the same with w_reh free. Target: under 30 s.
func BenchmarkInferNode3D(b *testing.B) { benchInferNode(b, true) }

func benchInferNode(b *testing.B, freeW bool) {
	params, err := InferParams(inferBench(freeW))
	if err != nil {
		b.Fatal(err)
	}
	for i := 0; i < b.N; i++ {
		out, err := Infer{}.Run(context.Background(), params, nil)
		if err != nil {
			b.Fatal(err)
		}
		if i == 0 {
			b.ReportMetric(out["evaluations"].Float, "evaluations")
			b.ReportMetric(out["ln_Z_err"].Float, "lnZ-err")
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/inference")
}
