package ode

import (
	"math"
	"testing"
)

// BenchmarkHarmonic: y” = -y over ten periods at RTol = 1e-10 (about
// 1550 steps); reports the cost per solve and its allocations.
func BenchmarkHarmonic(b *testing.B) {
	f := oscillator(1)
	y0 := []float64{1, 0}
	s := &Settings{RTol: 1e-10, ATol: 1e-10}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(f, 0, 20*math.Pi, y0, s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkHarmonicDense: the same with dense output kept.
func BenchmarkHarmonicDense(b *testing.B) {
	f := oscillator(1)
	y0 := []float64{1, 0}
	s := &Settings{RTol: 1e-10, ATol: 1e-10, Dense: true}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(f, 0, 20*math.Pi, y0, s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkDenseAt: one evaluation of a 2-dim dense output of ~1550 steps.
func BenchmarkDenseAt(b *testing.B) {
	r, err := Solve(oscillator(1), 0, 20*math.Pi, []float64{1, 0}, &Settings{RTol: 1e-10, ATol: 1e-10, Dense: true})
	if err != nil {
		b.Fatal(err)
	}
	y := make([]float64, 2)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		_ = r.Dense.At(float64(i%1000)*0.0628, y)
	}
}
