package ode

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestExponential: y' = λ y has y = y0 e^{λ t} (closed form). Growth and
// decay over ten units of time, forward and backward. The global error of
// a tolerance-controlled integration is a modest multiple of the
// tolerance (common practice: Hairer, Nørsett & Wanner I, Sect. II.4,
// show global errors within one to two orders of the tolerance on smooth
// problems); the bound 30 RTol is that, with the measured worst case
// 5.9 RTol (λ = ±3, where the error accumulates over λT = 30).
func TestExponential(t *testing.T) {
	for _, lam := range []float64{1, -1, 3, -3} {
		for _, rtol := range []float64{1e-6, 1e-9, 1e-12} {
			for _, back := range []bool{false, true} {
				t0, t1 := 0.0, 10.0
				if back {
					t0, t1 = 10, 0
				}
				y0 := 2.0
				f := func(_ float64, y, dy []float64) { dy[0] = lam * y[0] }
				r := mustSolve(t, f, t0, t1, []float64{y0}, &Settings{RTol: rtol, ATol: 1e-300})
				want := y0 * math.Exp(lam*(t1-t0))
				if e := relErr(r.Y[0], want); e > 30*rtol {
					t.Errorf("λ=%g rtol=%g backward=%v: y = %.17g, want %.17g (rel err %.2g)", lam, rtol, back, r.Y[0], want, e)
				}
				if r.T != t1 || r.Status != Completed {
					t.Errorf("λ=%g: ended at %g with status %v", lam, r.T, r.Status)
				}
			}
		}
	}
}

// TestHarmonicManyPeriods: y” = -y over 100 periods from (1, 0); closed
// form (cos t, -sin t). The phase error is atan2 of the solution against
// the exact angle; the energy (y² + y'²)/2 is conserved exactly by the
// equation. With RTol = ATol = 1e-10 the measured phase error after 100
// periods is 1.4e-9 and the energy error 1.9e-8 (a non-symplectic method
// drifts in energy: common practice). Bounds: 1e-8 and 1e-7. At RTol =
// 1e-12 both must shrink by more than a factor 20, as a tolerance-
// proportional method's should (measured factors 270 and 100).
func TestHarmonicManyPeriods(t *testing.T) {
	T := 200 * math.Pi
	errs := func(rtol float64) (phase, energy float64, st Stats) {
		r := mustSolve(t, oscillator(1), 0, T, []float64{1, 0}, &Settings{RTol: rtol, ATol: rtol})
		// Exact angle at T is -T mod 2π = 0.
		phase = math.Abs(math.Atan2(-r.Y[1], r.Y[0]))
		energy = math.Abs((r.Y[0]*r.Y[0]+r.Y[1]*r.Y[1])/2 - 0.5)
		return phase, energy, r.Stats
	}
	p10, e10, st := errs(1e-10)
	t.Logf("rtol 1e-10: phase %.3g energy %.3g, %d steps, %d rejected, %d evals", p10, e10, st.Steps, st.Rejected, st.Evals)
	if p10 > 1e-8 || e10 > 1e-7 {
		t.Errorf("rtol 1e-10: phase error %.3g, energy error %.3g after 100 periods", p10, e10)
	}
	p12, e12, _ := errs(1e-12)
	t.Logf("rtol 1e-12: phase %.3g energy %.3g", p12, e12)
	if p12 > p10/20 || e12 > e10/20 {
		t.Errorf("tightening rtol 100x reduced the phase error only %.3g -> %.3g, energy %.3g -> %.3g", p10, p12, e10, e12)
	}
}

