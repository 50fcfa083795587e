package slowroll

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// The exact method, in brief (the equations are in background.go and
// modes.go):
//
//   - Clock: e-folds N (ln a), for the background and the modes alike, so
//     that nothing depends on V0 and the hundred-odd e-folds of a solution
//     span a range of order 100 rather than e^100.
//   - Background: from a point on the slow-roll attractor (velocity to
//     second order) a settling stretch EarlyEfolds before the first mode
//     starts; the end condition is an event located on the dense output;
//     leaving the field range, climbing the potential, ending early and
//     running out of e-folds are events or checks that give an
//     *InflationError with the values.
//   - Modes: the Bunch–Davies amplitude |v| from the Ermakov–Pinney
//     equation in the logarithmic variable s = ln(|v| sqrt(2k)), which
//     neither oscillates inside the horizon nor grows without bound
//     outside it; the scalar and tensor modes of the five k of the
//     stencil in one system on one background lookup per evaluation,
//     each mode joining at DepthIn with adiabatic initial data to eighth
//     order in (aH/k)² (adiabatic.go) and read off at DepthOut.
//   - Observables: a five-point stencil in ln k around k_* = aH.
//   - Normalisation: P_s is returned for V0 = 1 and scales with V0.

// ExactSettings controls the exact method. A nil *ExactSettings, and any
// zero field, means the documented default.
type ExactSettings struct {
	// RTol and ATol are the integrator tolerances of the background and of
	// the modes. Defaults 1e-10 and 1e-12: against a reference with both
	// tightened a hundredfold, the modes started at DepthIn = 100, read
	// off at DepthOut = 1e-6 and the background settled for 10 e-folds,
	// the defaults are off by at most 9e-11 in n_s, 2e-10 in alpha_s,
	// 2e-12 in n_t and 8e-10 relative in r over the built-in families
	// (TestExactConvergence), far below the 1e-5 the predictions need, at
	// about 12500 right-hand-side evaluations per prediction (6000 of
	// them the background's).
	RTol, ATol float64
	// DepthIn is k/(aH) where each mode starts from the Bunch–Davies
	// (adiabatic) state; default 10, where the adiabatic series of
	// adiabatic.go is accurate to about 1e-11 (its terms shrink until
	// order x). Below about 8 the truncated series limits the accuracy
	// (at 8: 1e-9 in n_t); the cost of a mode grows linearly with DepthIn.
	DepthIn float64
	// DepthOut is k/(aH) where each mode's spectrum is read off; default
	// 1e-4, where the residual super-horizon evolution of the curvature
	// perturbation, O((k/aH)²), is 1e-8 and almost the same for all modes
	// of the stencil.
	DepthOut float64
	// StepLnK is the spacing in ln k of the five-point stencil around the
	// pivot; default 1 (see Exact for why).
	StepLnK float64
	// EarlyEfolds is the number of e-folds the background runs before the
	// first mode starts, to settle on the attractor; default 6 (the
	// deviation from it decays like e^{-3N}).
	EarlyEfolds float64
	// End is the end condition; default EndEpsilonH.
	End EndCondition
	// EndPhi is the field value ending inflation for End = EndField.
	EndPhi float64
	// MaxEfolds bounds the background integration; default the e-folds
	// needed plus max(100, the e-folds needed).
	MaxEfolds float64
	// MaxSteps bounds the steps of the background integration and of each
	// stretch of the mode integration between two mode starts; default
	// 200000.
	MaxSteps int
	// SlowRoll is passed to the slow-roll e-fold count that places the
	// initial point.
	SlowRoll *Settings
}

type exactConfig struct {
	rtol, atol        float64
	depthIn, depthOut float64
	h                 float64
	early             float64
	end               EndCondition
	endPhi            float64
	maxEfolds         float64
	maxSteps          int
	slowRoll          *Settings
}

