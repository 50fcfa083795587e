package ode_test

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/ode"
)

// A ball dropped from 20 m (g = 9.81 m/s²) hits the ground after
// sqrt(2·20/9.81) = 2.0193 s; a terminal event finds the moment.
func ExampleSolve_event() {
	f := func(_ float64, y, dy []float64) { dy[0], dy[1] = y[1], -9.81 }
	ground := ode.Event{G: func(_ float64, y []float64) float64 { return y[0] }, Direction: -1, Terminal: true}
	r, err := ode.Solve(f, 0, 10, []float64{20, 0}, &ode.Settings{Events: []ode.Event{ground}})
	fmt.Printf("%v at t = %.4f s, speed %.3f m/s, err %v\n", r.Status, r.T, -r.Y[1], err)
	// Output: stopped by event at t = 2.0193 s, speed 19.809 m/s, err <nil>
}

// The dense output of y' = -y evaluated between steps.
func ExampleDense_At() {
	f := func(_ float64, y, dy []float64) { dy[0] = -y[0] }
	r, _ := ode.Solve(f, 0, 5, []float64{1}, &ode.Settings{RTol: 1e-10, ATol: 1e-12, Dense: true})
	y := make([]float64, 1)
	_ = r.Dense.At(2.5, y)
	fmt.Printf("y(2.5) = %.9f (exp(-2.5) = %.9f)\n", y[0], math.Exp(-2.5))
	// Output: y(2.5) = 0.082084999 (exp(-2.5) = 0.082084999)
}