// TestProtheroRobinson: y' = -λ(y - cos t) - sin t, y(0) = 1, has the
// solution y = cos t for every λ (Prothero & Robinson 1974, Math. Comp.
// 28, 145). For λ = 1e4 the problem is stiff for an explicit method: the
// step is limited by stability (|hλ| ≲ 3.3 for this pair) rather than
// accuracy. The solution must stay accurate, the step count must reflect
// the stability limit (≥ λ T/3.5 steps; measured 18326 for λT = 5e4),
// and the PI controller must keep rejected steps below 20% of accepted
// ones (measured: 3 of 18326).
func TestProtheroRobinson(t *testing.T) {
	for _, lam := range []float64{10, 1e2, 1e4} {
		f := func(t float64, y, dy []float64) { dy[0] = -lam*(y[0]-math.Cos(t)) - math.Sin(t) }
		T := 5.0
		r := mustSolve(t, f, 0, T, []float64{1}, &Settings{RTol: 1e-8, ATol: 1e-10})
		if e := math.Abs(r.Y[0] - math.Cos(T)); e > 1e-7 {
			t.Errorf("λ=%g: y(5) = %.15g, want cos 5 = %.15g (err %.2g)", lam, r.Y[0], math.Cos(T), e)
		}
		t.Logf("λ=%g: %d steps, %d rejected", lam, r.Stats.Steps, r.Stats.Rejected)
		if lam == 1e4 {
			if r.Stats.Steps < int(lam*T/3.5) {
				t.Errorf("λ=%g: only %d steps, below the stability limit λT/3.5 = %d: unstable steps accepted?", lam, r.Stats.Steps, int(lam*T/3.5))
			}
			if r.Stats.Rejected*5 > r.Stats.Steps {
				t.Errorf("λ=%g: %d rejected of %d accepted", lam, r.Stats.Rejected, r.Stats.Steps)
			}
		}
	}
}

// deSitterMode is v” + (k² - 2/τ²) v = 0 as the real system
// (Re v, Im v, Re v', Im v') in conformal time τ < 0.
func deSitterMode(k float64) Func {
	return func(tau float64, y, dy []float64) {
		w2 := k*k - 2/(tau*tau)
		dy[0], dy[1] = y[2], y[3]
		dy[2], dy[3] = -w2*y[0], -w2*y[1]
	}
}

// bunchDavies is v = e^{-ikτ}/sqrt(2k) (1 - i/(kτ)) and v'.
func bunchDavies(k, tau float64) (v, dv complex128) {
	e := cmplx.Exp(complex(0, -k*tau)) / complex(math.Sqrt(2*k), 0)
	v = e * (1 - complex(0, 1/(k*tau)))
	// v' = e[-ik(1 - i/(kτ)) + i/(kτ²)]
	dv = e * (complex(0, -k) - complex(1/tau, 0) + complex(0, 1/(k*tau*tau)))
	return v, dv
}

// TestDeSitterModeFunction: the Bunch–Davies solution of the de Sitter
// mode equation v” + (k² - 2/τ²) v = 0 is v = e^{-ikτ}/sqrt(2k)
// (1 - i/(kτ)) (Bunch & Davies 1978, Proc. R. Soc. A 360, 117; e.g.
// Mukhanov, Feldman & Brandenberger 1992, Phys. Rep. 215, 203). Started
// from it at kτ = -100 (16 oscillations inside the horizon) and integrated
// to kτ = -1e-3 (|v| grows by 1e3), the complex error relative to |v| is
// below 200 RTol at the end and at 199 points in between from the dense
// output (measured: 7.7 RTol at the end, 8.8 RTol at worst in between),
// and the Wronskian v v*' - v* v' = i (conserved by the equation) holds to
// 1e-8.
func TestDeSitterModeFunction(t *testing.T) {
	k := 2.5
	rtol := 1e-10
	ta, tb := -100/k, -1e-3/k
	v0, dv0 := bunchDavies(k, ta)
	y0 := []float64{real(v0), imag(v0), real(dv0), imag(dv0)}
	r := mustSolve(t, deSitterMode(k), ta, tb, y0, &Settings{RTol: rtol, ATol: 1e-14, Dense: true})
	v, _ := bunchDavies(k, tb)
	got := complex(r.Y[0], r.Y[1])
	if e := cmplx.Abs(got-v) / cmplx.Abs(v); e > 200*rtol {
		t.Errorf("v(kτ=-1e-3) = %v, want %v (rel err %.3g)", got, v, e)
	} else {
		t.Logf("end: rel err %.3g (%d steps, %d rejected)", e, r.Stats.Steps, r.Stats.Rejected)
	}
	w := complex(r.Y[0], r.Y[1])*complex(r.Y[2], -r.Y[3]) - complex(r.Y[0], -r.Y[1])*complex(r.Y[2], r.Y[3])
	if math.Abs(real(w)) > 1e-8 || math.Abs(imag(w)-1) > 1e-8 {
		t.Errorf("Wronskian v v*' - v* v' = %v, want i", w)
	}
	y := make([]float64, 4)
	worst := 0.0
	for i := 1; i < 200; i++ {
		// Logarithmically spaced in -kτ.
		x := 100 * math.Pow(1e-5, float64(i)/200)
		tau := -x / k
		if err := r.Dense.At(tau, y); err != nil {
			t.Fatal(err)
		}
		v, _ := bunchDavies(k, tau)
		e := cmplx.Abs(complex(y[0], y[1])-v) / cmplx.Abs(v)
		worst = math.Max(worst, e)
	}
	t.Logf("dense: worst rel err %.3g", worst)
	if worst > 200*rtol {
		t.Errorf("dense output: worst relative error %.3g over 199 points", worst)
	}
}

