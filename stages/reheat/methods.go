package reheat

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// SecondOrder evaluates a slow-roll solution at second order (Stewart &
// Lyth 1993, PLB 302, 171, gr-qc/9302019): the pivot from the second-order
// e-fold count with the end calibrated on the exact background (Cal; nil
// counts from the slow-roll end), the observables from the Hubble-flow
// parameters, and the potential normalised with the second-order
// amplitude
//
//	P_s = H^2/(8 pi^2 epsilon_1) [1 - 2(C + 1) epsilon_1 - C epsilon_2],
//	H^2 = V/(3 - epsilon_1),  C = -2 + ln 2 + gamma_E
//
// (bracket from memory; the tests check it against the exact spectrum to
// second order in the flow parameters).
type SecondOrder struct {
	Sol  *slowroll.Solution
	Cal  *slowroll.EndCalibration
	Norm Normalisation
}

// At implements Evaluator.
func (s SecondOrder) At(N float64) (Prediction, error) {
	p, f, obs, err := s.Sol.SecondOrderAt(N, s.Cal)
	if err != nil {
		return Prediction{}, err
	}
	c := slowroll.StewartLythC
	h2 := p.V / (3 - f.Eps1) // for V0 = 1
	ps := float64(h2 / (float64(8 * math.Pi * math.Pi * f.Eps1)) * (1 - float64(float64(2*(c+1))*f.Eps1) - float64(c*f.Eps2)))
	V0 := s.Norm.As / ps
	phiEnd := s.Sol.End.Phi
	if s.Cal != nil {
		phiEnd = s.Cal.PhiEnd
	}
	ve := V0 * s.Sol.Model.At(phiEnd).V
	sc := Scale{V0: V0, Vstar: V0 * p.V, Hstar: math.Sqrt(V0 * h2), Vend: ve, RhoEnd: 1.5 * ve}
	return Prediction{N: N, PhiEnd: phiEnd, Point: p, Obs: obs, Scale: sc}, nil
}

// Exact evaluates the exact background and mode solution: the observables
// from the spectra, V0 = A_s / P_s(V0 = 1) from the exact scalar
// amplitude, H^2 = V/(3 - epsilon_H) at the pivot, and rho_end = (3/2)
// V_end at the exact end (epsilon_H = 1 there).
type Exact struct {
	Sol  *slowroll.ExactSolution
	Norm Normalisation
}

// At implements Evaluator.
func (e Exact) At(N float64) (Prediction, error) {
	r, err := e.Sol.At(N)
	if err != nil {
		return Prediction{}, err
	}
	m := e.Sol.Model
	p := slowroll.At(m, r.Phi)
	p.N = N
	V0 := e.Norm.As / r.PsV0
	ve := V0 * m.At(r.PhiEnd).V
	sc := Scale{V0: V0, Vstar: V0 * p.V, Hstar: math.Sqrt(V0 * p.V / (3 - r.EpsilonH)), Vend: ve, RhoEnd: 1.5 * ve}
	obs := slowroll.Observables{Ns: r.Ns, R: r.R, AlphaS: r.AlphaS, Nt: r.Nt}
	return Prediction{N: N, PhiEnd: r.PhiEnd, Point: p, Obs: obs, Scale: sc}, nil
}
