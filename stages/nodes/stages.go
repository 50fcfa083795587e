package nodes

import (
	"context"
	"fmt"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/canonical"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/reheat"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// Versions of the stages. Bump one whenever its numerics or its outputs
// change: the version is part of every key of that stage.
const (
	ModelVersion     = 1
	CanonicalVersion = 1
	SlowRollVersion  = 1
	ReheatVersion    = 1
	CompareVersion   = 1
)

// Model is the model-definition stage: it validates a family and its
// parameters and records the model's specification, formula and reference.
type Model struct{}

// Spec declares the stage.
func (Model) Spec() pipeline.Spec {
	return pipeline.Spec{
		Name: ModelStage, Version: ModelVersion,
		Params: []pipeline.ParamSpec{
			{Name: keyFamily, Kind: pipeline.KindString},
			{Name: keyFieldLo, Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
			{Name: keyFieldHi, Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
		},
		OpenParams: []string{ParamPrefix},
	}
}

// Run builds the model and records its specification.
func (Model) Run(_ context.Context, params pipeline.Values, _ []pipeline.Values) (pipeline.Values, error) {
	m, err := buildModel(params)
	if err != nil {
		return nil, err
	}
	fam, _ := model.Lookup(m.Family)
	out := specValues(m)
	out["formula"] = pipeline.String(fam.Formula)
	out["reference"] = pipeline.String(fam.Reference)
	return out, nil
}

// Canonical is the canonical-normalisation stage: it records the map from
// the model's native field to the canonical inflaton and checks it against
// a quadrature of sqrt(K).
type Canonical struct{}

// Spec declares the stage.
func (Canonical) Spec() pipeline.Spec {
	return pipeline.Spec{Name: CanonicalStage, Version: CanonicalVersion, Inputs: []string{ModelStage}}
}

// Run verifies the canonical map.
func (Canonical) Run(_ context.Context, _ pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(CanonicalStage, inputs)
	if err != nil {
		return nil, err
	}
	m, err := buildModel(in)
	if err != nil {
		return nil, err
	}
	rep, err := canonical.Verify(m, nil)
	if err != nil {
		return nil, err
	}
	out := specValues(m)
	out["native_field"] = pipeline.String(rep.Field)
	out["canonical_map"] = pipeline.String(rep.MapFormula)
	out["map_check_points"] = pipeline.Float(float64(rep.Points), pipeline.UnitNone)
	out["map_check_deviation"] = pipeline.Float(maxOf(rep.MapDev, rep.InverseDev, rep.PotDev, rep.SlopeDev), pipeline.UnitNone)
	return out, nil
}

func maxOf(xs ...float64) float64 {
	m := 0.0
	for _, x := range xs {
		if x > m {
			m = x
		}
	}
	return m
}

// Slow-roll methods and end conditions.
const (
	MethodFirst    = "first"
	EndEpsilonVOne = "epsilon_V=1"
)

// SlowRoll is the slow-roll stage: it finds the end of inflation.
type SlowRoll struct{}

// Spec declares the stage.
func (SlowRoll) Spec() pipeline.Spec {
	return pipeline.Spec{
		Name: SlowRollStage, Version: SlowRollVersion, Inputs: []string{CanonicalStage},
		Params: []pipeline.ParamSpec{
			{Name: "method", Kind: pipeline.KindString},
			{Name: "end", Kind: pipeline.KindString},
		},
	}
}

// Run locates the end of inflation.
func (SlowRoll) Run(_ context.Context, params pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(SlowRollStage, inputs)
	if err != nil {
		return nil, err
	}
	if method, _ := params.Text("method"); method != MethodFirst {
		return nil, fmt.Errorf("slow-roll method %q is not available (available: %s)", method, MethodFirst)
	}
	if end, _ := params.Text("end"); end != EndEpsilonVOne {
		return nil, fmt.Errorf("end of inflation %q is not available (available: %s)", end, EndEpsilonVOne)
	}
	m, err := buildModel(in)
	if err != nil {
		return nil, err
	}
	e, err := slowroll.FindEnd(m, nil)
	if err != nil {
		return nil, err
	}
	out := specValues(m)
	out["method"] = params["method"]
	out["end"] = params["end"]
	out["phi_end"] = pipeline.Float(e.Phi, pipeline.UnitMp)
	out["roll_direction"] = pipeline.Float(e.Direction, pipeline.UnitNone)
	out["V_end_shape"] = pipeline.Float(e.V, pipeline.UnitNone)
	return out, nil
}

// solutionFrom rebuilds the slow-roll solution from a slow-roll node's
// outputs, without searching for the end again.
func solutionFrom(in pipeline.Values) (*slowroll.Solution, error) {
	m, err := buildModel(in)
	if err != nil {
		return nil, err
	}
	phi, err := in.Num("phi_end")
	if err != nil {
		return nil, err
	}
	dir, err := in.Num("roll_direction")
	if err != nil {
		return nil, err
	}
	return &slowroll.Solution{Model: m, End: slowroll.End{Phi: phi, Direction: dir, V: m.At(phi).V}}, nil
}

// Reheating histories.
const (
	HistoryFixed   = "fixed-efolds"
	HistoryInstant = "instantaneous"
)

// Reheat is the reheating-matching stage: it fixes N* (given, or from
// instantaneous reheating), evaluates the observables there and normalises
// the potential to A_s.
type Reheat struct{}

// Spec declares the stage.
func (Reheat) Spec() pipeline.Spec {
	opt := func(name, unit string) pipeline.ParamSpec {
		return pipeline.ParamSpec{Name: name, Kind: pipeline.KindFloat, Unit: unit, Optional: true}
	}
	return pipeline.Spec{
		Name: ReheatStage, Version: ReheatVersion, Inputs: []string{SlowRollStage},
		Params: []pipeline.ParamSpec{
			{Name: "history", Kind: pipeline.KindString},
			{Name: "A_s", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
			opt("N_star", pipeline.UnitNone),
			opt("k_pivot", pipeline.UnitPerMpc),
			opt("T_0", pipeline.UnitKelvin),
			opt("g_s0", pipeline.UnitNone),
			opt("g_reh", pipeline.UnitNone),
			opt("g_s_reh", pipeline.UnitNone),
		},
	}
}

// FixedParams returns the reheat parameters for a fixed N*.
func FixedParams(N, As float64) pipeline.Values {
	return pipeline.Values{
		"history": pipeline.String(HistoryFixed),
		"N_star":  pipeline.Float(N, pipeline.UnitNone),
		"A_s":     pipeline.Float(As, pipeline.UnitNone),
	}
}

// InstantParams returns the reheat parameters for instantaneous reheating.
func InstantParams(h reheat.History, As float64) pipeline.Values {
	return pipeline.Values{
		"history": pipeline.String(HistoryInstant),
		"A_s":     pipeline.Float(As, pipeline.UnitNone),
		"k_pivot": pipeline.Float(h.PivotPerMpc, pipeline.UnitPerMpc),
		"T_0":     pipeline.Float(h.T0K, pipeline.UnitKelvin),
		"g_s0":    pipeline.Float(h.GS0, pipeline.UnitNone),
		"g_reh":   pipeline.Float(h.GReh, pipeline.UnitNone),
		"g_s_reh": pipeline.Float(h.GSReh, pipeline.UnitNone),
	}
}

// Run matches the solution to the reheating history.
func (Reheat) Run(_ context.Context, params pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(ReheatStage, inputs)
	if err != nil {
		return nil, err
	}
	sol, err := solutionFrom(in)
	if err != nil {
		return nil, err
	}
	As, _ := params.Num("A_s")
	if !(As > 0) {
		return nil, fmt.Errorf("A_s = %g, want > 0", As)
	}
	norm := reheat.Normalisation{As: As}
	history, _ := params.Text("history")
	var pr reheat.Prediction
	switch history {
	case HistoryFixed:
		N, err := params.Num("N_star")
		if err != nil {
			return nil, fmt.Errorf("history %s: %w", HistoryFixed, err)
		}
		if pr, err = reheat.AtEfolds(sol, N, norm); err != nil {
			return nil, err
		}
	case HistoryInstant:
		var h reheat.History
		for _, f := range []struct {
			name string
			dst  *float64
		}{{"k_pivot", &h.PivotPerMpc}, {"T_0", &h.T0K}, {"g_s0", &h.GS0}, {"g_reh", &h.GReh}, {"g_s_reh", &h.GSReh}} {
			v, err := params.Num(f.name)
			if err != nil {
				return nil, fmt.Errorf("history %s: %w", HistoryInstant, err)
			}
			*f.dst = v
		}
		if pr, err = reheat.Instant(sol, h, norm); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("unknown reheating history %q (known: %s)", history, strings.Join([]string{HistoryFixed, HistoryInstant}, ", "))
	}
	out := pipeline.Values{
		"reheating":           pipeline.String(history),
		"A_s":                 pipeline.Float(As, pipeline.UnitNone),
		"N_star":              pipeline.Float(pr.N, pipeline.UnitNone),
		"phi_star":            pipeline.Float(pr.Point.Phi, pipeline.UnitMp),
		"epsilon_V":           pipeline.Float(pr.Point.Epsilon, pipeline.UnitNone),
		"eta_V":               pipeline.Float(pr.Point.Eta, pipeline.UnitNone),
		"xi2_V":               pipeline.Float(pr.Point.Xi2, pipeline.UnitNone),
		"n_s":                 pipeline.Float(pr.Obs.Ns, pipeline.UnitNone),
		"r":                   pipeline.Float(pr.Obs.R, pipeline.UnitNone),
		"alpha_s":             pipeline.Float(pr.Obs.AlphaS, pipeline.UnitNone),
		"n_t":                 pipeline.Float(pr.Obs.Nt, pipeline.UnitNone),
		"V0":                  pipeline.Float(pr.Scale.V0, pipeline.UnitMp4),
		"V0_quarter_GeV":      pipeline.Float(reheat.QuarterGeV(pr.Scale.V0), pipeline.UnitGeV),
		"energy_scale_GeV":    pipeline.Float(reheat.QuarterGeV(pr.Scale.Vstar), pipeline.UnitGeV),
		"H_star_GeV":          pipeline.Float(reheat.GeV(pr.Scale.Hstar), pipeline.UnitGeV),
		"rho_end_quarter_GeV": pipeline.Float(reheat.QuarterGeV(pr.Scale.RhoEnd), pipeline.UnitGeV),
	}
	if pr.TReh > 0 {
		out["T_reh_GeV"] = pipeline.Float(reheat.GeV(pr.TReh), pipeline.UnitGeV)
	}
	return out, nil
}

// Compare is the constraint-comparison stage. The constraint's numbers are
// its parameters, so editing a constraint set recomputes exactly the
// comparisons that use it.
type Compare struct{}

// Spec declares the stage.
func (Compare) Spec() pipeline.Spec {
	f := func(name string) pipeline.ParamSpec {
		return pipeline.ParamSpec{Name: name, Kind: pipeline.KindFloat, Unit: pipeline.UnitNone}
	}
	return pipeline.Spec{
		Name: CompareStage, Version: CompareVersion, Inputs: []string{ReheatStage},
		Params: []pipeline.ParamSpec{
			{Name: "constraint", Kind: pipeline.KindString},
			{Name: "citation", Kind: pipeline.KindString},
			f("mean_n_s"), f("sigma_n_s"), f("mean_r"), f("sigma_r"), f("rho"),
		},
	}
}

// GaussianParams returns the compare parameters for a constraint.
func GaussianParams(g compare.Gaussian) pipeline.Values {
	return pipeline.Values{
		"constraint": pipeline.String(g.Name),
		"citation":   pipeline.String(g.Citation),
		"mean_n_s":   pipeline.Float(g.MeanNs, pipeline.UnitNone),
		"sigma_n_s":  pipeline.Float(g.SigmaNs, pipeline.UnitNone),
		"mean_r":     pipeline.Float(g.MeanR, pipeline.UnitNone),
		"sigma_r":    pipeline.Float(g.SigmaR, pipeline.UnitNone),
		"rho":        pipeline.Float(g.Rho, pipeline.UnitNone),
	}
}

// Run compares the prediction with the constraint.
func (Compare) Run(_ context.Context, params pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(CompareStage, inputs)
	if err != nil {
		return nil, err
	}
	var g compare.Gaussian
	g.Name, _ = params.Text("constraint")
	g.Citation, _ = params.Text("citation")
	g.MeanNs, _ = params.Num("mean_n_s")
	g.SigmaNs, _ = params.Num("sigma_n_s")
	g.MeanR, _ = params.Num("mean_r")
	g.SigmaR, _ = params.Num("sigma_r")
	g.Rho, _ = params.Num("rho")
	if err := g.Check(); err != nil {
		return nil, err
	}
	ns, err := in.Num("n_s")
	if err != nil {
		return nil, err
	}
	r, err := in.Num("r")
	if err != nil {
		return nil, err
	}
	c := g.Compare(ns, r)
	return pipeline.Values{
		"constraint": pipeline.String(g.Name),
		"delta_chi2": pipeline.Float(c.DeltaChi2, pipeline.UnitNone),
		"n_sigma":    pipeline.Float(c.Sigmas, pipeline.UnitNone),
		"inside_68":  pipeline.String(yesNo(c.Inside68)),
		"inside_95":  pipeline.String(yesNo(c.Inside95)),
	}, nil
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}
