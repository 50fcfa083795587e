package study

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/infer"
	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// Inference is one [[inference]] table: a model family with a prior on
// each of its parameters and on its reheating history, inferred against
// each of the constraint sets it names (inflatrace infer).
type Inference struct {
	Label  string
	Family string
	Params []infer.Prior // every parameter of the family, in its declared order
	W      infer.Prior
	// NReh or NStar, when set, replace the T_reh prior: a prior on the
	// e-folds of reheating, or on N* itself (no reheating history).
	NReh, NStar *infer.Prior
	TLoGeV      float64
	Constraints []compare.Gaussian
	// Samples holds the samples of each sample-based set among
	// Constraints (by index; nil for a Gaussian one).
	Samples [][]compare.Point
	// Independent: the sets are independent, and one inference takes the
	// product of their likelihoods (else one inference per set).
	Independent bool
	Reference   bool
	Tol         float64
}

// SetNames are the constraint sets each of the inference's results is
// inferred against: one per set, or their product ("A × B").
func (inf Inference) SetNames() []string {
	var names []string
	for _, g := range inf.Constraints {
		names = append(names, g.Name)
	}
	if inf.Independent {
		return []string{strings.Join(names, " × ")}
	}
	return names
}

// inferenceKeys are the keys an [[inference]] table may hold besides the
// family's parameters.
var inferenceKeys = []string{"label", "family", "w_reh", "T_reh_min_GeV", "N_reh", "N_star", "constraint", "independent", "reference", "tolerance"}

// inferences reads the [[inference]] tables against the study's
// constraint sets.
func (c *parser) inferences(tables []map[string]any, sets []compare.Gaussian) ([]Inference, error) {
	var out []Inference
	refs := 0
	labels := map[string]bool{}
	for i, t := range tables {
		path := fmt.Sprintf("inference[%d]", i)
		inf := Inference{W: infer.Prior{Name: "w_reh", Kind: infer.Fixed, Value: 0}, TLoGeV: reheat.DefaultBBNBoundGeV, Tol: 0.01}
		name, ok := t["family"].(string)
		if !ok {
			return nil, c.errAt(path, "an [[inference]] needs family = \"...\" (see inflatrace models)")
		}
		fam, err := model.Lookup(name)
		if err != nil {
			return nil, c.errAt(path+".family", "%v", err)
		}
		inf.Family, inf.Label = fam.Name, fam.Name
		for k := range t {
			if !slices.Contains(inferenceKeys, k) && !slices.ContainsFunc(fam.Params, func(p model.Param) bool { return p.Name == k }) {
				return nil, c.errAt(path+"."+k, "unknown key: an [[inference]] takes %v and the parameters of %s (%s)", inferenceKeys, fam.Name, paramNames(fam))
			}
		}
		for _, d := range fam.Params {
			p, err := c.prior(path+"."+d.Name, d.Name, t[d.Name], d)
			if err != nil {
				return nil, err
			}
			inf.Params = append(inf.Params, p)
		}
		if v, ok := t["w_reh"]; ok {
			if inf.W, err = c.prior(path+".w_reh", "w_reh", v, model.Param{Name: "w_reh", Min: -1.0 / 3, MinOpen: true, Max: 1, Default: 0}); err != nil {
				return nil, err
			}
			if inf.W.Kind == infer.LogUniform {
				return nil, c.errAt(path+".w_reh", "w_reh takes a value or {uniform = [lo, hi]}")
			}
		}
		for _, e := range []struct {
			key string
			dst **infer.Prior
		}{{"N_reh", &inf.NReh}, {"N_star", &inf.NStar}} {
			v, ok := t[e.key]
			if !ok {
				continue
			}
			p, err := c.prior(path+"."+e.key, e.key, v, model.Param{Name: e.key, Min: 0, Max: math.Inf(1), Default: math.NaN()})
			if err != nil {
				return nil, err
			}
			if p.Kind == infer.LogUniform {
				return nil, c.errAt(path+"."+e.key, "%s takes a value or {uniform = [lo, hi]}", e.key)
			}
			*e.dst = &p
		}
		if inf.NStar != nil {
			for _, k := range []string{"w_reh", "N_reh", "T_reh_min_GeV"} {
				if _, ok := t[k]; ok {
					return nil, c.errAt(path+"."+k, "N_star is given: the reheating history (%s) plays no part", k)
				}
			}
		}
		if v, ok := t["T_reh_min_GeV"]; ok {
			x, _, err := number(v)
			if err != nil || !(x > 0) || math.IsInf(x, 0) {
				return nil, c.errAt(path+".T_reh_min_GeV", "want a positive temperature in GeV (the BBN bound, %g GeV, by default)", reheat.DefaultBBNBoundGeV)
			}
			inf.TLoGeV = x
		}
		if v, ok := t["tolerance"]; ok {
			x, _, err := number(v)
			if err != nil || !(x > 0 && x <= 1) {
				return nil, c.errAt(path+".tolerance", "want the target error of ln Z, 0 < tolerance <= 1 (0.01 by default)")
			}
			inf.Tol = x
		}
		if v, ok := t["label"]; ok {
			s, ok := v.(string)
			if !ok || s == "" {
				return nil, c.errAt(path+".label", "want a non-empty string")
			}
			inf.Label = s
		}
		if labels[inf.Label] {
			return nil, c.errAt(path+".label", "label %q names another [[inference]]: give each a label of its own", inf.Label)
		}
		labels[inf.Label] = true
		if v, ok := t["reference"]; ok {
			b, ok := v.(bool)
			if !ok {
				return nil, c.errAt(path+".reference", "want true or false")
			}
			inf.Reference = b
			if b {
				refs++
			}
		}
		if refs > 1 {
			return nil, c.errAt(path+".reference", "a second reference model: the Bayes factors are taken against one")
		}
		names := make([]string, 0, len(sets))
		for _, g := range sets {
			names = append(names, g.Name)
		}
		if v, ok := t["constraint"]; ok {
			if names, err = c.strings(path+".constraint", v); err != nil {
				return nil, err
			}
		}
		if _, given := t["constraint"]; !given {
			for _, ss := range c.samples {
				names = append(names, ss.Name)
			}
		}
		for _, n := range names {
			if j := slices.IndexFunc(sets, func(g compare.Gaussian) bool { return g.Name == n }); j >= 0 {
				inf.Constraints = append(inf.Constraints, sets[j])
				inf.Samples = append(inf.Samples, nil)
				continue
			}
			j := slices.IndexFunc(c.samples, func(s SampleSet) bool { return s.Name == n })
			if j < 0 {
				return nil, c.errAt(path+".constraint", "no [[constraint]] named %q in the study", n)
			}
			ss := c.samples[j]
			inf.Constraints = append(inf.Constraints, compare.Gaussian{Name: ss.Name, Citation: ss.Citation})
			inf.Samples = append(inf.Samples, ss.Points)
		}
		if len(inf.Constraints) == 0 {
			return nil, c.errAt(path, "no constraint set to infer against: add a [[constraint]]")
		}
		if v, ok := t["independent"]; ok {
			b, ok := v.(bool)
			if !ok {
				return nil, c.errAt(path+".independent", "want true or false")
			}
			if b && len(inf.Constraints) < 2 {
				return nil, c.errAt(path+".independent", "independent = true multiplies the likelihoods of two or more constraint sets; this inference names one")
			}
			if b && slices.ContainsFunc(inf.Samples, func(p []compare.Point) bool { return p != nil }) {
				return nil, c.errAt(path+".independent", "independent = true multiplies Gaussian sets; a sample-based set is inferred on its own")
			}
			inf.Independent = b
		}
		out = append(out, inf)
	}
	return out, nil
}

