package slowroll

import (
	"errors"
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/ode"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// background is the homogeneous solution: the field phi and its velocity
// pi = dphi/dN against the e-fold clock N (N = 0 at the initial point,
// a = e^N), from the initial point to the end of inflation.
//
// Equations (M_p = 1; derived here from the Klein–Gordon equation
// phi” + 3H phi' + V' = 0 in cosmic time and the Friedmann equation
// 3H² = phi'²/2 + V, with dN = H dt and epsilon_H = -Hdot/H² = pi²/2):
//
//	dphi/dN = pi,
//	dpi/dN  = -(3 - pi²/2)(pi + V'/V),
//	H²      = V/(3 - pi²/2).
//
// (dpi/dN = phi_tt/H² + pi epsilon_H, phi_tt/H² = -3pi - V'(3 - pi²/2)/V.)
type background struct {
	m      *model.Model
	dense  *ode.Dense
	nEnd   float64 // clock at the end of inflation
	phiEnd float64
	piEnd  float64
	dir    float64 // +1 when phi grows
	stats  ode.Stats
}

// state writes (phi, pi) at clock N.
func (b *background) state(N float64, y []float64) error {
	return b.dense.At(N, y)
}

// flow holds the derived background quantities at one time.
type flow struct {
	lnAH float64 // ln(aH) with a = e^N
	eps  float64 // epsilon_H = pi²/2
	d1   float64 // delta_1 = d ln|pi|/dN = epsilon_2/2
	d1N  float64 // d delta_1/dN = epsilon_2 epsilon_3/2
	lnPi float64 // ln|pi|, so ln z = N + lnPi for z = a pi
	phi  float64
	pi   float64
}

// flowAt evaluates the flow quantities at the state (phi, pi) and clock
// N, using the background equations and V, V', V” at phi:
//
//	pi_N  = -(3 - eps)(pi + u),              u = V'/V,
//	pi_NN = pi pi_N (pi + u) - (3 - eps)(pi_N + (eta - u²) pi),  eta = V”/V,
//
// (differentiating pi_N with d eps/dN = pi pi_N and du/dN = (eta - u²) pi),
// delta_1 = pi_N/pi and d delta_1/dN = pi_NN/pi - delta_1².
func flowAt(m *model.Model, N, phi, pi float64) flow {
	j := m.At(phi)
	u := j.D1 / j.V
	eta := j.D2 / j.V
	eps := float64(float64(0.5*pi) * pi)
	q := 3 - eps
	piN := float64(-q * (pi + u))
	piNN := float64(float64(pi*piN)*(pi+u)) - float64(q*(piN+float64((eta-float64(u*u))*pi)))
	d1 := piN / pi
	return flow{
		lnAH: N + float64(0.5*detmath.Log(j.V/q)),
		eps:  eps,
		d1:   d1,
		d1N:  piNN/pi - float64(d1*d1),
		lnPi: detmath.Log(math.Abs(pi)),
		phi:  phi,
		pi:   pi,
	}
}

// modeCoeffs are the background coefficients of the mode equations.
type modeCoeffs struct {
	eps, d1, d1N float64 // epsilon_H, delta_1, d delta_1/dN
	h2           float64 // H²
}

// modeSeries holds the Taylor coefficients in N (the k-th is the k-th
// derivative over k!) of the background at a mode's start.
type modeSeries struct {
	eps [4]float64 // epsilon_H
	zs  [2]float64 // Z_s = z”/z/(aH)² of the scalar mode
	h2  float64    // H²
}

// coeffsAt is the part of flowAt the mode equations need, without
// logarithms.
func coeffsAt(m *model.Model, phi, pi float64) modeCoeffs {
	j := m.At(phi)
	u := j.D1 / j.V
	eta := j.D2 / j.V
	eps := float64(float64(0.5*pi) * pi)
	q := 3 - eps
	piN := float64(-q * (pi + u))
	piNN := float64(float64(pi*piN)*(pi+u)) - float64(q*(piN+float64((eta-float64(u*u))*pi)))
	d1 := piN / pi
	return modeCoeffs{eps: eps, d1: d1, d1N: piNN/pi - float64(d1*d1), h2: j.V / q}
}

// seriesAt returns the Taylor coefficients in N of epsilon_H (to third
// order) and of Z_s = z”/z/(aH)² (to first) at the state (phi, pi), for
// the adiabatic start of a mode (see adiabatic.go), and H². With
// u = V'/V, eta = V”/V, xi = V”'/V, w = eta - u² (so du/dN = w pi and
// dw/dN = (xi - eta u - 2uw) pi), differentiating pi_NN of flowAt once
// more gives
//
//	pi_NNN = (pi_N² + pi pi_NN)(pi + u) + 2 pi pi_N (pi_N + w pi)
//	         - (3 - eps)(pi_NN + w_N pi + w pi_N),
//
// and then, with delta_1 = pi_N/pi,
//
//	epsilon_H' = pi pi_N, epsilon_H” = pi_N² + pi pi_NN,
//	epsilon_H”' = 3 pi_N pi_NN + pi pi_NNN,
//	delta_1”  = pi_NNN/pi - 3 delta_1 delta_1' - delta_1³,
//	Z_s       = (1 + delta_1)(2 - epsilon_H + delta_1) + delta_1',
//	Z_s'      = delta_1'(2 - epsilon_H + delta_1) + (1 + delta_1)(delta_1' - epsilon_H') + delta_1”.
func seriesAt(m *model.Model, phi, pi float64) modeSeries {
	j := m.At(phi)
	u := j.D1 / j.V
	eta := j.D2 / j.V
	xi := j.D3 / j.V
	w := eta - float64(u*u)
	wN := float64((xi - float64(eta*u) - float64(float64(2*u)*w)) * pi)
	eps := float64(float64(0.5*pi) * pi)
	q := 3 - eps
	piN := float64(-q * (pi + u))
	piNN := float64(float64(pi*piN)*(pi+u)) - float64(q*(piN+float64(w*pi)))
	piNNN := float64((float64(piN*piN)+float64(pi*piNN))*(pi+u)) + float64(float64(float64(2*pi)*piN)*(piN+float64(w*pi))) - float64(q*(piNN+float64(wN*pi)+float64(w*piN)))
	d1 := piN / pi
	d1N := piNN/pi - float64(d1*d1)
	d1NN := piNNN/pi - float64(float64(3*d1)*d1N) - float64(float64(d1*d1)*d1)
	e1 := float64(pi * piN)
	return modeSeries{
		eps: [4]float64{eps, e1, float64(0.5 * (float64(piN*piN) + float64(pi*piNN))), (float64(float64(3*piN)*piNN) + float64(pi*piNNN)) / 6},
		zs:  [2]float64{float64((1+d1)*(2-eps+d1)) + d1N, float64(d1N*(2-eps+d1)) + float64((1+d1)*(d1N-e1)) + d1NN},
		h2:  j.V / q,
	}
}

// series implements modeSystem.
func (b *background) series(N float64) (modeSeries, bool) {
	var y [2]float64
	if err := b.dense.At(N, y[:]); err != nil {
		return modeSeries{}, false
	}
	return seriesAt(b.m, y[0], y[1]), true
}

// coeffs implements modeSystem.
func (b *background) coeffs(N float64) (modeCoeffs, bool) {
	var y [2]float64
	if err := b.dense.At(N, y[:]); err != nil {
		return modeCoeffs{}, false
	}
	return coeffsAt(b.m, y[0], y[1]), true
}

// lnPi implements modeSystem.
func (b *background) lnPi(N float64) float64 {
	var y [2]float64
	if err := b.dense.At(N, y[:]); err != nil {
		return math.NaN()
	}
	return detmath.Log(math.Abs(y[1]))
}

func (b *background) flow(N float64) (flow, error) {
	var y [2]float64
	if err := b.dense.At(N, y[:]); err != nil {
		return flow{}, err
	}
	return flowAt(b.m, N, y[0], y[1]), nil
}

// lnAH is ln(aH) at clock N, or NaN outside the solution.
func (b *background) lnAH(N float64) float64 {
	var y [2]float64
	if err := b.dense.At(N, y[:]); err != nil {
		return math.NaN()
	}
	v := b.m.At(y[0]).V
	return N + float64(0.5*detmath.Log(v/(3-float64(float64(0.5*y[1])*y[1]))))
}

// Event indices of the background integration.
const (
	evEnd      = iota // the requested end condition
	evEpsilonH        // epsilon_H = 1 before a non-epsilon_H end
	evClimb           // pi V' changes sign: the field moves uphill
	evEdge            // the field leaves the model's range
)

// integrateBackground integrates from the initial field phi0 (velocity on
// the slow-roll attractor) for at most cfg.maxEfolds e-folds, rolling
// in the direction dir (+1 when phi grows) towards the end condition.
func integrateBackground(m *model.Model, phi0, dir float64, cfg *exactConfig) (*background, error) {
	desc := m.Describe()
	j := m.At(phi0)
	u := j.D1 / j.V
	epsV := float64(float64(0.5*u) * u)
	eta := j.D2 / j.V
	// The attractor velocity to second order, pi = -w,
	// w = u(1 + (eta_V - 2 eps_V)/3) (Hamilton–Jacobi expansion; see
	// FlowFromPotential). Its error decays like e^{-3N}.
	pi0 := float64(-u * (1 + (eta-float64(2*epsV))/3))
	if !(epsV < 1) || !(0.5*pi0*pi0 < 1) || !isFinite(pi0) {
		return nil, &InflationError{Model: desc, Kind: NeverStarts, End: cfg.end, Phi: phi0, Pi: pi0, EpsilonH: 0.5 * pi0 * pi0, N: 0,
			Detail: fmt.Sprintf("no slow roll at the initial point (epsilon_V = %.4g)", epsV)}
	}
	rhs := func(_ float64, y, dy []float64) {
		jj := m.At(y[0])
		p := y[1]
		dy[0] = p
		dy[1] = float64(-(3 - float64(float64(0.5*p)*p)) * (p + jj.D1/jj.V))
	}
	epsH := func(_ float64, y []float64) float64 { return float64(float64(0.5*y[1])*y[1]) - 1 }
	var endG func(float64, []float64) float64
	switch cfg.end {
	case EndEpsilonH:
		endG = epsH
	case EndEpsilonV, EndEtaV:
		g := potentialCondition(cfg.end)
		endG = func(_ float64, y []float64) float64 { return g(m.At(y[0])) }
	case EndField:
		endG = func(_ float64, y []float64) float64 { return dir * (y[0] - cfg.endPhi) }
	}
	events := []ode.Event{
		evEnd:      {G: endG, Direction: 1, Terminal: true},
		evEpsilonH: {G: epsH, Direction: 1, Terminal: cfg.end != EndEpsilonH},
		evClimb: {G: func(_ float64, y []float64) float64 {
			jj := m.At(y[0])
			return y[1] * jj.D1 / jj.V
		}, Direction: 1, Terminal: true},
		evEdge: {G: func(_ float64, y []float64) float64 {
			return math.Min(y[0]-m.Lo, m.Hi-y[0])
		}, Direction: -1, Terminal: true},
	}
	if cfg.end == EndEpsilonH {
		events[evEpsilonH].G = func(float64, []float64) float64 { return -1 } // never fires
	}
	s := &ode.Settings{RTol: cfg.rtol, ATol: cfg.atol, Dense: true, Events: events, MaxSteps: cfg.maxSteps}
	r, err := ode.Solve(rhs, 0, cfg.maxEfolds, []float64{phi0, pi0}, s)
	fail := func(kind InflationKind, detail string, cause error) error {
		p := r.Y[1]
		return &InflationError{Model: desc, Kind: kind, End: cfg.end, Phi: r.Y[0], Pi: p, EpsilonH: 0.5 * p * p, N: r.T, Detail: detail, Err: cause}
	}
	if err != nil {
		var nf *ode.NotFiniteError
		if errors.As(err, &nf) {
			return nil, fail(NeverEnds, fmt.Sprintf("the potential is not finite beyond the trajectory after %.4g e-folds (the field reaches the edge of its range)", r.T), err)
		}
		if gap := math.Min(math.Abs(r.Y[0]-m.Lo), math.Abs(m.Hi-r.Y[0])); gap < 1e-9*math.Max(1, math.Max(math.Abs(m.Lo), math.Abs(m.Hi))) {
			// The integrator stalls at the edge of the range: the field has
			// rolled to the potential's minimum there (a cusp for a power
			// below 1) still inflating, so the end condition never holds.
			return nil, fail(NeverEnds, fmt.Sprintf("the field rolls to the edge of its range (the potential's minimum at phi = %.6g) after %.4g e-folds, still inflating (epsilon_H = %.3g < 1)", r.Y[0], r.T, 0.5*r.Y[1]*r.Y[1]), nil)
		}
		return nil, fail(NeverEnds, "background integration failed", err)
	}
	if r.Status != ode.Stopped {
		return nil, fail(NeverEnds, fmt.Sprintf("no end of inflation within %.4g e-folds of the initial point", cfg.maxEfolds), nil)
	}
	switch r.Events[len(r.Events)-1].Event {
	case evEpsilonH:
		return nil, fail(EndsEarly, fmt.Sprintf("epsilon_H = 1 after %.6g e-folds, before %s", r.T, cfg.end), nil)
	case evClimb:
		return nil, fail(Climbs, fmt.Sprintf("the field starts to climb after %.6g e-folds, before %s", r.T, cfg.end), nil)
	case evEdge:
		return nil, fail(NeverEnds, fmt.Sprintf("the field leaves the range (%g, %g) after %.6g e-folds", m.Lo, m.Hi, r.T), nil)
	}
	return &background{m: m, dense: r.Dense, nEnd: r.T, phiEnd: r.Y[0], piEnd: r.Y[1], dir: dir, stats: r.Stats}, nil
}

// solveBackground chooses the initial point on the slow-roll attractor
// about `need` e-folds before the end (by the first-order slow-roll
// e-fold count from the reference end, which underestimates the exact
// count: see EfoldShift), integrates, and moves the start back while
// fewer than `need` e-folds were found.
func solveBackground(m *model.Model, need float64, cfg *exactConfig) (*background, error) {
	ref, err := referenceEnd(m, cfg.end, cfg.endPhi)
	if err != nil {
		return nil, err
	}
	sol := &Solution{Model: m, End: ref, Settings: cfg.slowRoll}
	// A small safety margin on top of the need: the exact count differs
	// from the slow-roll estimate mostly near the end.
	nSR := need + 1
	var lastErr error
	for attempt := 0; attempt < 6; attempt++ {
		target := nSR
		phi0, err := sol.PhiAt(target)
		if err != nil {
			return nil, &InflationError{Model: m.Describe(), Kind: TooFewEfolds, End: cfg.end, Phi: ref.Phi, Pi: math.NaN(), EpsilonH: math.NaN(), N: math.NaN(),
				Detail: fmt.Sprintf("the field range cannot hold the %.4g e-folds needed before the end", need), Err: err}
		}
		bg, err := integrateBackground(m, phi0, ref.Direction, cfg)
		if err != nil {
			return nil, err
		}
		if bg.nEnd >= need {
			return bg, nil
		}
		lastErr = fmt.Errorf("%.6g e-folds from phi = %.6g", bg.nEnd, phi0)
		nSR += need - bg.nEnd + 1
	}
	return nil, &InflationError{Model: m.Describe(), Kind: TooFewEfolds, End: cfg.end, Phi: math.NaN(), Pi: math.NaN(), EpsilonH: math.NaN(), N: math.NaN(),
		Detail: fmt.Sprintf("could not start %.4g e-folds before the end", need), Err: lastErr}
}
