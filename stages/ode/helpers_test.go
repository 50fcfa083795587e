package ode

import (
	"math"
	"testing"
)

func mustSolve(t testing.TB, f Func, t0, t1 float64, y0 []float64, s *Settings) Result {
	t.Helper()
	r, err := Solve(f, t0, t1, y0, s)
	if err != nil {
		t.Fatalf("Solve: %v", err)
	}
	return r
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// oscillator is y” = -ω² y as (y, y').
func oscillator(omega float64) Func {
	w2 := omega * omega
	return func(_ float64, y, dy []float64) {
		dy[0] = y[1]
		dy[1] = -w2 * y[0]
	}
}