func paramNames(f *model.Family) []string {
	var out []string
	for _, p := range f.Params {
		out = append(out, p.Name)
	}
	return out
}

// prior reads a parameter's prior: a number (fixed), {uniform = [lo, hi]}
// or {log_uniform = [lo, hi]}; absent, the family's default (fixed). The
// range must lie in the parameter's declared one.
func (c *parser) prior(path, name string, v any, d model.Param) (infer.Prior, error) {
	p := infer.Prior{Name: name, Kind: infer.Fixed}
	switch x := v.(type) {
	case nil:
		if math.IsNaN(d.Default) {
			return p, c.errAt(path, "%s has no default: give a value or a prior ({uniform = [lo, hi]} or {log_uniform = [lo, hi]})", name)
		}
		p.Value = d.Default
		return p, nil
	case map[string]any:
		if len(x) != 1 {
			return p, c.errAt(path, "a prior is one of {uniform = [lo, hi]} and {log_uniform = [lo, hi]}")
		}
		for kind, r := range x {
			switch kind {
			case "uniform":
				p.Kind = infer.Uniform
			case "log_uniform":
				p.Kind = infer.LogUniform
			default:
				return p, c.errAt(path+"."+kind, "unknown prior %q (uniform or log_uniform)", kind)
			}
			xs, _, err := numbers(r)
			if err != nil || len(xs) != 2 {
				return p, c.errAt(path+"."+kind, "want [lo, hi]")
			}
			p.Lo, p.Hi = xs[0], xs[1]
		}
		if err := p.Check(); err != nil {
			return p, c.errAt(path, "%v", err)
		}
		for _, e := range []float64{p.Lo, p.Hi} {
			if err := d.Check(e); err != nil {
				return p, c.errAt(path, "%s prior [%g, %g]: %v (%s allows %s)", name, p.Lo, p.Hi, err, name, d.Interval())
			}
		}
		return p, nil
	}
	val, _, err := number(v)
	if err != nil {
		return p, c.errAt(path, "%v", err)
	}
	if err := d.Check(val); err != nil {
		return p, c.errAt(path, "%s = %g: %v", name, val, err)
	}
	p.Value = val
	return p, nil
}

