package compare

import "testing"

// BenchmarkNewKDE: construction of a 5000-sample estimate (the density at
// every sample and the maximum). Target: under 1 s on one core.
func BenchmarkNewKDE(b *testing.B) {
	pts := gaussSamples(1, 5000, 0.965, 0.004, 0.06, 0.01, 0.3)
	for b.Loop() {
		if _, err := NewKDE("bench", "synthetic", pts); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkKDEDeltaChi2: one Delta chi^2 from a 5000-sample estimate.
// Target: under 200 microseconds.
func BenchmarkKDEDeltaChi2(b *testing.B) {
	k, err := NewKDE("bench", "synthetic", gaussSamples(1, 5000, 0.965, 0.004, 0.06, 0.01, 0.3))
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		k.DeltaChi2(0.966, 0.055)
	}
}
