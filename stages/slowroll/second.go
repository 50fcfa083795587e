package slowroll

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// EulerGamma is the Euler–Mascheroni constant γ_E.
const EulerGamma = 0.57721566490153286060651209008240243

// StewartLythC is the constant C = -2 + ln 2 + γ_E ≈ -0.7296 of the
// second-order slow-roll spectra (Stewart & Lyth 1993, PLB 302, 171,
// gr-qc/9302019).
const StewartLythC = -2 + math.Ln2 + EulerGamma

// HubbleFlow holds the first three Hubble-flow parameters at one time,
// ε_1 = -d ln H/dN and ε_{i+1} = d ln|ε_i|/dN, N the e-folds of expansion
// counted forward in time (Schwarz, Terrero-Escalante & García 2001, PLB
// 517, 243, astro-ph/0106020). In reduced Planck units ε_1 = (dφ/dN)²/2.
// Only the product ε_2 ε_3 = dε_2/dN enters the observables, so ε_3 is
// meaningless where ε_2 = 0.
type HubbleFlow struct {
	Eps1, Eps2, Eps3 float64
}

// SecondOrder returns the observables to second order in the Hubble-flow
// parameters at horizon crossing of the pivot (k = aH):
//
//	n_s - 1 = -2ε_1 - ε_2 - 2ε_1² - (2C + 3)ε_1ε_2 - Cε_2ε_3,
//	n_t     = -2ε_1 - 2ε_1² - 2(C + 1)ε_1ε_2,
//	r       = 16ε_1(1 + Cε_2),
//	alpha_s = -2ε_1ε_2 - ε_2ε_3,
//
// with C = StewartLythC: the Stewart–Lyth result (Stewart & Lyth 1993,
// gr-qc/9302019) written in Hubble-flow parameters by Schwarz,
// Terrero-Escalante & García 2001 (astro-ph/0106020, eqs. for n_S - 1,
// n_T and r at second order) and Leach, Liddle, Martin & Schwarz 2002 (PRD
// 66, 023515, astro-ph/0202094). The running is its leading term, which
// is of second order, the order to which n_s is given; alpha_s follows
// from n_s by d ln k = (1 - ε_1) dN at k = aH. Two independent checks are
// in the tests: power-law inflation (ε_1 = 1/p, ε_2 = 0), where
// n_s - 1 = n_t = -2/(p - 1) and r = 16/p are exact (Lyth & Stewart 1992,
// PLB 274, 168), fixes the ε_1² terms and the absence of an ε_1² term in
// r; and the numerical mode solution (Exact) agrees with these formulas to
// third order across models with different ratios ε_1 : ε_2 : ε_3, which
// tests the C-dependent coefficients.
func SecondOrder(h HubbleFlow) Observables {
	C := StewartLythC
	e1, e2, e23 := h.Eps1, h.Eps2, float64(h.Eps2*h.Eps3)
	return Observables{
		Ns:     1 - float64(2*e1) - e2 - float64(float64(2*e1)*e1) - float64(float64((float64(2*C)+3)*e1)*e2) - float64(C*e23),
		R:      float64(float64(16*e1) * (1 + float64(C*e2))),
		AlphaS: float64(float64(-2*e1)*e2) - e23,
		Nt:     float64(-2*e1) - float64(float64(2*e1)*e1) - float64(float64(float64(2*(C+1))*e1)*e2),
	}
}

