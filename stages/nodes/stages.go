package nodes

import (
	"context"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/canonical"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/model"
)

// Versions of the stages. Bump one whenever its numerics or its outputs
// change: the version is part of every key of that stage.
const (
	ModelVersion     = 4 // 2: alpha-attractor field ranges adapt to alpha; 3: those ranges from closed forms (T-model) and Newton's method (E-model) where they pass the plateau floor (alpha below about 1e-10); 4: elementary functions from stages/num/detmath and products rounded against fusion, so outputs are the same bits on every build
	CanonicalVersion = 6 // 2: quadrature of sqrt(K) in ln x on a positive native domain; 3: a quadrature at its rounding floor near a pole is accepted; 4: the check's quadrature adds stretches between sample points, each tried first with one Gauss–Kronrod 3-7 panel; 5: and before it one panel of the midpoint rule in the 3-point Gauss rule; 6: elementary functions from stages/num/detmath and products rounded against fusion, so outputs are the same bits on every build
	SlowRollVersion  = 5 // 2: PhiAt on a shared e-fold bracket with a final Newton correction (second-order calibration, exact start); 3: the bracket's steps follow the slope's scale and N's growth; 4: exact method: modes start at k/(aH) = 10 with eighth-order adiabatic data, integrated together (background start moved accordingly); also closed-form ends of inflation and e-fold counts where the family has them, and e-fold bracket cells spanning up to 16x in N; 5: elementary functions from stages/num/detmath and products rounded against fusion, so outputs are the same bits on every build
	ReheatVersion    = 7 // 2: secant steps for the self-consistent N*; PhiAt as in slow roll 2; 3: PhiAt as in slow roll 3; 4: self-consistency checks, phi_end of the end used; 5: first order matched on the pivot field; closed-form e-fold counts (alpha-attractors, Starobinsky, power law, exponential plateau); the e-fold bracket's cells span up to 16x in N; 6: fourth roots (T_max, T_reh, the GeV scales) as two square roots; 7: elementary functions from stages/num/detmath and products rounded against fusion, so outputs are the same bits on every build
	CompareVersion   = 2 // 2: elementary functions from stages/num/detmath (chi^2 levels by -2 log1p(-P), quantiles by our own linear interpolation) and products rounded against fusion, so outputs are the same bits on every build
)

// Model is the model-definition stage: it validates a family and its
// parameters and records the model's specification, formula and reference.
type Model struct{}

// modelSpec is the stage's declaration, built once (a scan adds a node of
// each stage per model point).
var modelSpec = Model{}.spec()

// Spec declares the stage. The declaration is shared: callers must not
// modify its slices.
func (Model) Spec() pipeline.Spec { return modelSpec }

