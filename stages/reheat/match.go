package reheat

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/slowroll"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Normalisation fixes the overall scale of the potential.
type Normalisation struct {
	// As is the scalar amplitude at the pivot (default 2.1e-9).
	As float64
}

// Scale is a normalised prediction, in reduced Planck units.
type Scale struct {
	V0     float64 // the potential's amplitude V0 [M_p^4]
	Vstar  float64 // V at the pivot's exit [M_p^4]
	Hstar  float64 // Hubble rate at the pivot's exit [M_p]
	Vend   float64 // V at the end of inflation [M_p^4]
	RhoEnd float64 // energy density at the end, (3/2) V_end [M_p^4]
}

// Normalise fixes V0 from the first-order amplitude
// A_s = V/(24 pi^2 epsilon_V) (M_p = 1; Liddle & Lyth 2000, ch. 7), with
// H^2 = V/3 at the pivot and rho_end = (3/2) V_end at the end of inflation,
// which is exact where epsilon_H = 1 (there phidot^2 = V) and the
// conventional approximation when the end is taken at epsilon_V = 1.
func Normalise(p slowroll.Point, end slowroll.End, n Normalisation) Scale {
	V0 := 24 * math.Pi * math.Pi * n.As * p.Epsilon / p.V
	vs := V0 * p.V
	ve := V0 * end.V
	return Scale{V0: V0, Vstar: vs, Hstar: math.Sqrt(vs / 3), Vend: ve, RhoEnd: 1.5 * ve}
}

// Prediction is one matched prediction at the pivot.
type Prediction struct {
	N float64 // e-folds between the pivot's exit and the end of inflation
	// PhiEnd is the end of inflation the method counted N from [M_p]:
	// the slow-roll end, or the exact end (epsilon_H = 1) where the
	// method calibrates or integrates the background.
	PhiEnd float64
	Point  slowroll.Point
	Obs    slowroll.Observables
	Scale  Scale
	// TReh is the reheating temperature [M_p]; for instantaneous
	// reheating it is the maximum, T_max. Zero when not computed.
	TReh float64
	// TMax is the instantaneous-reheating temperature [M_p], NReh the
	// e-folds of reheating and W its equation of state (zero when not
	// matched to a history).
	TMax, NReh, W float64
}

// AtEfolds evaluates a solution at a given N* and normalises it.
func AtEfolds(sol *slowroll.Solution, N float64, n Normalisation) (Prediction, error) {
	p, o, err := sol.Evaluate(N)
	if err != nil {
		return Prediction{}, err
	}
	return Prediction{N: N, PhiEnd: sol.End.Phi, Point: p, Obs: o, Scale: Normalise(p, sol.End, n)}, nil
}

// History describes the thermal history after inflation needed to relate
// the pivot to the end of inflation.
type History struct {
	PivotPerMpc float64 // k* [Mpc^-1]
	T0K         float64 // CMB temperature today [K]
	GS0         float64 // entropy degrees of freedom today
	GReh        float64 // relativistic degrees of freedom at reheating
	GSReh       float64 // entropy degrees of freedom at reheating
}

// DefaultHistory is k* = 0.05 Mpc^-1, T_0 = 2.7255 K, g_s0 = 43/11 and
// g = g_s = 106.75 at reheating.
func DefaultHistory() History {
	return History{PivotPerMpc: DefaultPivotPerMpc, T0K: DefaultT0K, GS0: DefaultGS0, GReh: DefaultGReh, GSReh: DefaultGReh}
}

// Check refuses unphysical history parameters, naming the field.
func (h History) Check() error {
	for _, c := range []struct {
		name string
		v    float64
	}{{"k_pivot [Mpc^-1]", h.PivotPerMpc}, {"T_0 [K]", h.T0K}, {"g_s0", h.GS0}, {"g_reh", h.GReh}, {"g_s_reh", h.GSReh}} {
		if !(c.v > 0) || math.IsInf(c.v, 0) {
			return fmt.Errorf("reheating history: %s = %g, want a positive finite value", c.name, c.v)
		}
	}
	return nil
}

