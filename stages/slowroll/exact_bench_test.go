package slowroll

import (
	"testing"
	"time"
)

// exReportCPU reports the process CPU time per iteration (garbage
// collection included), steadier than wall time on a shared machine, when
// the platform gives it.
func exReportCPU(b *testing.B, cpu0 time.Duration) {
	if cpu1, ok := exProcessCPU(); ok {
		b.ReportMetric(float64((cpu1-cpu0).Nanoseconds())/1e6/float64(b.N), "cpu-ms/op")
	}
}

// BenchmarkExact: one exact prediction (background, end, five modes,
// n_s, r, alpha_s, n_t, P_s) for the e-model with alpha = 1 at N = 55,
// default settings. Target: under 4 ms on one core (it was 8.6 ms with
// the modes started at k/(aH) = 100 and integrated one by one).
func BenchmarkExact(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	b.ReportAllocs()
	cpu0, _ := exProcessCPU()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Exact(m, 55, nil); err != nil {
			b.Fatal(err)
		}
	}
	exReportCPU(b, cpu0)
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
	cpu0, _ := exProcessCPU()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := es.At(55); err != nil {
			b.Fatal(err)
		}
	}
	exReportCPU(b, cpu0)
}

// BenchmarkSolveExact: the background alone (initial point, integration
// to the end), as the slow-roll stage runs it for the exact method.
func BenchmarkSolveExact(b *testing.B) {
	m := exModel(b, "e-model", map[string]float64{"alpha": 1})
	b.ReportAllocs()
	cpu0, _ := exProcessCPU()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := SolveExact(m, 60, nil); err != nil {
			b.Fatal(err)
		}
	}
	exReportCPU(b, cpu0)
}

// BenchmarkAdiabaticState: the adiabatic initial data of one mode (the
// eighth-order series at x = 10), two (scalar, tensor) per mode of a
// stencil.
func BenchmarkAdiabaticState(b *testing.B) {
	eps := []float64{5e-6, 5.6e-6, 1.3e-7, 2.8e-9}
	z := []float64{2.047, 7.5e-4}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		adiabaticState(10, eps, z)
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
