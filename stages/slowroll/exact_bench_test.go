package slowroll

import "testing"

// BenchmarkExact: one exact prediction (background, end, five modes,
// n_s, r, alpha_s, n_t, P_s) for the e-model with alpha = 1 at N = 55,
// default settings. Target: under 20 ms on one core.
func BenchmarkExact(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Exact(m, 55, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkExactAt: the modes alone, on a background already solved (the
// cost of each further N* in a self-consistent reheating solve).
func BenchmarkExactAt(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	es, err := SolveExact(m, 60, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := es.At(55); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSecondOrderAt: second-order n_s, r, alpha_s for the e-model
// with alpha = 1 at N = 55, the end of inflation given (slow-roll
// solution and end calibration done once). Target: under 20 µs.
func BenchmarkSecondOrderAt(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	sol := exSolve(b, m)
	cal, err := sol.CalibrateEnd(nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, _, _, err := sol.SecondOrderAt(55, &cal); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSecondOrderBaselineFirstOrder: the first-order prediction for
// the same case (Evaluate, the end given), for comparison.
func BenchmarkSecondOrderBaselineFirstOrder(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	sol := exSolve(b, m)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, _, err := sol.Evaluate(55); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCalibrateEnd: the one-off end calibration of the second-order
// method (20 e-folds of exact background).
func BenchmarkCalibrateEnd(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	sol := exSolve(b, m)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := sol.CalibrateEnd(nil); err != nil {
			b.Fatal(err)
		}
	}
}