// InstantEfolds returns N*(N) for instantaneous reheating, the right-hand
// side of the matching condition k* = a* H* written with entropy
// conservation from reheating to today (no H_0 needed):
//
//	N* = ln(a_0 T_0/k*) + (1/3) ln(g_s0/g_s,reh) + ln(H*/T_reh),
//	T_reh = (30 rho_end/(pi^2 g_reh))^(1/4),
//
// (Liddle & Leach 2003, PRD 68, 103503, astro-ph/0305263, eq. 2 in the
// entropy form; Planck 2018 X, arXiv:1807.06211, sect. 2.4, with no
// reheating phase). All energies in units of M_p.
func (h History) InstantEfolds(s Scale) (N, TReh float64) {
	kOverT0 := h.PivotPerMpc * PerMpcInGeV / KelvinInGeV(h.T0K) // dimensionless
	TReh = fourthRoot(30 * s.RhoEnd / (math.Pi * math.Pi * h.GReh))
	N = -detmath.Log(kOverT0) + detmath.Log(h.GS0/h.GSReh)/3 + detmath.Log(s.Hstar/TReh)
	return N, TReh
}

// FirstOrder evaluates a slow-roll solution at first order and normalises
// it to A_s. With Cal the pivot is counted from the exact end of inflation
// (epsilon_H = 1 on the exact background): the first-order count from the
// slow-roll end is N - FirstOrderEndShift(Cal), and rho_end is taken at the
// exact end; the observables are the first-order formulas at that pivot.
type FirstOrder struct {
	Sol  *slowroll.Solution
	Norm Normalisation
	Cal  *slowroll.EndCalibration
}

// FirstOrderEndShift is the e-folds the exact background adds after the
// field CalibrationEfolds first-order e-folds before the slow-roll end,
// beyond those first-order e-folds: N_exact = N_first + shift near the end.
func FirstOrderEndShift(cal *slowroll.EndCalibration) float64 {
	return cal.NExact - slowroll.CalibrationEfolds
}

// At implements Evaluator.
func (f FirstOrder) At(N float64) (Prediction, error) {
	if f.Cal == nil {
		return AtEfolds(f.Sol, N, f.Norm)
	}
	shift := FirstOrderEndShift(f.Cal)
	if !(N-shift >= 0) {
		return Prediction{}, fmt.Errorf("%s: N = %g is inside the exact end of inflation (shift %.4g e-folds)", f.Sol.Model.Describe(), N, shift)
	}
	p, o, err := f.Sol.Evaluate(N - shift)
	if err != nil {
		return Prediction{}, err
	}
	p.N = N
	end := slowroll.End{Phi: f.Cal.PhiEnd, Direction: f.Sol.End.Direction, V: f.Sol.Model.At(f.Cal.PhiEnd).V}
	return Prediction{N: N, PhiEnd: f.Cal.PhiEnd, Point: p, Obs: o, Scale: Normalise(p, end, f.Norm)}, nil
}

// end returns the end of inflation the first-order count is taken from
// (the exact end with Cal) and the e-folds the count adds beyond the
// first-order count from the slow-roll end.
func (f FirstOrder) end() (end slowroll.End, shift float64) {
	if f.Cal == nil {
		return f.Sol.End, 0
	}
	return slowroll.End{Phi: f.Cal.PhiEnd, Direction: f.Sol.End.Direction, V: f.Sol.Model.At(f.Cal.PhiEnd).V}, FirstOrderEndShift(f.Cal)
}

// atField is At at a pivot field whose first-order count from the
// slow-roll end is n (so N = n + shift), with the slope dN/dphi = V/V'
// there.
func (f FirstOrder) atField(phi, n, shift float64, end slowroll.End) (Prediction, float64) {
	j := f.Sol.Model.At(phi)
	p := slowroll.FromJet(phi, j)
	p.N = n + shift
	return Prediction{N: p.N, PhiEnd: end.Phi, Point: p, Obs: slowroll.FirstOrder(p), Scale: Normalise(p, end, f.Norm)}, j.V / j.D1
}

