package slowroll

import "testing"

// BenchmarkFirstOrderPrediction: Solve and Evaluate at N = 55 for the
// e-model with alpha = 1 — one full first-order prediction. Target: under
// 20 microseconds per operation.
func BenchmarkFirstOrderPrediction(b *testing.B) {
	m := mustModel(b, "e-model", map[string]float64{"alpha": 1})
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sol, err := Solve(m, nil)
		if err != nil {
			b.Fatal(err)
		}
		if _, _, err := sol.Evaluate(55); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluate: Evaluate alone (the end of inflation already found;
// the e-fold bracket, built by the first call, is reused by the others).
func BenchmarkEvaluate(b *testing.B) {
	sol := mustSolve(b, "e-model", map[string]float64{"alpha": 1})
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, _, err := sol.Evaluate(55); err != nil {
			b.Fatal(err)
		}
	}
}
