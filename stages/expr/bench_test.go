package expr

import (
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

var (
	benchJet num.Jet
	benchV   float64
)

// benchEval evaluates V and its three derivatives at points spread over a
// field range. Target: under 1 µs and 0 allocs per evaluation.
func benchEval(b *testing.B, src string, params map[string]float64) {
	e, err := Compile(src, "x", params)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	x := 0.1
	for b.Loop() {
		benchJet = e.Eval(num.Var(x))
		x += 1e-3
		if x > 5 {
			x = 0.1
		}
	}
}

// BenchmarkEvalTModel: the alpha-attractor T-model.
func BenchmarkEvalTModel(b *testing.B) {
	benchEval(b, "tanh(x/sqrt(6*alpha))^2", map[string]float64{"alpha": 1})
}

// BenchmarkEvalComposite: functions nested three deep, sums, products,
// quotients and a field-dependent power.
func BenchmarkEvalComposite(b *testing.B) {
	benchEval(b, "V0 * log(1 + exp(tanh(x/sqrt(6*alpha))^2)) + lambda/4 * x^4/(1 + xi*x^2)^2 + sin(cos(sqrt(1 + x^2)))*x^x",
		map[string]float64{"V0": 1, "alpha": 1, "lambda": 0.1, "xi": 10})
}

// BenchmarkValueTModel: the value alone.
func BenchmarkValueTModel(b *testing.B) {
	e, err := Compile("tanh(x/sqrt(6*alpha))^2", "x", map[string]float64{"alpha": 1})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	x := 0.1
	for b.Loop() {
		benchV = e.Value(x)
		x += 1e-3
		if x > 5 {
			x = 0.1
		}
	}
}

// BenchmarkCompileEModel: parsing, folding and printing one potential.
func BenchmarkCompileEModel(b *testing.B) {
	params := map[string]float64{"V0": 1, "alpha": 1}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Compile("V0*(1 - exp(-sqrt(2/(3*alpha))*x))^2", "x", params); err != nil {
			b.Fatal(err)
		}
	}
}