// FlowFromPotential returns the Hubble-flow parameters on the slow-roll
// attractor at a field value from the potential slow-roll parameters
// there, ε_1 and ε_2 to second order and ε_3 to first order (the orders
// SecondOrder needs):
//
//	ε_1 = ε_V - (4/3)ε_V² + (2/3)ε_V η_V,
//	ε_2 = 4ε_V - 2η_V - 8ε_V² + (20/3)ε_V η_V - (2/3)η_V² - (2/3)ξ²_V,
//	ε_2 ε_3 = 16ε_V² - 12ε_V η_V + 2ξ²_V.
//
// The first is Liddle, Parsons & Barrow 1994 (PRD 50, 7222,
// astro-ph/9408015) for ε_H. The other two are derived here from the
// Hamilton–Jacobi form of the background, 3H² - 2H'² = V with
// dφ/dN = -2H'/H: writing w = 2H'/H = u(1 + (η_V - 2ε_V)/3 + O(ε²)) with
// u = V'/V gives ε_1 = w²/2, ε_2 = -2 dw/dφ and ε_2ε_3 = 2w d²w/dφ²,
// expanded to the orders stated; at leading order they are the relations
// in published-values B7 (C). The tests check all three against the exact
// background, where the differences fall as the next order (1/N³ for
// V = φ²).
func FlowFromPotential(p Point) HubbleFlow {
	e, h, x := p.Epsilon, p.Eta, p.Xi2
	e1 := e - float64(float64(4.0/3*e)*e) + float64(float64(2.0/3*e)*h)
	e2 := float64(4*e) - float64(2*h) - float64(float64(8*e)*e) + float64(float64(20.0/3*e)*h) - float64(float64(2.0/3*h)*h) - float64(2.0/3*x)
	e23 := float64(float64(16*e)*e) - float64(float64(12*e)*h) + float64(2*x)
	f := HubbleFlow{Eps1: e1, Eps2: e2}
	if e2 != 0 {
		f.Eps3 = e23 / e2
	}
	return f
}

// EfoldShift is the second-order correction to the slow-roll e-fold count
// between a field value phi and the end of inflation at phiEnd:
// N(phi) = Efolds(phi) + EfoldShift(phi, phiEnd) + O(ε) terms. On the
// attractor dN/dφ = 1/(dφ/dN) with dφ/dN = -w, w = u(1 + u'/3 + O(ε²)),
// u = V'/V and u' = η_V - 2ε_V, so
//
//	N = ∫ dφ/u - (1/3)∫ (u'/u) dφ = Efolds - (1/6) ln(ε_V(φ)/ε_V(φ_end)),
//
// derived here from the Hamilton–Jacobi expansion of FlowFromPotential.
// The shift grows like ln N (e.g. +1.4 e-folds for the Starobinsky
// potential at N = 55), so it moves the pivot by an amount whose effect
// on n_s, alpha_s ΔN, is of second order and must be kept in a
// second-order prediction.
func (sol *Solution) EfoldShift(phi float64) float64 {
	return -detmath.Log(At(sol.Model, phi).Epsilon/At(sol.Model, sol.End.Phi).Epsilon) / 6
}

// EndCalibration corrects the second-order slow-roll e-fold count for the
// last e-folds of inflation, where slow roll fails and no expansion
// applies: the exact background is integrated from a field value
// CalibrationEfolds slow-roll e-folds before the end to the exact end, and
// DeltaN is the exact count minus the second-order slow-roll count over
// that stretch. Before it the second-order count is accurate to O(ε²) per
// e-fold, so the correction hardly depends on where the calibration
// starts (the tests measure it).
type EndCalibration struct {
	Phi    float64 // field where the exact background starts [M_p]
	NExact float64 // exact e-folds from Phi to the exact end
	DeltaN float64 // NExact - (Efolds(Phi) + EfoldShift(Phi))
	PhiEnd float64 // field at the exact end
}

// CalibrationEfolds is the slow-roll e-fold count before the end at which
// CalibrateEnd starts the exact background: far enough for slow roll to
// hold there (epsilon_2 ≈ 2/N ≈ 0.1) and for the initial transient, of
// relative size O(ε²) and decaying like e^{-3N}, to change the count by
// about 1e-3 e-folds, i.e. n_s by alpha_s times that (1e-6).
const CalibrationEfolds = 20