// match is Match for a first-order evaluator, iterating on the pivot
// field instead of on N*. At first order N*(phi) is one integral of V/V',
// so every iterate is a field value phi_k with its e-fold count n_k =
// n_(k-1) + the integral from phi_(k-1) to phi_k, and the prediction at
// (phi_k, n_k) is exact: no iterate needs N(phi) = N solved first, as
// At(N) would (each such solve costs several quadratures). The iteration
// is Match's in the field: F = N*_history - N at each iterate; the first
// step is the fixed-point step (the field F more e-folds back, phi + F
// V'/V... that is phi + F/(V/V')), then secant steps on F(phi), replaced
// by bisection when they leave a bracket of iterates with F of both signs.
// It stops as Match does (|F| < 1e-11, or the bracket closed to 1e-10 N)
// and starts from Solution.Near(start), so the result depends only on
// start. An iterate outside the field range (behind the end or beyond the
// edge) is replaced by Near's point for its count, which reports a count
// the range cannot hold as a *slowroll.RangeError.
func (f FirstOrder) match(h History, e Era, start float64) (Prediction, error) {
	sol := f.Sol
	end, shift := f.end()
	if !(start-shift >= 0) {
		return Prediction{}, fmt.Errorf("reheating matching at N* = %.6g: %s: N = %g is inside the exact end of inflation (shift %.4g e-folds)", start, sol.Model.Describe(), start, shift)
	}
	phi, n, err := sol.Near(start - shift)
	if err != nil {
		return Prediction{}, fmt.Errorf("reheating matching at N* = %.6g: %w", start, err)
	}
	inside := func(x float64) bool {
		return finite(x) && (x-sol.End.Phi)*(sol.End.Direction) < 0 && x > sol.Model.Lo && x < sol.Model.Hi
	}
	terms := h.terms()
	var prevPhi, prevF float64
	lo, hi := math.NaN(), math.NaN() // F(lo) > 0, F(hi) <= 0 once seen
	var nLo, nHi float64
	for iter := 0; iter < 200; iter++ {
		pr, slope := f.atField(phi, n, shift, end)
		m, err := terms.efolds(pr.Scale, e, true) // T_max is checked once converged
		if err != nil {
			return Prediction{}, err
		}
		if !finite(m.N) || m.N <= 0 {
			return Prediction{}, fmt.Errorf("reheating matching gives N* = %g (from N = %g)", m.N, pr.N)
		}
		F := m.N - pr.N
		if F > 0 {
			lo, nLo = phi, pr.N
		} else {
			hi, nHi = phi, pr.N
		}
		converged := math.Abs(F) < 1e-11 || (!math.IsNaN(lo) && !math.IsNaN(hi) && math.Abs(nHi-nLo) < 1e-10*math.Max(1, pr.N))
		next := phi + F/slope
		if iter > 0 && phi != prevPhi {
			if d := F - prevF; d != 0 && finite(d) {
				next = phi - F*(phi-prevPhi)/d
			}
		}
		if !math.IsNaN(lo) && !math.IsNaN(hi) && !((next-lo)*(next-hi) < 0) {
			next = 0.5 * (lo + hi)
		}
		// A step below the field's resolution (a steep potential, where
		// one unit in the last place of phi moves N by more than 1e-11)
		// ends the search too: phi is as close as a float64 can be.
		if converged || next == phi {
			return terms.finish(pr, e)
		}
		var nNext float64
		if inside(next) {
			dn, err := sol.EfoldsBetween(phi, next)
			if err != nil {
				return Prediction{}, fmt.Errorf("reheating matching at N* = %.6g: %w", pr.N+F, err)
			}
			nNext = n + dn
		} else {
			target := n + F // the fixed-point step's count
			if next, nNext, err = sol.Near(math.Max(target, 0)); err != nil {
				return Prediction{}, fmt.Errorf("reheating matching at N* = %.6g: %w", target+shift, err)
			}
		}
		prevPhi, prevF = phi, F
		phi, n = next, nNext
	}
	return Prediction{}, fmt.Errorf("reheating matching: N* did not converge in 200 iterations (last %g)", n+shift)
}

// Instant solves the matching for instantaneous reheating self-consistently
// at first order (Match with EraInstant).
func Instant(sol *slowroll.Solution, h History, n Normalisation) (Prediction, error) {
	return Match(FirstOrder{Sol: sol, Norm: n}, h, Era{Kind: EraInstant}, 55)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
