package reheat

import (
	"math"
	"testing"
)

// TestMatchIsTheFixedPoint: Match (secant steps) and a plain fixed-point
// iteration N <- N*(N), written out here and run to steps below 1e-13,
// find the same N* to 2e-11 (property: Match stops once |N*(N) - N| <
// 1e-11 and the map's slope is O(1/N)), for every kind of era, for
// E-models across alpha = 1e-2 .. 1e2 and from starts on both sides; the
// returned N* is a fixed point to 1e-11.
func TestMatchIsTheFixedPoint(t *testing.T) {
	h := DefaultHistory()
	eras := []Era{
		{Kind: EraInstant},
		{Kind: EraTemperature, W: 0, T: 1e9 / ReducedPlanckGeV},
		{Kind: EraTemperature, W: 1, T: 1e4 / ReducedPlanckGeV},
		{Kind: EraEfolds, W: 0.5, NReh: 5},
	}
	for _, alpha := range []float64{1e-2, 0.3, 1, 10, 1e2} {
		ev := FirstOrder{Sol: mustSolve(t, "e-model", map[string]float64{"alpha": alpha}), Norm: Normalisation{As: DefaultAs}}
		for _, e := range eras {
			g := func(N float64) float64 {
				pr, err := ev.At(N)
				if err != nil {
					t.Fatal(err)
				}
				m, err := h.efolds(pr.Scale, e, true)
				if err != nil {
					t.Fatal(err)
				}
				return m.N
			}
			plain := 55.0
			for i := 0; i < 100; i++ {
				next := g(plain)
				done := math.Abs(next-plain) < 1e-13
				plain = next
				if done {
					break
				}
			}
			for _, start := range []float64{40, 55, 70} {
				pr, err := Match(ev, h, e, start)
				if err != nil {
					t.Fatalf("alpha=%g, era %+v, start %g: %v", alpha, e, start, err)
				}
				if math.Abs(pr.N-plain) > 2e-11 {
					t.Errorf("alpha=%g, era %+v, start %g: N* = %.15g, plain iteration %.15g", alpha, e, start, pr.N, plain)
				}
				if r := math.Abs(g(pr.N) - pr.N); r > 1e-11 {
					t.Errorf("alpha=%g, era %+v, start %g: |N*(N*) - N*| = %g", alpha, e, start, r)
				}
			}
		}
	}
}