func (s *ExactSettings) config() (exactConfig, error) {
	c := exactConfig{rtol: 1e-10, atol: 1e-12, depthIn: 10, depthOut: 1e-4, h: 1, early: 6, maxSteps: 200000}
	if s == nil {
		return c, nil
	}
	for _, f := range []struct {
		name string
		v    float64
		dst  *float64
	}{
		{"RTol", s.RTol, &c.rtol}, {"ATol", s.ATol, &c.atol},
		{"DepthIn", s.DepthIn, &c.depthIn}, {"DepthOut", s.DepthOut, &c.depthOut},
		{"StepLnK", s.StepLnK, &c.h}, {"EarlyEfolds", s.EarlyEfolds, &c.early},
		{"MaxEfolds", s.MaxEfolds, &c.maxEfolds},
	} {
		if f.v < 0 || !isFinite(f.v) {
			return c, fmt.Errorf("exact settings: %s = %g, want a finite value >= 0", f.name, f.v)
		}
		if f.v > 0 {
			*f.dst = f.v
		}
	}
	if c.depthIn <= 1 || c.depthOut >= 1 {
		return c, fmt.Errorf("exact settings: want DepthIn > 1 > DepthOut (have %g, %g)", c.depthIn, c.depthOut)
	}
	if s.End < EndEpsilonH || s.End > EndField {
		return c, fmt.Errorf("exact settings: unknown end condition %d", int(s.End))
	}
	if s.End == EndField && !isFinite(s.EndPhi) {
		return c, fmt.Errorf("exact settings: EndPhi = %g is not finite", s.EndPhi)
	}
	if s.MaxSteps < 0 {
		return c, fmt.Errorf("exact settings: MaxSteps = %d is negative", s.MaxSteps)
	}
	if s.MaxSteps > 0 {
		c.maxSteps = s.MaxSteps
	}
	c.end, c.endPhi, c.slowRoll = s.End, s.EndPhi, s.SlowRoll
	return c, nil
}

// need is the number of e-folds before the end that a pivot N* requires:
// the two outer stencil modes, their time inside the horizon
// (ln DepthIn/(1 - epsilon_H) e-folds; the factor 1.5 allows epsilon_H up
// to 1/3) and the settling.
func (c *exactConfig) need(N float64) float64 {
	return N + float64(2*c.h) + float64(1.5*detmath.Log(c.depthIn)) + 0.5 + c.early
}

// ExactStats counts the work of an exact prediction.
type ExactStats struct {
	BackgroundSteps int // accepted steps of the background
	ModeSteps       int // accepted steps of the joint integration of the five modes
	Rejected        int // rejected steps, background and modes
	Evals           int // right-hand-side evaluations, background and modes
}

// ExactResult is the exact prediction for the pivot that leaves the
// horizon N e-folds before the end of inflation.
type ExactResult struct {
	N      float64 // e-folds before the end at which k_* = aH
	Ns     float64 // scalar spectral index n_s
	R      float64 // tensor-to-scalar ratio P_t/P_s at k_*
	AlphaS float64 // running dn_s/dln k
	Nt     float64 // tensor spectral index
	// PsV0 and PtV0 are P_s(k_*) and P_t(k_*) for the model's V0 = 1;
	// both scale linearly with V0 (the trajectory in N does not depend on
	// it), so A_s = V0 PsV0.
	PsV0, PtV0 float64
	Phi        float64 // field at the pivot's horizon crossing [M_p]
	PhiEnd     float64 // field at the end of inflation
	NTotal     float64 // e-folds from the initial point to the end
	EpsilonH   float64 // epsilon_H at the pivot's horizon crossing
	// Flow holds the exact Hubble-flow parameters at the pivot's horizon
	// crossing (from the background); SecondOrder(Flow) is the
	// second-order slow-roll prediction for the same pivot.
	Flow  HubbleFlow
	Stats ExactStats
}

// ExactSolution is a model's exact background, from an initial point on
// the slow-roll attractor to the end of inflation; At evaluates the
// spectra for any pivot it covers. It is read-only and safe for
// concurrent use.
type ExactSolution struct {
	Model *model.Model
	bg    *background
	cfg   exactConfig
	nMax  float64
}

// SolveExact integrates the background of m so that pivots up to NMax
// e-folds before the end can be evaluated.
func SolveExact(m *model.Model, NMax float64, s *ExactSettings) (*ExactSolution, error) {
	cfg, err := s.config()
	if err != nil {
		return nil, err
	}
	if !(NMax > 0) || !isFinite(NMax) {
		return nil, fmt.Errorf("%s: exact method: N = %g, want a finite N > 0", m.Describe(), NMax)
	}
	need := cfg.need(NMax)
	if cfg.maxEfolds == 0 {
		cfg.maxEfolds = need + math.Max(100, need)
	}
	bg, err := solveBackground(m, need, &cfg)
	if err != nil {
		return nil, err
	}
	return &ExactSolution{Model: m, bg: bg, cfg: cfg, nMax: NMax}, nil
}

