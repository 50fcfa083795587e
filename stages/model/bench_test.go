package model_test

import (
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// BenchmarkHiggsNew builds the Higgs model (xi = 1e4), including its
// numerical canonical map.
func BenchmarkHiggsNew(b *testing.B) {
	f, err := model.Lookup("higgs")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := f.New(map[string]float64{"xi": 1e4}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkHiggsAt evaluates V(phi) with three derivatives through the
// numerical map, phi spread over the inflationary range.
func BenchmarkHiggsAt(b *testing.B) {
	m := build(b, "higgs", map[string]float64{"xi": 1e4})
	b.ReportAllocs()
	s := 0.0
	for i := 0; i < b.N; i++ {
		s += m.At(1 + 6*float64(i%991)/991).D1
	}
	if s != s {
		b.Fatal("NaN")
	}
}

// BenchmarkHiggsPrediction: end of inflation and first-order observables
// at N = 55 for the Higgs model with its map already built.
func BenchmarkHiggsPrediction(b *testing.B) {
	m := build(b, "higgs", map[string]float64{"xi": 1e4})
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sol, err := slowroll.Solve(m, nil)
		if err != nil {
			b.Fatal(err)
		}
		if _, _, err := sol.Evaluate(55); err != nil {
			b.Fatal(err)
		}
	}
}
