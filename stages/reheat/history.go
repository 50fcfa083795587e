package reheat

import (
	"errors"
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// DefaultBBNBoundGeV is the lower bound on the reheating temperature from
// big-bang nucleosynthesis, T_reh > 4.1 MeV at 95% confidence (de Salas,
// Lattanzi, Mangano, Miele, Pastor & Pisanti 2015, PRD 92, 123534,
// arXiv:1511.00672, abstract; their Planck bound is 4.7 MeV).
const DefaultBBNBoundGeV = 4.1e-3

// EraKind says how the reheating era is specified.
type EraKind int

// The ways to give the reheating era.
const (
	// EraInstant: radiation domination starts at the end of inflation.
	EraInstant EraKind = iota
	// EraTemperature: constant equation of state W until the plasma
	// thermalises at temperature T.
	EraTemperature
	// EraEfolds: constant W for NReh e-folds of expansion.
	EraEfolds
)

// Era is the reheating era between the end of inflation and radiation
// domination: a fluid of constant equation of state w, so that
// rho ∝ a^(-3(1+w)) (kination is w = 1).
type Era struct {
	Kind EraKind
	W    float64 // equation of state during reheating, -1/3 < w <= 1
	T    float64 // reheating temperature [M_p], for EraTemperature
	NReh float64 // e-folds of reheating, for EraEfolds
}

// Check refuses an unphysical era, naming the parameter.
func (e Era) Check() error {
	if e.Kind == EraInstant {
		return nil
	}
	if !(e.W > -1.0/3) || e.W > 1 || math.IsNaN(e.W) {
		return fmt.Errorf("w_reh = %g: reheating needs -1/3 < w_reh <= 1 (w <= -1/3 would still inflate)", e.W)
	}
	switch e.Kind {
	case EraTemperature:
		if !(e.T > 0) || math.IsInf(e.T, 0) {
			return fmt.Errorf("T_reh = %g GeV: want a positive finite temperature", GeV(e.T))
		}
	case EraEfolds:
		if !(e.NReh >= 0) || math.IsInf(e.NReh, 0) {
			return fmt.Errorf("N_reh = %g: want a finite N_reh >= 0", e.NReh)
		}
	}
	return nil
}

// ErrAboveMaximum reports a reheating temperature above the instantaneous
// maximum (the energy at the end of inflation cannot grow).
var ErrAboveMaximum = errors.New("reheating temperature above the instantaneous maximum")

// Matched is the outcome of matching one scale at one era.
type Matched struct {
	N    float64 // N* implied by the history
	T    float64 // reheating temperature [M_p]
	TMax float64 // instantaneous-reheating temperature [M_p]
	NReh float64 // e-folds of reheating
}

// Efolds returns N* implied by the expansion history for a prediction
// normalised at the pivot (scale s), in the entropy form of the matching
// condition k* = a* H* (no H_0 needed):
//
//	N* = ln(a_0 T_0/k*) + (1/3) ln(g_s0/g_s,reh) + ln(H*/T_reh) - N_reh,
//	rho_reh = rho_end exp(-3 (1 + w) N_reh) = (pi^2/30) g_reh T_reh^4,
//
// (Liddle & Leach 2003, PRD 68, 103503, astro-ph/0305263; Dai, Kamionkowski
// & Wang 2014, PRL 113, 041302, arXiv:1404.6704; Cook, Dimastrogiovanni,
// Easson & Krauss 2015, JCAP 04 (2015) 047, arXiv:1502.04673; Planck 2018
// X, arXiv:1807.06211, sect. 2.4). Eliminating N_reh gives the Planck form
// with the term (1 - 3w)/(12(1 + w)) ln(rho_reh/rho_end): at w = 1/3 the
// result does not depend on T_reh. All energies in M_p.
func (h History) Efolds(s Scale, e Era) (Matched, error) { return h.efolds(s, e, false) }

// efolds is Efolds; with allowAbove, a temperature above T_max is allowed
// (a negative N_reh), as intermediate iterates of Match may need.
func (h History) efolds(s Scale, e Era, allowAbove bool) (Matched, error) {
	return h.terms().efolds(s, e, allowAbove)
}

// finish completes a matched prediction with the history's reheating
// figures at its scale (an instantaneous era reheats as radiation).
func (t historyTerms) finish(pr Prediction, e Era) (Prediction, error) {
	fm, err := t.efolds(pr.Scale, e, false)
	if err != nil {
		return Prediction{}, err
	}
	pr.TReh, pr.TMax, pr.NReh, pr.W = fm.T, fm.TMax, fm.NReh, e.W
	if e.Kind == EraInstant {
		pr.W = 1.0 / 3
	}
	return pr, nil
}

// historyTerms are the parts of Efolds that depend on the history alone,
// computed once for a matching's iterates: ln(a_0 T_0/k*) +
// (1/3) ln(g_s0/g_s,reh), and pi^2 g_reh/30 of rho = (pi^2/30) g T^4.
type historyTerms struct {
	base, g float64
}

func (h History) terms() historyTerms {
	kOverT0 := h.PivotPerMpc * PerMpcInGeV / KelvinInGeV(h.T0K)
	return historyTerms{base: -detmath.Log(kOverT0) + detmath.Log(h.GS0/h.GSReh)/3, g: math.Pi * math.Pi * h.GReh / 30}
}

func (t historyTerms) efolds(s Scale, e Era, allowAbove bool) (Matched, error) {
	g := t.g
	tmax := fourthRoot(s.RhoEnd / g)
	m := Matched{TMax: tmax}
	switch e.Kind {
	case EraInstant:
		m.T, m.NReh = tmax, 0
	case EraTemperature:
		if e.T > tmax && !allowAbove {
			return m, fmt.Errorf("%w: T_reh = %.4g GeV > T_max = %.4g GeV", ErrAboveMaximum, GeV(e.T), GeV(tmax))
		}
		m.T = e.T
		m.NReh = detmath.Log(s.RhoEnd/(g*e.T*e.T*e.T*e.T)) / (3 * (1 + e.W))
	case EraEfolds:
		m.NReh = e.NReh
		m.T = fourthRoot(s.RhoEnd * detmath.Exp(-3*(1+e.W)*e.NReh) / g)
	default:
		return m, fmt.Errorf("unknown reheating era %d", e.Kind)
	}
	m.N = t.base + detmath.Log(s.Hstar/m.T) - m.NReh
	return m, nil
}

// Evaluator gives a model's normalised prediction N e-folds before the end
// of inflation; the slow-roll methods each provide one.
type Evaluator interface {
	At(N float64) (Prediction, error)
}

// Match solves N* self-consistently for a reheating era: V* and V_end, and
// so N*, depend on N* through the normalisation of the potential. The map
// g: N -> N*(N) has a slope of order 1/N for most models, so the fixed
// point N = g(N) is found from the given start by secant steps on
// g(N) - N (each new N is N_k + (g_k - N_k)/(1 - s), s the slope of g
// through the last two iterates), the first step being the plain
// fixed-point step N_1 = g(N_0). Once iterates on both sides of the root
// are known, a step that leaves that bracket is replaced by bisection, so
// the root is found even where g's slope exceeds 1 in magnitude (a hilltop
// near its top). It stops when |g(N) - N| < 1e-11 and returns the
// prediction at that N. The iterates depend only on the start, so the
// result is deterministic.
func Match(ev Evaluator, h History, e Era, start float64) (Prediction, error) {
	if err := h.Check(); err != nil {
		return Prediction{}, err
	}
	if err := e.Check(); err != nil {
		return Prediction{}, err
	}
	if f, ok := ev.(FirstOrder); ok {
		return f.match(h, e, start)
	}
	terms := h.terms()
	N := start
	var prevN, prevG float64
	lo, hi := math.NaN(), math.NaN() // g(lo) > lo, g(hi) < hi once seen
	for iter := 0; iter < 200; iter++ {
		pr, err := ev.At(N)
		if err != nil {
			return Prediction{}, fmt.Errorf("reheating matching at N* = %.6g: %w", N, err)
		}
		m, err := terms.efolds(pr.Scale, e, true) // T_max is checked once converged
		if err != nil {
			return Prediction{}, err
		}
		if !finite(m.N) || m.N <= 0 {
			return Prediction{}, fmt.Errorf("reheating matching gives N* = %g (from N = %g)", m.N, N)
		}
		F := m.N - N
		if F > 0 {
			lo = N
		} else {
			hi = N
		}
		// Converged, or the bracket has closed to the resolution of the
		// evaluator's e-fold count (1e-9 relative at worst,
		// slowroll.quadFloor), where no step can do better.
		if math.Abs(F) < 1e-11 || math.Abs(hi-lo) < 1e-10*math.Max(1, N) {
			return terms.finish(pr, e)
		}
		next := m.N
		if iter > 0 && N != prevN {
			if s := (m.N - prevG) / (N - prevN); s != 1 && finite(s) {
				next = N + F/(1-s)
			}
		}
		// Once the root is bracketed, a step that leaves the bracket is
		// replaced by bisection: for models whose normalisation moves N*
		// by more than an e-fold per e-fold (a hilltop near its top), the
		// fixed-point map does not contract, but the root is still found.
		if !math.IsNaN(lo) && !math.IsNaN(hi) && !((next-lo)*(next-hi) < 0) {
			next = 0.5 * (lo + hi)
		}
		prevN, prevG = N, m.N
		N = next
	}
	return Prediction{}, fmt.Errorf("reheating matching: N* did not converge in 200 iterations (last %g)", N)
}