// CalibrateEnd integrates the exact background of the solution's model
// over its last CalibrationEfolds e-folds (about a tenth of the work of
// Exact) to the end condition of s (default epsilon_H = 1) and returns
// the correction that SecondOrderAt applies to the e-fold count.
func (sol *Solution) CalibrateEnd(s *ExactSettings) (EndCalibration, error) {
	cfg, err := s.config()
	if err != nil {
		return EndCalibration{}, err
	}
	if cfg.maxEfolds == 0 {
		cfg.maxEfolds = CalibrationEfolds + 100
	}
	phi, err := sol.PhiAt(CalibrationEfolds)
	if err != nil {
		return EndCalibration{}, err
	}
	bg, err := integrateBackground(sol.Model, phi, sol.End.Direction, &cfg)
	if err != nil {
		return EndCalibration{}, err
	}
	return EndCalibration{
		Phi:    phi,
		NExact: bg.nEnd,
		DeltaN: bg.nEnd - CalibrationEfolds - sol.EfoldShift(phi),
		PhiEnd: bg.phiEnd,
	}, nil
}

// SecondOrderAt returns the slow-roll point, the Hubble-flow parameters
// and the second-order observables for the pivot that leaves the horizon
// N e-folds before the end of inflation. The pivot field solves
// Efolds(phi) + EfoldShift(phi) = N - DeltaN, the e-fold count to second
// order, with DeltaN from cal (nil: no correction, the end is the
// solution's epsilon_V = 1); the Hubble-flow parameters come from
// FlowFromPotential and the observables from SecondOrder.
//
// Without calibration the end of inflation is not treated to second
// order: counting from epsilon_V = 1 instead of the exact end misplaces
// the pivot by a fraction of an e-fold (0.09 for the Starobinsky
// potential, 0.25 for phi^2) and n_s by alpha_s times that, an error that
// falls only like 1/N². With cal the error falls like 1/N³.
func (sol *Solution) SecondOrderAt(N float64, cal *EndCalibration) (Point, HubbleFlow, Observables, error) {
	target := N
	if cal != nil {
		target -= cal.DeltaN
	}
	if !(target >= 0) {
		return Point{}, HubbleFlow{}, Observables{}, fmt.Errorf("%s: N = %g is inside the calibrated end of inflation (correction %.4g e-folds)", sol.Model.Describe(), N, cal.DeltaN)
	}
	phi, err := sol.phiAtSecondOrder(target)
	if err != nil {
		return Point{}, HubbleFlow{}, Observables{}, err
	}
	p := At(sol.Model, phi)
	p.N = N
	f := FlowFromPotential(p)
	return p, f, SecondOrder(f), nil
}

// phiAtSecondOrder solves Efolds(phi) + EfoldShift(phi) = N by Newton
// steps from the first-order field, with d/dphi of the left side,
// (V/V')(1 - (η_V - 2ε_V)/3), exact; each step integrates the first-order
// e-folds over the step.
func (sol *Solution) phiAtSecondOrder(N float64) (float64, error) {
	phi, err := sol.PhiAt(N)
	if err != nil || N == 0 {
		return phi, err
	}
	Nphi := N // Efolds(phi)
	for iter := 0; iter < 30; iter++ {
		F := Nphi + sol.EfoldShift(phi) - N
		if math.Abs(F) <= 1e-12*math.Max(1, N) {
			return phi, nil
		}
		p := At(sol.Model, phi)
		j := sol.Model.At(phi)
		dF := j.V / j.D1 * (1 - (p.Eta-2*p.Epsilon)/3) // signed dF/dphi
		next := phi - F/dF
		if !finite(next) || next <= sol.Model.Lo || next >= sol.Model.Hi {
			break
		}
		dN, err := sol.segment(phi, next)
		if err != nil {
			return 0, err
		}
		phi, Nphi = next, Nphi+dN
	}
	return 0, fmt.Errorf("%s: second-order e-fold root for N = %g did not converge", sol.Model.Describe(), N)
}
