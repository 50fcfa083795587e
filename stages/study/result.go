package study

import (
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// Result is one reported prediction. The JSON names are a stable interface.
type Result struct {
	Label          string             `json:"label"`
	Model          string             `json:"model"`
	Params         map[string]float64 `json:"params"`
	Potential      string             `json:"potential,omitempty"` // a user-written model's V
	Kinetic        string             `json:"kinetic,omitempty"`   // and K
	Method         string             `json:"method,omitempty"`
	End            string             `json:"end,omitempty"`               // the end-of-inflation condition
	NStarDef       string             `json:"N_star_definition,omitempty"` // what N* counts, in words
	Reheating      string             `json:"reheating,omitempty"`
	NStar          float64            `json:"N_star"`
	PhiStar        float64            `json:"phi_star"`
	PhiEnd         float64            `json:"phi_end"`                     // the end N* is counted from
	PhiEndSlowRoll *float64           `json:"phi_end_slow_roll,omitempty"` // the potential's end condition, where it differs
	Ns             float64            `json:"n_s"`
	R              float64            `json:"r"`
	AlphaS         float64            `json:"alpha_s"`
	Nt             float64            `json:"n_t"`
	EnergyScaleGeV *float64           `json:"energy_scale_GeV,omitempty"`
	HStarGeV       *float64           `json:"H_star_GeV,omitempty"`
	TRehGeV        *float64           `json:"T_reh_GeV,omitempty"`
	TMaxGeV        *float64           `json:"T_max_GeV,omitempty"`
	WReh           *float64           `json:"w_reh,omitempty"`
	NReh           *float64           `json:"N_reh,omitempty"`
	BelowBBN       *bool              `json:"below_bbn,omitempty"`
	Band           *Band              `json:"band,omitempty"`
	Constraint     string             `json:"constraint,omitempty"`
	DeltaChi2      *float64           `json:"delta_chi2,omitempty"`
	NSigma         *float64           `json:"n_sigma,omitempty"`
	Inside68       *bool              `json:"inside_68,omitempty"`
	Inside95       *bool              `json:"inside_95,omitempty"`
	R95            *float64           `json:"r95,omitempty"`         // the constraint's 1-D 95% bound on r
	ExceedsR95     *bool              `json:"exceeds_r95,omitempty"` // r > r95
	DetectionSigma *float64           `json:"detection_sigma,omitempty"`
	Detected5Sigma *bool              `json:"detected_5sigma,omitempty"`
	Key            string             `json:"key"`
	Error          string             `json:"error,omitempty"`
	// Inference holds the summaries of an inference's result
	// (InferenceResult): ln_Z, and each quantity's median and interval
	// ends; nil for a prediction.
	Inference map[string]float64 `json:"inference,omitempty"`
	// Row is the N of "trace RUN#N" for this result: its position, from 1,
	// among the run's recorded results. It is set only where a command
	// writes results as JSON (run --json, predict --json) and is 0, so
	// omitted, for a failed result, which is never recorded as a result.
	Row int `json:"row,omitempty"`
}

// AssemblyNeeds says what Assemble reads of a lineage node of each stage:
// the outputs of the model, slow-roll, reheat and compare stages, and the
// parameters of the compare stage (for its one-dimensional r bound). A
// reader of many results decodes only these.
func AssemblyNeeds(stage string) (params, outputs bool) {
	switch stage {
	case nodes.ModelStage, nodes.SlowRollStage, nodes.ReheatStage:
		return false, true
	case nodes.CompareStage:
		return true, true
	}
	return false, false
}

// Band is the span of a reheating band's predictions, with the histories
// at the two ends of its N* span.
type Band struct {
	Points         int        `json:"points"`
	NStar          [2]float64 `json:"N_star"`
	Ns             [2]float64 `json:"n_s"`
	R              [2]float64 `json:"r"`
	WAtNStar       [2]float64 `json:"w_reh_at_N_star"`
	TRehAtNStarGeV [2]float64 `json:"T_reh_at_N_star_GeV"`
	TMaxGeV        float64    `json:"T_max_GeV"`
	// NsAtNStar and RAtNStar are the predictions at the two ends of the
	// N* span: the edges of the stripe a scanned model draws.
	NsAtNStar [2]float64 `json:"n_s_at_N_star"`
	RAtNStar  [2]float64 `json:"r_at_N_star"`
}

// StageOutputs is one node of a result's lineage: its stage and outputs,
// and optionally its parameters (a compare node's give the constraint,
// from which Assemble reads the one-dimensional bound r95 when the outputs
// do not carry it).
type StageOutputs struct {
	Stage   string
	Outputs pipeline.Values
	Params  pipeline.Values
}

// Assemble builds a result from the outputs along its lineage (any order).
func Assemble(label string, key pipeline.KeyID, lineage []StageOutputs) Result {
	res := Result{Label: label, Key: string(key), Params: map[string]float64{}}
	num := func(vs pipeline.Values, n string) float64 { x, _ := vs.Num(n); return x }
	opt := func(vs pipeline.Values, n string) *float64 {
		if v, ok := vs[n]; ok && v.Kind == pipeline.KindFloat {
			x := v.Float
			return &x
		}
		return nil
	}
	flag := func(vs pipeline.Values, n string) *bool {
		s, err := vs.Text(n)
		if err != nil {
			return nil
		}
		b := s == "yes"
		return &b
	}
	var compareParams pipeline.Values
	for _, l := range lineage {
		vs := l.Outputs
		switch l.Stage {
		case nodes.ModelStage:
			res.Model, _ = vs.Text("family")
			res.Potential, _ = vs.Text("potential")
			res.Kinetic, _ = vs.Text("kinetic")
			for n, v := range vs {
				if p, ok := strings.CutPrefix(n, nodes.ParamPrefix); ok {
					res.Params[p] = v.Float
				}
			}
		case nodes.SlowRollStage:
			res.Method, _ = vs.Text("method")
			res.End, _ = vs.Text("end")
			res.NStarDef = nodes.NStarDefinition(res.Method, res.End)
			if res.PhiEnd == 0 { // the reheat node's end, where recorded, is the one used
				res.PhiEnd = num(vs, "phi_end")
			}
			sr := num(vs, "phi_end")
			res.PhiEndSlowRoll = &sr
		case nodes.ReheatStage:
			res.Reheating, _ = vs.Text("reheating")
			res.NStar = num(vs, "N_star")
			res.PhiStar = num(vs, "phi_star")
			if v := opt(vs, "phi_end"); v != nil {
				res.PhiEnd = *v
			}
			res.Ns = num(vs, "n_s")
			res.R = num(vs, "r")
			res.AlphaS = num(vs, "alpha_s")
			res.Nt = num(vs, "n_t")
			res.EnergyScaleGeV = opt(vs, "energy_scale_GeV")
			res.HStarGeV = opt(vs, "H_star_GeV")
			res.TRehGeV = opt(vs, "T_reh_GeV")
			res.TMaxGeV = opt(vs, "T_max_GeV")
			res.WReh = opt(vs, "w_reh")
			res.NReh = opt(vs, "N_reh")
			res.BelowBBN = flag(vs, "below_bbn")
			if _, ok := vs["N_star_min"]; ok {
				res.Band = &Band{
					Points:         int(num(vs, "band_points")),
					NStar:          [2]float64{num(vs, "N_star_min"), num(vs, "N_star_max")},
					Ns:             [2]float64{num(vs, "n_s_min"), num(vs, "n_s_max")},
					R:              [2]float64{num(vs, "r_min"), num(vs, "r_max")},
					WAtNStar:       [2]float64{num(vs, "w_at_N_star_min"), num(vs, "w_at_N_star_max")},
					TRehAtNStarGeV: [2]float64{num(vs, "T_reh_at_N_star_min_GeV"), num(vs, "T_reh_at_N_star_max_GeV")},
					TMaxGeV:        num(vs, "T_max_GeV"),
					NsAtNStar:      [2]float64{num(vs, "n_s_at_N_star_min"), num(vs, "n_s_at_N_star_max")},
					RAtNStar:       [2]float64{num(vs, "r_at_N_star_min"), num(vs, "r_at_N_star_max")},
				}
			}
		case nodes.CompareStage:
			res.Constraint, _ = vs.Text("constraint")
			res.DeltaChi2 = opt(vs, "delta_chi2")
			res.NSigma = opt(vs, "n_sigma")
			res.Inside68 = flag(vs, "inside_68")
			res.Inside95 = flag(vs, "inside_95")
			res.R95 = opt(vs, "r95")
			res.ExceedsR95 = flag(vs, "exceeds_r95")
			compareParams = l.Params
			res.DetectionSigma = opt(vs, "detection_sigma")
			res.Detected5Sigma = flag(vs, "detected_5sigma")
		}
	}
	if res.PhiEndSlowRoll != nil && *res.PhiEndSlowRoll == res.PhiEnd {
		res.PhiEndSlowRoll = nil // the same point: reported once
	}
	if res.R95 == nil && res.DeltaChi2 != nil && compareParams != nil {
		if r95, ok := OneDimensionalBound(compareParams); ok {
			exceeds := res.R > r95
			res.R95, res.ExceedsR95 = &r95, &exceeds
		}
	}
	return res
}

// Results assembles every result of an executed graph from the report.
// A result whose node did not succeed carries the first error along its
// lineage.
func Results(g *pipeline.Graph, rep *pipeline.Report) []Result {
	out := make([]Result, 0, len(g.Results))
	for _, r := range g.Results {
		var lineage []StageOutputs
		var firstErr string
		seen := map[int]bool{}
		var walk func(i int)
		walk = func(i int) {
			if seen[i] {
				return
			}
			seen[i] = true
			for _, in := range g.Nodes[i].Inputs {
				walk(in)
			}
			o := rep.Outcomes[i]
			if o.Err != nil && firstErr == "" {
				firstErr = o.Err.Error()
			}
			lineage = append(lineage, StageOutputs{Stage: g.Nodes[i].Stage.Spec().Name, Outputs: o.Outputs, Params: g.Nodes[i].Params})
		}
		walk(r.Node)
		res := Assemble(r.Label, rep.Outcomes[r.Node].Key, lineage)
		res.Error = firstErr
		out = append(out, res)
	}
	return out
}
