package infer

import (
	"testing"

	"github.com/inflatrace/inflatrace/stages/reheat"
)

func emodelProblem(freeW bool) Problem {
	p := Problem{
		Family: "e-model", Params: []Prior{{Name: "alpha", Kind: LogUniform, Lo: 0.01, Hi: 100}, {Name: "n", Kind: Fixed, Value: 1}},
		W: Prior{Name: "w_reh", Kind: Fixed, Value: 0}, As: 2.1e-9, History: reheat.DefaultHistory(), Like: cmb2025,
	}
	if freeW {
		p.W = Prior{Name: "w_reh", Kind: Uniform, Lo: -0.3, Hi: 1}
	}
	return p
}

// BenchmarkInfer2D: the E-model's alpha (log-uniform on [0.01, 100]) and
// ln T_reh at w_reh = 0, to ln Z ± 0.01. Target: under 5 s on 2 cores.
func BenchmarkInfer2D(b *testing.B) { benchInfer(b, false) }

// BenchmarkInfer3D: the same with w_reh uniform on [-0.3, 1]. Target:
// under 30 s.
func BenchmarkInfer3D(b *testing.B) { benchInfer(b, true) }

func benchInfer(b *testing.B, freeW bool) {
	var res *Result
	for i := 0; i < b.N; i++ {
		f, d, err := emodelProblem(freeW).Integrand()
		if err != nil {
			b.Fatal(err)
		}
		if res, err = Integrate(f, d, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/inference")
	b.ReportMetric(float64(res.Evals), "evaluations")
	b.ReportMetric(res.LnZ, "lnZ")
	b.ReportMetric(res.LnZErr, "lnZ-err")
}
