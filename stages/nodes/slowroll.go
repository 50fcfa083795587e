package nodes

import (
	"context"
	"fmt"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// Slow-roll methods.
const (
	MethodFirst  = "first"  // first-order potential slow roll
	MethodSecond = "second" // second-order (Stewart & Lyth), end calibrated on the exact background
	MethodExact  = "exact"  // background plus Mukhanov–Sasaki modes
)

// Methods lists the slow-roll methods.
var Methods = []string{MethodFirst, MethodSecond, MethodExact}

// Ends of inflation.
const (
	EndEpsilonVOne = "epsilon_V=1"
	EndEpsilonHOne = "epsilon_H=1" // on the exact background; first order counts its pivot from there
	EndEtaVOne     = "eta_V=1"     // |eta_V| = 1
	EndField       = "field"       // at the field value end_phi
)

// Ends lists the end conditions.
var Ends = []string{EndEpsilonVOne, EndEpsilonHOne, EndEtaVOne, EndField}

// DefaultEnd is the end condition a method uses when none is given.
func DefaultEnd(method string) string {
	if method == MethodFirst {
		return EndEpsilonVOne
	}
	return EndEpsilonHOne
}

// exactKeys are the exact-method settings, as node parameters.
var exactKeys = []string{"rtol", "atol", "depth_in", "depth_out", "step_lnk", "early_efolds"}

// SlowRollParams are a slow-roll node's settings.
type SlowRollParams struct {
	Method, End string
	EndPhi      float64            // for End = EndField [M_p]
	Exact       map[string]float64 // exactKeys given (second and exact)
}

// Values encodes the settings as node parameters: only what influences the
// method, so that a first-order key does not change when exact settings do.
func (p SlowRollParams) Values() pipeline.Values {
	vs := pipeline.Values{"method": pipeline.String(p.Method), "end": pipeline.String(p.End)}
	if p.End == EndField {
		vs["end_phi"] = pipeline.Float(p.EndPhi, pipeline.UnitMp)
	}
	if p.Method != MethodFirst || p.End == EndEpsilonHOne { // the exact background is integrated
		for k, v := range p.Exact {
			vs[k] = pipeline.Float(v, pipeline.UnitNone)
		}
	}
	return vs
}

// Check refuses a method/end combination that does not exist.
func (p SlowRollParams) Check() error {
	if !contains(Methods, p.Method) {
		return fmt.Errorf("slow-roll method %q is not available (available: %s)", p.Method, strings.Join(Methods, ", "))
	}
	if !contains(Ends, p.End) {
		return fmt.Errorf("end of inflation %q is not available (available: %s)", p.End, strings.Join(Ends, ", "))
	}
	for k := range p.Exact {
		if !contains(exactKeys, k) {
			return fmt.Errorf("unknown exact-method setting %q (known: %s)", k, strings.Join(exactKeys, ", "))
		}
	}
	return nil
}

func contains(xs []string, x string) bool {
	for _, y := range xs {
		if y == x {
			return true
		}
	}
	return false
}

// SlowRoll is the slow-roll stage: it finds the end of inflation (and for
// the second-order method calibrates it on the exact background; for the
// exact method checks that the background reaches it).
type SlowRoll struct{}

// slowRollSpec is the stage's declaration, built once (a scan adds a node of
// each stage per model point).
var slowRollSpec = SlowRoll{}.spec()

// Spec declares the stage. The declaration is shared: callers must not
// modify its slices.
func (SlowRoll) Spec() pipeline.Spec { return slowRollSpec }

func (SlowRoll) spec() pipeline.Spec {
	ps := []pipeline.ParamSpec{
		{Name: "method", Kind: pipeline.KindString},
		{Name: "end", Kind: pipeline.KindString},
		{Name: "end_phi", Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
	}
	for _, k := range exactKeys {
		ps = append(ps, pipeline.ParamSpec{Name: k, Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true})
	}
	return pipeline.Spec{Name: SlowRollStage, Version: SlowRollVersion, Inputs: []string{CanonicalStage}, Params: ps}
}

// decodeSlowRoll reads the settings back from node values (parameters or
// the outputs that carry them forward).
func decodeSlowRoll(vs pipeline.Values) SlowRollParams {
	var p SlowRollParams
	p.Method = text(vs, "method")
	p.End = text(vs, "end")
	if p.End == EndField {
		p.EndPhi, _ = number(vs, "end_phi")
	}
	if p.Method == MethodFirst && p.End != EndEpsilonHOne {
		return p // no exact background: Values writes no exact settings
	}
	for _, k := range exactKeys {
		if x, ok := number(vs, k); ok {
			if p.Exact == nil {
				p.Exact = map[string]float64{}
			}
			p.Exact[k] = x
		}
	}
	return p
}

// exactSettings turns the settings into the exact method's.
func (p SlowRollParams) exactSettings() *slowroll.ExactSettings {
	s := &slowroll.ExactSettings{
		RTol: p.Exact["rtol"], ATol: p.Exact["atol"], DepthIn: p.Exact["depth_in"], DepthOut: p.Exact["depth_out"],
		StepLnK: p.Exact["step_lnk"], EarlyEfolds: p.Exact["early_efolds"],
	}
	switch p.End {
	case EndEpsilonVOne:
		s.End = slowroll.EndEpsilonV
	case EndEtaVOne:
		s.End = slowroll.EndEtaV
	case EndField:
		s.End, s.EndPhi = slowroll.EndField, p.EndPhi
	default:
		s.End = slowroll.EndEpsilonH
	}
	return s
}

// potentialEnd finds the slow-roll end of inflation for the settings.
func (p SlowRollParams) potentialEnd(sol *slowroll.Solution) (slowroll.End, error) {
	m := sol.Model
	switch p.End {
	case EndEtaVOne:
		return slowroll.FindEndWhere(m, slowroll.EtaVCondition, nil)
	case EndField:
		return slowroll.EndAtField(m, p.EndPhi)
	}
	return slowroll.FindEnd(m, nil) // epsilon_V = 1, also the reference for epsilon_H = 1
}

// Run locates the end of inflation.
func (SlowRoll) Run(_ context.Context, params pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(SlowRollStage, inputs)
	if err != nil {
		return nil, err
	}
	sp := decodeSlowRoll(params)
	if err := sp.Check(); err != nil {
		return nil, err
	}
	m, err := rebuildModel(in)
	if err != nil {
		return nil, err
	}
	sol := &slowroll.Solution{Model: m}
	if sol.End, err = sp.potentialEnd(sol); err != nil {
		return nil, err
	}
	out := specOf(m, in, len(params)+3)
	for k, v := range params {
		out[k] = v
	}
	out["phi_end"] = pipeline.Float(sol.End.Phi, pipeline.UnitMp)
	out["roll_direction"] = pipeline.Float(sol.End.Direction, pipeline.UnitNone)
	out["V_end_shape"] = pipeline.Float(sol.End.V, pipeline.UnitNone)
	switch {
	case sp.Method == MethodSecond || (sp.Method == MethodFirst && sp.End == EndEpsilonHOne):
		// Second order always counts from the exact end; first order does
		// when asked to end at epsilon_H = 1 (first-order formulas at the
		// pivot N* e-folds before the exact end).
		cal, err := sol.CalibrateEnd(sp.exactSettings())
		if err != nil {
			return nil, fmt.Errorf("calibrating the end of inflation on the exact background: %w", err)
		}
		out["cal_phi"] = pipeline.Float(cal.Phi, pipeline.UnitMp)
		out["cal_N_exact"] = pipeline.Float(cal.NExact, pipeline.UnitNone)
		out["cal_delta_N"] = pipeline.Float(cal.DeltaN, pipeline.UnitNone)
		out["phi_end_exact"] = pipeline.Float(cal.PhiEnd, pipeline.UnitMp)
	case sp.Method == MethodExact:
		es, err := slowroll.SolveExact(m, 60, sp.exactSettings())
		if err != nil {
			return nil, err
		}
		out["phi_end_exact"] = pipeline.Float(es.PhiEnd(), pipeline.UnitMp)
	}
	return out, nil
}

// solutionFrom rebuilds the slow-roll solution from a slow-roll node's
// outputs, without searching for the end again.
func solutionFrom(in pipeline.Values) (*slowroll.Solution, error) {
	m, err := rebuildModel(in)
	if err != nil {
		return nil, err
	}
	phi, ok := number(in, "phi_end")
	if !ok {
		_, err := in.Num("phi_end")
		return nil, err
	}
	dir, ok := number(in, "roll_direction")
	if !ok {
		_, err := in.Num("roll_direction")
		return nil, err
	}
	return &slowroll.Solution{Model: m, End: slowroll.End{Phi: phi, Direction: dir, V: m.At(phi).V}}, nil
}

// NStarDefinition says in words what N* counts for a method and an end
// condition; every result carries it.
func NStarDefinition(method, end string) string {
	to := map[string]string{
		EndEpsilonVOne: "epsilon_V = 1",
		EndEpsilonHOne: "epsilon_H = 1 on the exact background",
		EndEtaVOne:     "|eta_V| = 1",
		EndField:       "the field end_phi",
	}[end]
	if to == "" {
		to = end
	}
	switch {
	case method == MethodFirst && end == EndEpsilonHOne:
		return "e-folds from the pivot's horizon exit to " + to + ": first-order slow-roll count (integral of V/V') to 20 e-folds before the slow-roll end, exact background from there; first-order observables at that pivot"
	case method == MethodFirst:
		return "first-order slow-roll e-folds (integral of V/V') from the pivot to " + to
	case method == MethodSecond:
		return "second-order slow-roll e-folds from the pivot's horizon exit to " + to + ", the last 20 e-folds on the exact background"
	case method == MethodExact:
		return "e-folds of the exact background from the pivot's horizon exit (k* = aH) to " + to
	}
	return ""
}
