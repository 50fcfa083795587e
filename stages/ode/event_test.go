package ode

import (
	"math"
	"testing"
)

// TestFallingBody: y” = -g from rest at height h hits the ground at
// t = sqrt(2h/g) with speed sqrt(2gh) (closed form). The solution is a
// quadratic, which the fifth-order steps and the fourth-order dense
// output reproduce to rounding, so the event time must be exact to a few
// units in the last place whatever the tolerance.
func TestFallingBody(t *testing.T) {
	for _, c := range []struct{ g, h float64 }{{9.81, 100}, {1, 1}, {1.62, 3.7}} {
		f := func(_ float64, y, dy []float64) { dy[0], dy[1] = y[1], -c.g }
		ground := Event{G: func(_ float64, y []float64) float64 { return y[0] }, Direction: -1, Terminal: true}
		for _, rtol := range []float64{1e-3, 1e-10} {
			r := mustSolve(t, f, 0, 1000, []float64{c.h, 0}, &Settings{RTol: rtol, Events: []Event{ground}, Dense: true})
			want := math.Sqrt(2 * c.h / c.g)
			if r.Status != Stopped || len(r.Events) != 1 {
				t.Fatalf("g=%g h=%g: status %v, %d events", c.g, c.h, r.Status, len(r.Events))
			}
			if e := relErr(r.T, want); e > 1e-14 {
				t.Errorf("g=%g h=%g rtol=%g: hit at t = %.17g, want %.17g (rel %.2g)", c.g, c.h, rtol, r.T, want, e)
			}
			if e := relErr(r.Y[1], -math.Sqrt(2*c.g*c.h)); e > 1e-13 || math.Abs(r.Y[0]) > 1e-13*c.h {
				t.Errorf("g=%g h=%g: state at impact %v, want (0, %g)", c.g, c.h, r.Y, -math.Sqrt(2*c.g*c.h))
			}
			if r.Events[0].T != r.T || r.Events[0].Y[0] != r.Y[0] {
				t.Errorf("event record %+v differs from the final state (%g, %v)", r.Events[0], r.T, r.Y)
			}
			// The dense output ends at the event and agrees with it.
			if _, t1 := r.Dense.Span(); t1 != r.T {
				t.Errorf("dense output ends at %g, event at %g", t1, r.T)
			}
			y := make([]float64, 2)
			if err := r.Dense.At(r.T, y); err != nil || math.Abs(y[0]-r.Y[0]) > 1e-13 {
				t.Errorf("dense output at the event: %v %v, want %v", y, err, r.Y)
			}
			if err := r.Dense.At(want/2, y); err != nil || relErr(y[0], c.h-c.g*want*want/8) > 1e-14 {
				t.Errorf("dense output at half time: %v %v, want %g", y, err, c.h-c.g*want*want/8)
			}
			// Inside the last step, which the event shortened.
			b := r.Dense.Boundaries()
			tm := 0.5 * (b[len(b)-2] + b[len(b)-1])
			if err := r.Dense.At(tm, y); err != nil || math.Abs(y[0]-(c.h-c.g*tm*tm/2)) > 1e-13*c.h || relErr(y[1], -c.g*tm) > 1e-13 {
				t.Errorf("dense output in the shortened last step at t = %g: %v %v, want (%g, %g)", tm, y, err, c.h-c.g*tm*tm/2, -c.g*tm)
			}
		}
	}
}

// TestEventDirections: y = sin t (from y” = -y, y(0) = 0, y'(0) = 1)
// crosses zero at t = nπ, rising at even n and falling at odd n. Over
// (0, 10.5π] a non-terminal event of direction 0 is found 10 times (the
// start, where g = 0, does not count), +1 five times at 2π, 4π, ..., and
// -1 five times at π, 3π, ...; each time to 1e-9 (RTol 1e-11; the
// location is exact on the interpolant, whose error is of the tolerance).
func TestEventDirections(t *testing.T) {
	g := func(_ float64, y []float64) float64 { return y[0] }
	evs := []Event{{G: g}, {G: g, Direction: 1}, {G: g, Direction: -1}}
	r := mustSolve(t, oscillator(1), 0, 10.5*math.Pi, []float64{0, 1}, &Settings{RTol: 1e-11, ATol: 1e-12, Events: evs})
	if r.Status != Completed {
		t.Fatalf("status %v", r.Status)
	}
	got := map[int][]float64{}
	for _, h := range r.Events {
		got[h.Event] = append(got[h.Event], h.T)
	}
	check := func(ev int, ns []int) {
		if len(got[ev]) != len(ns) {
			t.Errorf("event %d (direction %d): %d hits %v, want %d", ev, evs[ev].Direction, len(got[ev]), got[ev], len(ns))
			return
		}
		for i, n := range ns {
			if e := math.Abs(got[ev][i] - float64(n)*math.Pi); e > 1e-9 {
				t.Errorf("event %d hit %d at %.15g, want %dπ (err %.2g)", ev, i, got[ev][i], n, e)
			}
		}
	}
	check(0, []int{1, 2, 3, 4, 5, 6, 7, 8, 9, 10})
	check(1, []int{2, 4, 6, 8, 10})
	check(2, []int{1, 3, 5, 7, 9})
	// Time order of the records.
	for i := 1; i < len(r.Events); i++ {
		if r.Events[i].T < r.Events[i-1].T {
			t.Errorf("events out of order: %g after %g", r.Events[i].T, r.Events[i-1].T)
		}
	}
}

// TestTerminalAmongNonTerminal: several events inside one step are
// processed in time order; a non-terminal event before the terminal one
// is recorded, one after it is not. y' = 1 from y(0) = 0 (y = t, closed
// form, integrated exactly by any Runge–Kutta step) with a first step of
// 1 passes the levels 0.2, 0.3 and 0.4 in that step; 0.3 is terminal.
func TestTerminalAmongNonTerminal(t *testing.T) {
	f := func(_ float64, _, dy []float64) { dy[0] = 1 }
	level := func(c float64) func(float64, []float64) float64 {
		return func(_ float64, y []float64) float64 { return y[0] - c }
	}
	evs := []Event{{G: level(0.4)}, {G: level(0.3), Terminal: true}, {G: level(0.2)}}
	r := mustSolve(t, f, 0, 5, []float64{0}, &Settings{InitialStep: 1, Events: evs})
	if r.Stats.Steps != 1 {
		t.Fatalf("%d steps, want the events inside the first step", r.Stats.Steps)
	}
	if r.Status != Stopped || math.Abs(r.T-0.3) > 1e-15 || math.Abs(r.Y[0]-0.3) > 1e-15 {
		t.Fatalf("stopped (%v) at t = %.17g, y = %v; want 0.3", r.Status, r.T, r.Y)
	}
	if len(r.Events) != 2 || r.Events[0].Event != 2 || r.Events[1].Event != 1 {
		t.Fatalf("events %+v, want level 0.2 then level 0.3", r.Events)
	}
	if math.Abs(r.Events[0].T-0.2) > 1e-15 {
		t.Errorf("level 0.2 at %.17g", r.Events[0].T)
	}
}
