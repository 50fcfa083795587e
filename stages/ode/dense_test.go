package ode

import (
	"errors"
	"math"
	"testing"
)

// TestDenseAccuracy: between the steps of y” = -y over five periods the
// dense output agrees with (cos t, -sin t) (closed form) to a small
// multiple of the tolerance, like the step values themselves (the
// continuous extension of order 4 has local error O(h⁵), the same order
// as the error estimate that the tolerance bounds: Hairer, Nørsett &
// Wanner I, Sect. II.6). Checked at 7 interior points of every step, for
// three tolerances; bound 50 RTol (measured worst: 11 RTol).
func TestDenseAccuracy(t *testing.T) {
	for _, rtol := range []float64{1e-5, 1e-8, 1e-11} {
		r := mustSolve(t, oscillator(1), 0, 10*math.Pi, []float64{1, 0}, &Settings{RTol: rtol, ATol: rtol, Dense: true})
		b := r.Dense.Boundaries()
		y := make([]float64, 2)
		worst := 0.0
		for i := 0; i+1 < len(b); i++ {
			for j := 1; j < 8; j++ {
				tt := b[i] + (b[i+1]-b[i])*float64(j)/8
				if err := r.Dense.At(tt, y); err != nil {
					t.Fatal(err)
				}
				e := math.Hypot(y[0]-math.Cos(tt), y[1]+math.Sin(tt))
				worst = math.Max(worst, e)
			}
		}
		t.Logf("rtol %g: %d steps, worst dense error %.3g = %.2f rtol", rtol, r.Dense.Steps(), worst, worst/rtol)
		if worst > 50*rtol {
			t.Errorf("rtol %g: worst dense-output error %.3g", rtol, worst)
		}
	}
}

// TestDenseOrder: with steps fixed by MaxStep (and a tolerance too loose
// to bind), the dense-output error at the step midpoints of y' = y
// (closed form e^t) over [0, 1] falls like h^5 when h is halved: a
// global error of order 5 plus an interpolation error of local order 5
// (Hairer, Nørsett & Wanner I, Sect. II.6): the ratio tends to 2^5 = 32
// (measured 21.5, 26.6, 29.3, 30.6 for h = 1/4, 1/8, 1/16, 1/32 halved).
// For h = 1/16 → 1/32 accept 26 to 38; an order-4 interpolant would give
// 16.
func TestDenseOrder(t *testing.T) {
	f := func(_ float64, y, dy []float64) { dy[0] = y[0] }
	errAt := func(h float64) float64 {
		r := mustSolve(t, f, 0, 1, []float64{1}, &Settings{RTol: 1, ATol: 1, MaxStep: h, InitialStep: h, Dense: true})
		b := r.Dense.Boundaries()
		y := make([]float64, 1)
		worst := 0.0
		for i := 0; i+1 < len(b); i++ {
			tt := 0.5 * (b[i] + b[i+1])
			_ = r.Dense.At(tt, y)
			worst = math.Max(worst, math.Abs(y[0]-math.Exp(tt)))
		}
		return worst
	}
	e16, e32 := errAt(1.0/16), errAt(1.0/32)
	ratio := e16 / e32
	t.Logf("midpoint errors %.3g, %.3g, ratio %.2f", e16, e32, ratio)
	if ratio < 26 || ratio > 38 {
		t.Errorf("halving the step divided the dense error by %.2f, want about 32 (order 5)", ratio)
	}
}

// TestDenseContinuity: the interpolant of each step ends at the next
// step's start value, and its derivative (by a central difference) is
// continuous across the boundary (the extension interpolates f at both
// ends), on y” = -y; a property of the construction (Hairer, Nørsett &
// Wanner I, Sect. II.6).
func TestDenseContinuity(t *testing.T) {
	r := mustSolve(t, oscillator(1), 0, 3, []float64{1, 0}, &Settings{RTol: 1e-9, Dense: true})
	d := r.Dense
	b := d.Boundaries()
	y := make([]float64, 2)
	for i := 1; i+1 < len(b); i++ {
		// Value from the left polynomial at its right end.
		d.eval(i-1, b[i], y)
		left := y[0]
		d.eval(i, b[i], y)
		if math.Abs(left-y[0]) > 1e-15 {
			t.Errorf("boundary %d: left %.17g, right %.17g", i, left, y[0])
		}
		eps := 1e-6 * (b[i+1] - b[i])
		d.eval(i-1, b[i]-eps, y)
		lm := y[0]
		d.eval(i-1, b[i], y)
		l0 := y[0]
		d.eval(i, b[i]+eps, y)
		rp := y[0]
		dl, dr := (l0-lm)/eps, (rp-l0)/eps
		if math.Abs(dl-dr) > 1e-6 {
			t.Errorf("boundary %d: derivative %.10g from the left, %.10g from the right", i, dl, dr)
		}
	}
}

// TestDenseRange: evaluation outside the interval is a *RangeError, in
// both directions of integration; the ends themselves are inside.
func TestDenseRange(t *testing.T) {
	for _, span := range [][2]float64{{0, 2}, {2, 0}} {
		r := mustSolve(t, oscillator(1), span[0], span[1], []float64{1, 0}, &Settings{Dense: true})
		y := make([]float64, 2)
		for _, tt := range []float64{span[0], span[1], 1} {
			if err := r.Dense.At(tt, y); err != nil {
				t.Errorf("span %v: At(%g): %v", span, tt, err)
			}
		}
		for _, tt := range []float64{-0.1, 2.1, math.NaN()} {
			var re *RangeError
			if err := r.Dense.At(tt, y); !errors.As(err, &re) {
				t.Errorf("span %v: At(%g) = %v, want *RangeError", span, tt, err)
			}
		}
	}
}