func (Model) spec() pipeline.Spec {
	return pipeline.Spec{
		Name: ModelStage, Version: ModelVersion,
		Params: []pipeline.ParamSpec{
			{Name: keyFamily, Kind: pipeline.KindString},
			{Name: keyFieldLo, Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
			{Name: keyFieldHi, Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
			// user-written models
			{Name: "potential", Kind: pipeline.KindString, Optional: true},
			{Name: "kinetic", Kind: pipeline.KindString, Optional: true},
			{Name: "field", Kind: pipeline.KindString, Optional: true},
			{Name: "origin", Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
			{Name: "domain_lo", Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
			{Name: "domain_hi", Kind: pipeline.KindFloat, Unit: pipeline.UnitMp, Optional: true},
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
	if m.Family == CustomFamily {
		out := pipeline.Values{}
		carrySpec(params, out)
		v, _ := params.Text("potential")
		out["formula"] = pipeline.String("V = " + v)
		out["reference"] = pipeline.String("user-written")
		return out, nil
	}
	fam, _ := model.Lookup(m.Family)
	out := specValues(m, 3)
	out["formula"] = pipeline.String(fam.Formula)
	out["reference"] = pipeline.String(fam.Reference)
	if fam.AsymptoticW != nil {
		// The equation of state the family implies after inflation, on its
		// far tail (a dark-energy plateau), recorded with the model.
		if w, ok := fam.AsymptoticW(m.Params); ok {
			out["w_asymptotic"] = pipeline.Float(w, pipeline.UnitNone)
		}
	}
	return out, nil
}

// Canonical is the canonical-normalisation stage: it records the map from
// the model's native field to the canonical inflaton and checks it against
// a quadrature of sqrt(K).
type Canonical struct{}

// canonicalSpec is the stage's declaration, built once (a scan adds a node of
// each stage per model point).
var canonicalSpec = Canonical{}.spec()

// Spec declares the stage. The declaration is shared: callers must not
// modify its slices.
func (Canonical) Spec() pipeline.Spec { return canonicalSpec }

func (Canonical) spec() pipeline.Spec {
	return pipeline.Spec{Name: CanonicalStage, Version: CanonicalVersion, Inputs: []string{ModelStage}}
}

// Run verifies the canonical map.
func (Canonical) Run(_ context.Context, _ pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(CanonicalStage, inputs)
	if err != nil {
		return nil, err
	}
	m, err := rebuildModel(in)
	if err != nil {
		return nil, err
	}
	rep, err := canonical.Verify(m, nil)
	if err != nil {
		return nil, err
	}
	out := specOf(m, in, 4)
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

// Compare is the constraint-comparison stage: a Gaussian (n_s, r)
// constraint (Delta chi^2, sigmas, inside the 68%/95% regions) or a
// forecast sigma(r) at fiducial r = 0 (detection significance r/sigma(r)).
// The constraint's numbers are its parameters, so editing a constraint set
// recomputes exactly the comparisons that use it.
type Compare struct{}

// Kinds of comparison.
const (
	KindGaussian = "gaussian"
	KindForecast = "forecast"
)

// compareSpec is the stage's declaration, built once (a scan adds a node of
// each stage per model point).
var compareSpec = Compare{}.spec()

// Spec declares the stage. The declaration is shared: callers must not
// modify its slices.
func (Compare) Spec() pipeline.Spec { return compareSpec }

func (Compare) spec() pipeline.Spec {
	f := func(name string) pipeline.ParamSpec {
		return pipeline.ParamSpec{Name: name, Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true}
	}
	return pipeline.Spec{
		Name: CompareStage, Version: CompareVersion, Inputs: []string{ReheatStage},
		Params: []pipeline.ParamSpec{
			{Name: "constraint", Kind: pipeline.KindString},
			{Name: "citation", Kind: pipeline.KindString},
			{Name: "kind", Kind: pipeline.KindString, Optional: true}, // absent: gaussian
			{Name: "samples", Kind: pipeline.KindString, Optional: true},
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

// ForecastParams returns the compare parameters for a forecast.
func ForecastParams(f compare.Forecast) pipeline.Values {
	return pipeline.Values{
		"constraint": pipeline.String(f.Name),
		"citation":   pipeline.String(f.Citation),
		"kind":       pipeline.String(KindForecast),
		"sigma_r":    pipeline.Float(f.SigmaR, pipeline.UnitNone),
	}
}

// GaussianFrom reads a Gaussian constraint back from compare parameters.
func GaussianFrom(params pipeline.Values) (compare.Gaussian, bool) {
	if k, ok := params["kind"]; ok && k.Kind == pipeline.KindString && k.Str != KindGaussian {
		return compare.Gaussian{}, false
	}
	var g compare.Gaussian
	g.Name, _ = params.Text("constraint")
	g.Citation, _ = params.Text("citation")
	g.MeanNs, _ = params.Num("mean_n_s")
	g.SigmaNs, _ = params.Num("sigma_n_s")
	g.MeanR, _ = params.Num("mean_r")
	g.SigmaR, _ = params.Num("sigma_r")
	g.Rho, _ = params.Num("rho")
	return g, true
}

// Run compares the prediction with the constraint.
func (Compare) Run(_ context.Context, params pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(CompareStage, inputs)
	if err != nil {
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
	kind := text(params, "kind")
	if kind == KindForecast {
		var f compare.Forecast
		f.Name, _ = params.Text("constraint")
		f.Citation, _ = params.Text("citation")
		f.SigmaR, _ = params.Num("sigma_r")
		if err := f.Check(); err != nil {
			return nil, err
		}
		return pipeline.Values{
			"constraint":      pipeline.String(f.Name),
			"detection_sigma": pipeline.Float(f.Significance(r), pipeline.UnitNone),
			"detected_5sigma": pipeline.String(yesNo(f.Detects(r, 5))),
		}, nil
	}
	var c compare.Comparison
	if kind == KindSamples {
		name, _ := params.Text("constraint")
		citation, _ := params.Text("citation")
		text, _ := params.Text("samples")
		k, err := kdeFor(name, citation, text)
		if err != nil {
			return nil, err
		}
		c = k.Compare(ns, r)
	} else {
		g, _ := GaussianFrom(params)
		if err := g.Check(); err != nil {
			return nil, err
		}
		c = g.Compare(ns, r)
	}
	name, _ := params.Text("constraint")
	return pipeline.Values{
		"constraint": pipeline.String(name),
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