// InferenceSpecs are the study's inferences as nodes.InferSpec values, one
// per inference and constraint set, with their labels "<label> | <set>".
func (s *Study) InferenceSpecs() ([]string, []nodes.InferSpec) {
	var labels []string
	var out []nodes.InferSpec
	for _, inf := range s.Inferences {
		spec := func(g compare.Gaussian) nodes.InferSpec {
			return nodes.InferSpec{Family: inf.Family, Params: inf.Params, W: inf.W, TLoGeV: inf.TLoGeV, As: s.As,
				History: reheat.DefaultHistory(), Constraint: g, Forecasts: s.Forecasts, Tol: inf.Tol, NReh: inf.NReh, NStar: inf.NStar}
		}
		if inf.Independent {
			sp := spec(inf.Constraints[0])
			for _, g := range inf.Constraints[1:] {
				sp.Also = append(sp.Also, compare.Gaussian{Name: g.Name, MeanNs: g.MeanNs, SigmaNs: g.SigmaNs, MeanR: g.MeanR, SigmaR: g.SigmaR, Rho: g.Rho})
			}
			labels = append(labels, inf.Label+" | "+inf.SetNames()[0])
			out = append(out, sp)
			continue
		}
		for i, g := range inf.Constraints {
			labels = append(labels, inf.Label+" | "+g.Name)
			sp := spec(g)
			sp.Samples = inf.Samples[i]
			out = append(out, sp)
		}
	}
	return labels, out
}

// InferenceGraph is the graph of the study's inferences: one node per
// inference and constraint set, each a result.
func (s *Study) InferenceGraph() (*pipeline.Graph, error) {
	g := &pipeline.Graph{}
	labels, specs := s.InferenceSpecs()
	for i, sp := range specs {
		params, err := nodes.InferParams(sp)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", labels[i], err)
		}
		n, err := g.Add(nodes.Infer{}, params, labels[i])
		if err != nil {
			return nil, fmt.Errorf("%s: %w", labels[i], err)
		}
		g.MarkResult(labels[i], n)
	}
	return g, nil
}

// InferenceResult is an inference's result as the comparison of two runs
// reads it (stages/study/revision): labelled "<label> | <set>", with the
// node's summaries (ln_Z, and the median and 68%/95% interval ends of
// each quantity, the forecasts' probabilities) in Inference. values are
// the node's float outputs.
func InferenceResult(label, family, set string, values map[string]float64) Result {
	r := Result{Label: label + " | " + set, Model: family, Constraint: set, Params: map[string]float64{}, Inference: map[string]float64{}}
	for k, v := range values {
		if InferenceSummary(k) {
			r.Inference[k] = v
		}
	}
	return r
}

// InferenceSummary says whether an inference node's output is a summary
// a comparison reports (not an error estimate or a density).
func InferenceSummary(k string) bool {
	if k == "ln_Z" {
		return true
	}
	if strings.HasPrefix(k, "pdf") || strings.HasSuffix(k, "_err") {
		return false
	}
	if strings.HasPrefix(k, "P_detect_3sigma:") || strings.HasPrefix(k, "P_exclude_95:") {
		return true
	}
	for _, s := range []string{":median", ":lo68", ":hi68", ":lo95", ":hi95"} {
		if strings.HasSuffix(k, s) {
			return true
		}
	}
	return false
}

// InferenceResults are the results of the study's inference graph
// (InferenceGraph), from its result nodes' outputs in order (nil for a
// failed node: a result with an error).
func (s *Study) InferenceResults(outputs []pipeline.Values) []Result {
	var out []Result
	i := 0
	for _, inf := range s.Inferences {
		for _, set := range inf.SetNames() {
			vals := map[string]float64{}
			if i < len(outputs) && outputs[i] != nil {
				for k, v := range outputs[i] {
					if v.Kind == pipeline.KindFloat {
						vals[k] = v.Float
					}
				}
			}
			r := InferenceResult(inf.Label, inf.Family, set, vals)
			if i >= len(outputs) || outputs[i] == nil {
				r.Error = "the inference failed"
			}
			out = append(out, r)
			i++
		}
	}
	return out
}
