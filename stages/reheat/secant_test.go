package reheat

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/slowroll"
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

// nSpace hides a FirstOrder evaluator from Match's dispatch: Match then
// iterates on N* itself, each iterate's pivot solved by At(N) (PhiAt).
type nSpace struct{ FirstOrder }

// TestFieldMatchIsTheEfoldMatch: for a first-order evaluator Match
// iterates on the pivot field (FirstOrder.match); the iteration on N*
// with a PhiAt solve per iterate (nSpace) must find the same pivot
// (property): N* to 2e-11 (each stops once |N*(N) - N| < 1e-11), phi* and
// n_s to 1e-10 relative, for models with closed-form e-fold counts
// (e-model, t-model) and without (hilltop, natural, brane), for every
// kind of era, with and without an end calibrated on the exact
// background.
func TestFieldMatchIsTheEfoldMatch(t *testing.T) {
	h := DefaultHistory()
	eras := []Era{
		{Kind: EraInstant},
		{Kind: EraTemperature, W: 0, T: 1e9 / ReducedPlanckGeV},
		{Kind: EraTemperature, W: 1, T: 1e4 / ReducedPlanckGeV},
		{Kind: EraEfolds, W: 0.5, NReh: 5},
	}
	for _, c := range []struct {
		family string
		params map[string]float64
	}{
		{"e-model", map[string]float64{"alpha": 1e-2}}, {"e-model", map[string]float64{"alpha": 1, "n": 2}},
		{"t-model", map[string]float64{"alpha": 10}}, {"hilltop", map[string]float64{"mu": 15, "p": 4}},
		{"natural", map[string]float64{"f": 7}}, {"brane", map[string]float64{"mu": 10}},
	} {
		sol := mustSolve(t, c.family, c.params)
		cal, err := sol.CalibrateEnd(nil)
		if err != nil {
			t.Fatalf("%s: %v", c.family, err)
		}
		for _, withCal := range []*slowroll.EndCalibration{nil, &cal} {
			f := FirstOrder{Sol: sol, Norm: Normalisation{As: DefaultAs}, Cal: withCal}
			for _, e := range eras {
				got, err := Match(f, h, e, 55)
				if err != nil {
					t.Fatalf("%s, era %+v: %v", c.family, e, err)
				}
				want, err := Match(nSpace{f}, h, e, 55)
				if err != nil {
					t.Fatalf("%s, era %+v, in N*: %v", c.family, e, err)
				}
				if math.Abs(got.N-want.N) > 2e-11 || !within(got.Point.Phi, want.Point.Phi, 1e-10, 0) || !within(got.Obs.Ns, want.Obs.Ns, 1e-10, 0) ||
					got.PhiEnd != want.PhiEnd || !within(got.TReh, want.TReh, 1e-9, 0) || got.W != want.W {
					t.Errorf("%s (calibrated %v), era %+v: N* = %.15g, phi* = %.15g, n_s = %.15g; in N*: %.15g, %.15g, %.15g",
						c.family, withCal != nil, e, got.N, got.Point.Phi, got.Obs.Ns, want.N, want.Point.Phi, want.Obs.Ns)
				}
			}
		}
	}
}