// Exact returns the exact prediction N e-folds before the end of
// inflation: SolveExact followed by At.
//
// Method. The background (see background) is integrated with e-folds as
// the clock from the attractor, with the end located as an event. The
// pivot is k_* = aH at N e-folds before the end. Five modes
// ln k = ln k_* + j h, j = -2..2, h = StepLnK, are integrated together,
// each from k/(aH) = DepthIn to DepthOut (see the mode equations in
// modes.go), giving f_j = ln P(k_j), and
//
//	n_s - 1 = (f_-2 - 8f_-1 + 8f_1 - f_2)/(12h),
//	alpha_s = (-f_-2 + 16f_-1 - 30f_0 + 16f_1 - f_2)/(12h²),
//
// the fourth-order central differences (Fornberg 1988, Math. Comp. 51,
// 699, Table 1), with n_t from the tensor spectrum likewise. Their
// truncation errors are h⁴ f⁽⁵⁾/30 and h⁴ f⁽⁶⁾/90; f⁽ⁿ⁾ is of order
// ε^(n-1) (for plateau models about 2(n-1)!/N^n), i.e. 1e-7 and 1e-8
// at N = 55, so h = 1 keeps truncation near 1e-9 while dividing the
// integration noise of ln P (about 1e-10) by only 1.5/h and 5.3/h².
func Exact(m *model.Model, N float64, s *ExactSettings) (ExactResult, error) {
	sol, err := SolveExact(m, N, s)
	if err != nil {
		return ExactResult{}, err
	}
	return sol.At(N)
}

// NTotal is the number of e-folds from the initial point to the end.
func (es *ExactSolution) NTotal() float64 { return es.bg.nEnd }

// PhiEnd is the field at the end of inflation.
func (es *ExactSolution) PhiEnd() float64 { return es.bg.phiEnd }

// FlowAt returns the exact Hubble-flow parameters N e-folds before the
// end: epsilon_1 = pi²/2, epsilon_2 = 2 d ln|pi|/dN and
// epsilon_3 = d ln|epsilon_2|/dN from the background equations.
func (es *ExactSolution) FlowAt(N float64) (HubbleFlow, error) {
	f, err := es.bg.flow(es.bg.nEnd - N)
	if err != nil {
		return HubbleFlow{}, fmt.Errorf("%s: N = %g is outside the background (%.6g e-folds): %w", es.Model.Describe(), N, es.bg.nEnd, err)
	}
	return flowToHubble(f), nil
}

func flowToHubble(f flow) HubbleFlow {
	h := HubbleFlow{Eps1: f.eps, Eps2: 2 * f.d1}
	if f.d1 != 0 {
		h.Eps3 = f.d1N / f.d1
	}
	return h
}

// clockAtDepth returns the clock at which k/(aH) = e^lnx for the mode
// e^lnk, by Brent's method on ln(aH), which grows during inflation,
// starting from a bracket around guess.
func (es *ExactSolution) clockAtDepth(lnk, lnx, guess float64) (float64, error) {
	g := func(N float64) float64 { return lnk - es.bg.lnAH(N) - lnx }
	end := es.bg.nEnd
	if g0 := g(0); g0 < 0 {
		return math.NaN(), fmt.Errorf("k/(aH) = %.4g already at the initial point (want %.4g)", detmath.Exp(lnx+g0), detmath.Exp(lnx))
	}
	if g1 := g(end); g1 > 0 {
		return math.NaN(), fmt.Errorf("k/(aH) = %.4g only at the end of inflation (want %.4g)", detmath.Exp(lnx+g1), detmath.Exp(lnx))
	}
	lo, hi := math.Max(0, math.Min(end, guess-1)), math.Min(end, math.Max(0, guess+1))
	glo, ghi := g(lo), g(hi)
	for step := 2.0; glo < 0; step *= 2 {
		lo = math.Max(0, lo-step)
		glo = g(lo)
	}
	for step := 2.0; ghi > 0; step *= 2 {
		hi = math.Min(end, hi+step)
		ghi = g(hi)
	}
	r, err := num.BrentF(g, lo, hi, glo, ghi, &num.RootSettings{XTol: 1e-13})
	if err != nil {
		return math.NaN(), err
	}
	return r.X, nil
}

