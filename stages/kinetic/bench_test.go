package kinetic

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// BenchmarkNewDisk builds the map of a pole-type kinetic term, the
// alpha-attractor disk with alpha = 1 (poles at both ends). Target: under
// 2 ms per build.
func BenchmarkNewDisk(b *testing.B) {
	s := math.Sqrt(6.0)
	K := diskK(1)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := New(K, 0, -s, s, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkNewHiggs builds the Higgs map for xi = 1e4 on the real line up
// to |phi| = 120.
func BenchmarkNewHiggs(b *testing.B) {
	K := higgsK(1e4)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := New(K, 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkXJetDisk: one evaluation of x(phi) with three derivatives on the
// disk (alpha = 1), phi spread over (0.5, 7.5). Target: well under 1 µs.
func BenchmarkXJetDisk(b *testing.B) {
	s := math.Sqrt(6.0)
	m := mustMap(b, diskK(1), 0, -s, s, nil)
	benchXJet(b, m, 0.5, 7)
}

// BenchmarkXJetHiggs: the same for the Higgs field (xi = 1e4), phi spread
// over (0.5, 7.5), the inflationary range.
func BenchmarkXJetHiggs(b *testing.B) {
	m := mustMap(b, higgsK(1e4), 0, math.Inf(-1), math.Inf(1), &Settings{PhiMax: 120})
	benchXJet(b, m, 0.5, 7)
}

func benchXJet(b *testing.B, m *Map, from, width float64) {
	b.ReportAllocs()
	var sink num.Jet
	for i := 0; i < b.N; i++ {
		sink = m.XJet(num.Var(from + width*float64(i%997)/997))
	}
	if math.IsNaN(sink.V) {
		b.Fatal("NaN")
	}
}
