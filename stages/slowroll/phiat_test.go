package slowroll

import (
	"math"
	"sync"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// TestPhiAtAccuracy: N(PhiAt(N)) = N with N(phi) from an independent,
// tighter quadrature (relative 1e-15), to 1e-13 max(1, N) (property:
// PhiAt solves to 1e-12 max(1, N) and then applies one more Newton
// correction, which leaves the quadrature's own error, measured at about
// 1e-14; without the correction the error reaches 1e-12).
func TestPhiAtAccuracy(t *testing.T) {
	tight := &Settings{Quad: &num.QuadSettings{RelTol: 1e-15, AbsTol: 1e-16}}
	worst := 0.0
	defer func() { t.Logf("largest |N(PhiAt(N)) - N|/max(1, N): %.2g", worst) }()
	for _, pm := range propertyModels {
		sol := mustSolve(t, pm.family, pm.params)
		ref := &Solution{Model: sol.Model, End: sol.End, Settings: tight}
		for _, N := range []float64{0.01, 0.5, 5, 50, 55.5, 60, 200} {
			phi, err := sol.PhiAt(N)
			if err != nil {
				t.Fatal(err)
			}
			back, err := ref.Efolds(phi)
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(back-N) / math.Max(1, N); d > worst {
				worst = d
			}
			if math.Abs(back-N) > 1e-13*math.Max(1, N) {
				t.Errorf("%s: N(PhiAt(%g)) = %.17g", sol.Model.Describe(), N, back)
			}
		}
	}
}

// TestPhiAtHistoryIndependent: PhiAt shares its bracket between calls,
// but its answer is a function of N alone: asked after other values, in
// any order, it gives the same bits as on a fresh solution (property;
// package doc: same inputs, same bits).
func TestPhiAtHistoryIndependent(t *testing.T) {
	Ns := []float64{55, 0.3, 200, 50, 61.25, 7}
	for _, pm := range propertyModels {
		fresh := func(N float64) uint64 {
			phi, err := mustSolve(t, pm.family, pm.params).PhiAt(N)
			if err != nil {
				t.Fatal(err)
			}
			return math.Float64bits(phi)
		}
		shared := mustSolve(t, pm.family, pm.params)
		for _, order := range [][]int{{0, 1, 2, 3, 4, 5}, {5, 4, 3, 2, 1, 0}, {2, 0, 4, 1, 5, 3}} {
			for _, i := range order {
				phi, err := shared.PhiAt(Ns[i])
				if err != nil {
					t.Fatal(err)
				}
				if want := fresh(Ns[i]); math.Float64bits(phi) != want {
					t.Errorf("%s: PhiAt(%g) = %v after other calls, %v fresh", pm.family, Ns[i], phi, math.Float64frombits(want))
				}
			}
		}
		// A solution whose end is changed after use rebuilds its bracket.
		moved := mustSolve(t, pm.family, pm.params)
		if _, err := moved.PhiAt(55); err != nil {
			t.Fatal(err)
		}
		moved.End.Phi += 1e-3 * -moved.End.Direction
		again := &Solution{Model: moved.Model, End: moved.End}
		a, errA := moved.PhiAt(55)
		b, errB := again.PhiAt(55)
		if errA != nil || errB != nil || a != b {
			t.Errorf("%s: after moving the end, PhiAt(55) = %v (%v), fresh %v (%v)", pm.family, a, errA, b, errB)
		}
	}
}

// TestPhiAtConcurrent: goroutines sharing one solution get the bits a
// fresh solution gives (property: serial equals parallel; run with -race).
func TestPhiAtConcurrent(t *testing.T) {
	Ns := []float64{3, 55, 120, 50, 0.7, 61}
	want := make([]float64, len(Ns))
	for i, N := range Ns {
		phi, err := mustSolve(t, "e-model", map[string]float64{"alpha": 1}).PhiAt(N)
		if err != nil {
			t.Fatal(err)
		}
		want[i] = phi
	}
	shared := mustSolve(t, "e-model", map[string]float64{"alpha": 1})
	got := make([]float64, len(Ns))
	var wg sync.WaitGroup
	for i, N := range Ns {
		wg.Add(1)
		go func() {
			defer wg.Done()
			got[i], _ = shared.PhiAt(N)
		}()
	}
	wg.Wait()
	for i := range Ns {
		if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
			t.Errorf("PhiAt(%g) = %v in parallel, %v fresh", Ns[i], got[i], want[i])
		}
	}
}