// At evaluates the spectra for the pivot N e-folds before the end.
func (es *ExactSolution) At(N float64) (ExactResult, error) {
	cfg := &es.cfg
	bg := es.bg
	desc := es.Model.Describe()
	tooFew := func(detail string, err error) error {
		return &InflationError{Model: desc, Kind: TooFewEfolds, End: cfg.end, Phi: math.NaN(), Pi: math.NaN(), EpsilonH: math.NaN(), N: bg.nEnd, Detail: detail, Err: err}
	}
	if !(N > 0) || !isFinite(N) {
		return ExactResult{}, fmt.Errorf("%s: exact method: N = %g, want a finite N > 0", desc, N)
	}
	tPiv := bg.nEnd - N
	if tPiv < 0 {
		return ExactResult{}, tooFew(fmt.Sprintf("the pivot N = %g lies before the initial point; solve with NMax >= N (have %g)", N, es.nMax), nil)
	}
	fp, err := bg.flow(tPiv)
	if err != nil {
		return ExactResult{}, err
	}
	lnkPiv := fp.lnAH
	res := ExactResult{N: N, Phi: fp.phi, PhiEnd: bg.phiEnd, NTotal: bg.nEnd, EpsilonH: fp.eps, Flow: flowToHubble(fp)}
	res.Stats.BackgroundSteps = bg.stats.Steps
	res.Stats.Rejected = bg.stats.Rejected
	res.Stats.Evals = bg.stats.Evals
	var ms [5]modeSpec
	lnIn, lnOut := detmath.Log(cfg.depthIn), detmath.Log(cfg.depthOut)
	for j := -2; j <= 2; j++ {
		lnk := lnkPiv + float64(float64(j)*cfg.h)
		guess := tPiv + float64(float64(j)*cfg.h)
		N0, err := es.clockAtDepth(lnk, lnIn, guess-lnIn)
		if err != nil {
			return ExactResult{}, tooFew(fmt.Sprintf("mode %d of the stencil starts before the background", j), err)
		}
		if N0 < cfg.early {
			return ExactResult{}, tooFew(fmt.Sprintf("mode %d of the stencil starts %.4g e-folds after the initial point, want %g; solve with a larger NMax", j, N0, cfg.early), nil)
		}
		N1, err := es.clockAtDepth(lnk, lnOut, guess-lnOut)
		if err != nil {
			return ExactResult{}, tooFew(fmt.Sprintf("mode %d of the stencil does not reach k/(aH) = %g before the end: the pivot is too close to the end", j, cfg.depthOut), err)
		}
		ms[j+2] = modeSpec{lnk: lnk, N0: N0, N1: N1}
	}
	var mo [5]modeOut
	st, err := solveStencil(bg, ms[:], modeTol{rtol: cfg.rtol, atol: cfg.atol, maxSteps: cfg.maxSteps}, mo[:])
	res.Stats.ModeSteps = st.Steps
	res.Stats.Rejected += st.Rejected
	res.Stats.Evals += st.Evals
	if err != nil {
		return ExactResult{}, fmt.Errorf("%s: the modes of the stencil at N = %g: %w", desc, N, err)
	}
	var fs, ft [5]float64
	for i := range mo {
		fs[i], ft[i] = mo[i].lnPs, mo[i].lnPt
	}
	h := cfg.h
	d1 := func(f [5]float64) float64 {
		return (f[0] - float64(8*f[1]) + float64(8*f[3]) - f[4]) / (float64(12 * h))
	}
	res.Ns = 1 + d1(fs)
	res.Nt = d1(ft)
	res.AlphaS = (-fs[0] + float64(16*fs[1]) - float64(30*fs[2]) + float64(16*fs[3]) - fs[4]) / (float64(float64(12*h) * h))
	res.PsV0 = detmath.Exp(fs[2])
	res.PtV0 = detmath.Exp(ft[2])
	res.R = detmath.Exp(ft[2] - fs[2])
	return res, nil
}