// TestMasslessFieldDeSitter: a massless scalar in de Sitter space with
// e-folds N as the clock, χ” + 3χ' + (k/(aH))² χ = 0 with a = e^N and H
// constant, has the Bunch–Davies solution χ = H/sqrt(2k³) (1 + ikτ)
// e^{-ikτ}, τ = -1/(aH) (the same Bunch–Davies mode as above divided by
// a; e.g. Mukhanov, Feldman & Brandenberger 1992). Far outside the
// horizon |χ|² → H²/(2k³), the scale-invariant spectrum
// k³|χ|²/(2π²) = (H/2π)² (common practice). Integrated as a real 4-dim
// system from k/(aH) = 100 to 1e-4: the complex relative error at the end
// is below 200 RTol (measured 8 RTol).
func TestMasslessFieldDeSitter(t *testing.T) {
	H, k := 0.7, 3.0
	rtol := 1e-10
	f := func(N float64, y, dy []float64) {
		x := k * math.Exp(-N) / H
		dy[0], dy[1] = y[2], y[3]
		dy[2] = -3*y[2] - x*x*y[0]
		dy[3] = -3*y[3] - x*x*y[1]
	}
	chi := func(N float64) (c, dc complex128) {
		tau := -math.Exp(-N) / H
		e := cmplx.Exp(complex(0, -k*tau))
		pre := complex(H/math.Sqrt(2*k*k*k), 0)
		c = pre * (1 + complex(0, k*tau)) * e
		// dχ/dN = (dτ/dN) dχ/dτ, dτ/dN = -τ; dχ/dτ = pre k² τ e.
		dc = complex(-tau, 0) * pre * complex(k*k*tau, 0) * e
		return c, dc
	}
	Na := math.Log(k/H) - math.Log(100)
	Nb := math.Log(k/H) + math.Log(1e4)
	c0, dc0 := chi(Na)
	r := mustSolve(t, f, Na, Nb, []float64{real(c0), imag(c0), real(dc0), imag(dc0)}, &Settings{RTol: rtol, ATol: 1e-16})
	c1, _ := chi(Nb)
	got := complex(r.Y[0], r.Y[1])
	e := cmplx.Abs(got-c1) / cmplx.Abs(c1)
	t.Logf("rel err %.3g, %d steps", e, r.Stats.Steps)
	if e > 200*rtol {
		t.Errorf("χ at k/(aH) = 1e-4: %v, want %v (rel err %.3g)", got, c1, e)
	}
	// The frozen power: k³|χ|²/(2π²) against (H/2π)², to the x² = 1e-8
	// correction of the closed form, |χ|² = H²/(2k³)(1 + x²).
	p := k * k * k * real(got*cmplx.Conj(got)) / (2 * math.Pi * math.Pi)
	want := H * H / (4 * math.Pi * math.Pi)
	if relErr(p, want) > 2e-8 {
		t.Errorf("frozen power %.15g, want (H/2π)² = %.15g", p, want)
	}
}
