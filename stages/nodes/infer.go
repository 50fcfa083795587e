package nodes

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/infer"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// InferStage is the inference stage: one node is the whole posterior of
// one model family with its priors against one constraint set (an
// integral over many points of the model, taken inside the node by the
// deterministic cubature of stages/infer, so that the node's key covers
// every influence on it).
const InferStage = "infer"

// InferVersion is the inference stage's version (bump it when its
// numerics or outputs change).
const InferVersion = 2 // 2: densities for figures (pdf:NAME:x|y:NN, pdf2:NAME:x|y|z)

// Parameter prefixes of an inference node: a family parameter is fixed
// ("fixed:n"), uniform ("uniform_lo:alpha", "uniform_hi:alpha") or
// log-uniform ("log_lo:alpha", "log_hi:alpha"); w_reh is one of them too;
// each forecast gives its sigma(r) ("forecast:SO").
const (
	inferFixed     = "fixed:"
	inferUniformLo = "uniform_lo:"
	inferUniformHi = "uniform_hi:"
	inferLogLo     = "log_lo:"
	inferLogHi     = "log_hi:"
	inferForecast  = "forecast:"
	inferAnd       = "and_" // and_mean_n_s:NAME and the like: a further independent set
)

// andFields are the fields of a further independent constraint set.
var andFields = []string{"mean_n_s", "sigma_n_s", "mean_r", "sigma_r", "rho"}

// Infer is the inference stage.
type Infer struct{}

var inferSpec = pipeline.Spec{
	Name: InferStage, Version: InferVersion,
	Params: []pipeline.ParamSpec{
		{Name: keyFamily, Kind: pipeline.KindString},
		{Name: "constraint", Kind: pipeline.KindString},
		{Name: "citation", Kind: pipeline.KindString},
		// A Gaussian set's fields, or a sample-based set's samples.
		{Name: "mean_n_s", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true},
		{Name: "sigma_n_s", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true},
		{Name: "mean_r", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true},
		{Name: "sigma_r", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true},
		{Name: "rho", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone, Optional: true},
		{Name: "kind", Kind: pipeline.KindString, Optional: true},
		{Name: "samples", Kind: pipeline.KindString, Optional: true},
		{Name: "A_s", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
		{Name: "k_pivot", Kind: pipeline.KindFloat, Unit: pipeline.UnitPerMpc},
		{Name: "T_0", Kind: pipeline.KindFloat, Unit: pipeline.UnitKelvin},
		{Name: "g_s0", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
		{Name: "g_reh", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
		{Name: "g_s_reh", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
		{Name: "T_reh_min", Kind: pipeline.KindFloat, Unit: pipeline.UnitGeV},
		{Name: "tolerance", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
	},
	OpenParams: []string{inferFixed, inferUniformLo, inferUniformHi, inferLogLo, inferLogHi, inferForecast, inferAnd},
}

// Spec declares the stage.
func (Infer) Spec() pipeline.Spec { return inferSpec }

// InferSpec is what an inference node is made of.
type InferSpec struct {
	Family     string
	Params     []infer.Prior // the family's parameters
	W          infer.Prior
	TLoGeV     float64
	As         float64
	History    reheat.History
	Constraint compare.Gaussian
	// Samples, when not nil, make the set sample-based: its likelihood is
	// the kernel density estimate of these (n_s, r) samples (compare.KDE;
	// Constraint then gives only its name and citation).
	Samples []compare.Point
	// Also are further constraint sets the study declares independent of
	// Constraint: the likelihood is the product of all.
	Also      []compare.Gaussian
	Forecasts []compare.Forecast
	Tol       float64
	// NReh and NStar, when set, replace the T_reh prior (infer.Problem).
	NReh, NStar *infer.Prior
}

// InferParams encodes an inference as a node's parameters.
func InferParams(s InferSpec) (pipeline.Values, error) {
	f := func(x float64, unit string) pipeline.Value { return pipeline.Float(x, unit) }
	vs := GaussianParams(s.Constraint)
	delete(vs, "kind")
	if s.Samples != nil {
		vs = SamplesParams(s.Constraint.Name, s.Constraint.Citation, s.Samples)
	}
	vs[keyFamily] = pipeline.String(s.Family)
	vs["A_s"] = f(s.As, pipeline.UnitNone)
	putThermal(vs, s.History)
	vs["T_reh_min"] = f(s.TLoGeV, pipeline.UnitGeV)
	vs["tolerance"] = f(s.Tol, pipeline.UnitNone)
	extra := []infer.Prior{s.W}
	if s.NReh != nil {
		extra = append(extra, *s.NReh)
	}
	if s.NStar != nil {
		extra = append(extra, *s.NStar)
	}
	for _, p := range append(slices.Clone(s.Params), extra...) {
		if err := p.Check(); err != nil {
			return nil, err
		}
		switch p.Kind {
		case infer.Fixed:
			vs[inferFixed+p.Name] = f(p.Value, pipeline.UnitNone)
		case infer.Uniform:
			vs[inferUniformLo+p.Name], vs[inferUniformHi+p.Name] = f(p.Lo, pipeline.UnitNone), f(p.Hi, pipeline.UnitNone)
		case infer.LogUniform:
			vs[inferLogLo+p.Name], vs[inferLogHi+p.Name] = f(p.Lo, pipeline.UnitNone), f(p.Hi, pipeline.UnitNone)
		}
	}
	for _, g := range s.Also {
		if err := g.Check(); err != nil {
			return nil, err
		}
		if strings.ContainsAny(g.Name, " \"") || g.Name == "" {
			return nil, fmt.Errorf("constraint set %q: a name for a product holds no space or quote", g.Name)
		}
		for i, x := range []float64{g.MeanNs, g.SigmaNs, g.MeanR, g.SigmaR, g.Rho} {
			vs[inferAnd+andFields[i]+":"+g.Name] = f(x, pipeline.UnitNone)
		}
	}
	for _, fc := range s.Forecasts {
		if strings.ContainsAny(fc.Name, " \"") {
			return nil, fmt.Errorf("forecast %q: a name for inference holds no space or quote", fc.Name)
		}
		vs[inferForecast+fc.Name] = f(fc.SigmaR, pipeline.UnitNone)
	}
	return vs, nil
}

// inferFrom decodes an inference node's parameters.
func inferFrom(params pipeline.Values) (InferSpec, error) {
	var s InferSpec
	var err error
	if s.Family, err = params.Text(keyFamily); err != nil {
		return s, err
	}
	if k, err := params.Text("kind"); err == nil && k == KindSamples {
		text, _ := params.Text("samples")
		if s.Samples, err = compare.ParseSamples("inference samples", []byte(text)); err != nil {
			return s, err
		}
		s.Constraint.Name, _ = params.Text("constraint")
		s.Constraint.Citation, _ = params.Text("citation")
	} else {
		g, _ := GaussianFrom(params)
		s.Constraint = g
	}
	if s.History, err = thermalFrom(params, "inference"); err != nil {
		return s, err
	}
	v, err := need(params, "inference", "A_s", "T_reh_min", "tolerance")
	if err != nil {
		return s, err
	}
	s.As, s.TLoGeV, s.Tol = v[0], v[1], v[2]
	priors := map[string]*infer.Prior{}
	also := map[string]*compare.Gaussian{}
	get := func(name string) *infer.Prior {
		if p, ok := priors[name]; ok {
			return p
		}
		p := &infer.Prior{Name: name}
		priors[name] = p
		return p
	}
	for _, n := range params.Names() {
		x := params[n].Float
		switch {
		case strings.HasPrefix(n, inferFixed):
			p := get(strings.TrimPrefix(n, inferFixed))
			p.Kind, p.Value = infer.Fixed, x
		case strings.HasPrefix(n, inferUniformLo):
			p := get(strings.TrimPrefix(n, inferUniformLo))
			p.Kind, p.Lo = infer.Uniform, x
		case strings.HasPrefix(n, inferUniformHi):
			p := get(strings.TrimPrefix(n, inferUniformHi))
			p.Kind, p.Hi = infer.Uniform, x
		case strings.HasPrefix(n, inferLogLo):
			p := get(strings.TrimPrefix(n, inferLogLo))
			p.Kind, p.Lo = infer.LogUniform, x
		case strings.HasPrefix(n, inferLogHi):
			p := get(strings.TrimPrefix(n, inferLogHi))
			p.Kind, p.Hi = infer.LogUniform, x
		case strings.HasPrefix(n, inferForecast):
			s.Forecasts = append(s.Forecasts, compare.Forecast{Name: strings.TrimPrefix(n, inferForecast), SigmaR: x})
		case strings.HasPrefix(n, inferAnd):
			field, name, ok := strings.Cut(strings.TrimPrefix(n, inferAnd), ":")
			i := slices.Index(andFields, field)
			if !ok || i < 0 {
				return s, fmt.Errorf("inference: unknown parameter %q", n)
			}
			g := also[name]
			if g == nil {
				g = &compare.Gaussian{Name: name}
				also[name] = g
			}
			*[]*float64{&g.MeanNs, &g.SigmaNs, &g.MeanR, &g.SigmaR, &g.Rho}[i] = x
		}
	}
	alsoNames := make([]string, 0, len(also))
	for n := range also {
		alsoNames = append(alsoNames, n)
	}
	slices.Sort(alsoNames)
	for _, n := range alsoNames {
		s.Also = append(s.Also, *also[n])
	}
	w, ok := priors["w_reh"]
	if !ok {
		return s, fmt.Errorf("inference: no prior for w_reh")
	}
	s.W = *w
	delete(priors, "w_reh")
	if p, ok := priors["N_reh"]; ok {
		s.NReh = p
		delete(priors, "N_reh")
	}
	if p, ok := priors["N_star"]; ok {
		s.NStar = p
		delete(priors, "N_star")
	}
	names := make([]string, 0, len(priors))
	for n := range priors {
		names = append(names, n)
	}
	slices.Sort(names)
	for _, n := range names {
		s.Params = append(s.Params, *priors[n])
	}
	return s, nil
}

// InferQuantities are the quantities an inference node summarises, after
// the free parameters (the reheating ones only when they vary).
var InferQuantities = []string{"N_star", "log10_T_reh_GeV", "N_reh", "n_s", "r"}

// Run integrates the posterior and records its summaries.
// A long inference reports its evaluations to the context's progress
// starter (pipeline.WithProgress) and stops when the context is done.
func (Infer) Run(ctx context.Context, params pipeline.Values, _ []pipeline.Values) (pipeline.Values, error) {
	s, err := inferFrom(params)
	if err != nil {
		return nil, err
	}
	var like infer.Likelihood = s.Constraint
	if s.Samples != nil {
		kde, err := kdeFor(s.Constraint.Name, s.Constraint.Citation, params["samples"].Str)
		if err != nil {
			return nil, err
		}
		like = kde
	}
	if len(s.Also) > 0 {
		p := infer.Product{s.Constraint}
		for _, g := range s.Also {
			p = append(p, g)
		}
		like = p
	}
	prob := infer.Problem{Family: s.Family, Params: s.Params, W: s.W, TLoGeV: s.TLoGeV, As: s.As, History: s.History, Like: like, NReh: s.NReh, NStar: s.NStar}
	f, d, err := prob.Integrand()
	if err != nil {
		return nil, err
	}
	report, end := pipeline.Progress(ctx)
	defer end()
	set := infer.Settings{Tol: s.Tol, Cancel: ctx.Err}
	if report != nil {
		set.Progress = func(evals int) { report(int64(evals), summaryBudget) }
	}
	res, err := integrateForSummaries(f, d, set)
	if err != nil {
		return nil, err
	}
	out := pipeline.Values{
		"ln_Z":        pipeline.Float(res.LnZ, pipeline.UnitNone),
		"ln_Z_err":    pipeline.Float(res.LnZErr, pipeline.UnitNone),
		"evaluations": pipeline.Float(float64(res.Evals), pipeline.UnitNone),
		"constraint":  pipeline.String(s.Constraint.Name),
		keyFamily:     pipeline.String(s.Family),
	}
	// The quantities: each free parameter (by its interpolated marginal),
	// then the derived ones (by the weighted nodes).
	var free []infer.Prior
	for _, p := range s.Params {
		if p.Kind != infer.Fixed {
			free = append(free, p)
		}
	}
	qs := []float64{0.5, 0.15865, 0.84135, 0.02275, 0.97725}
	put := func(name string, es []infer.Estimate) {
		for i, suffix := range []string{"median", "lo68", "hi68", "lo95", "hi95"} {
			out[name+":"+suffix] = pipeline.Float(es[i].Value, pipeline.UnitNone)
			out[name+":"+suffix+"_err"] = pipeline.Float(es[i].Err, pipeline.UnitNone)
		}
	}
	for k, p := range free {
		es, err := res.MarginalQuantiles(k, qs...)
		if err != nil {
			return nil, err
		}
		for i := range es {
			v := p.At(es[i].Value)
			// The error through the prior's map, by its local slope.
			h := 1e-6
			slope := (p.At(math.Min(1, es[i].Value+h)) - p.At(math.Max(0, es[i].Value-h))) / (math.Min(1, es[i].Value+h) - math.Max(0, es[i].Value-h))
			es[i] = infer.Estimate{Value: v, Err: math.Abs(slope) * es[i].Err}
		}
		put("param:"+p.Name, es)
		if err := putProfile(out, "param:"+p.Name, res, func(i int) float64 { return res.Derived[i][k] }); err != nil {
			return nil, err
		}
	}
	base := len(free)
	derived := infer.Derived // w_reh, log10 T, N_reh, N*, n_s, r
	// Each derived quantity's 0.1% and 99.9% quantiles, taken with the
	// others (one sort), span its density below.
	spans := make([][2]float64, len(derived))
	for j, name := range derived {
		if (name == "w_reh" && (s.W.Kind == infer.Fixed || s.NStar != nil)) || !finiteAt(res, base+j) {
			continue
		}
		g := func(i int) float64 { return res.Derived[i][base+j] }
		q := res.Quantiles(g, append(slices.Clone(qs), 0.001, 0.999)...)
		put(name, q[:len(qs)])
		spans[j] = [2]float64{q[len(qs)].Value, q[len(qs)+1].Value}
		if err := putProfile(out, name, res, g); err != nil {
			return nil, err
		}
	}
	// Densities for figures, on pdfPoints points: each free parameter's
	// marginal (per unit of the parameter, or of ln of it for a
	// log-uniform prior), and smooth densities of the derived quantities
	// between their 0.1% and 99.9% quantiles (r as log10 r).
	for k, p := range free {
		us := grid(0, 1, pdfPoints)
		ys, err := res.MarginalDensity(k, us)
		if err != nil {
			return nil, err
		}
		scale := p.Hi - p.Lo
		if p.Kind == infer.LogUniform {
			scale = math.Log(p.Hi / p.Lo)
		}
		xs := make([]float64, len(us))
		for j, u := range us {
			xs[j], ys[j] = p.At(u), ys[j]/scale
		}
		putPDF(out, "param:"+p.Name, xs, ys)
	}
	for j, name := range derived {
		if (name == "w_reh" && (s.W.Kind == infer.Fixed || s.NStar != nil)) || !finiteAt(res, base+j) {
			continue
		}
		g := func(i int) float64 { return res.Derived[i][base+j] }
		lo, hi := spans[j][0], spans[j][1]
		if name == "r" {
			// log10 r's own quantiles (interpolated between nodes in
			// log10 r, not in r).
			name = "log10_r"
			g = func(i int) float64 { return math.Log10(res.Derived[i][base+j]) }
			q := res.Quantiles(g, 0.001, 0.999)
			lo, hi = q[0].Value, q[1].Value
		}
		if !(hi > lo) {
			continue
		}
		// A tenth of the range more on each side, for the kernels' tails.
		pad := float64(0.1 * (hi - lo))
		xs := grid(lo-pad, hi+pad, pdfPoints)
		putPDF(out, name, xs, res.Density(g, xs))
	}
	// Joint densities with log10 T_reh, on pdf2Points x pdf2Points: each
	// free parameter's (on its prior coordinate, recorded as its values)
	// and w_reh's when it is free.
	tIndex := base + slices.Index(derived, "log10_T_reh_GeV")
	if tlo, thi := spans[tIndex-base][0], spans[tIndex-base][1]; finiteAt(res, tIndex) && thi > tlo {
		pad := float64(0.1 * (thi - tlo))
		ys := grid(tlo-pad, thi+pad, pdf2Points)
		us := grid(0, 1, pdf2Points)
		coords := free
		if s.W.Kind != infer.Fixed && s.NStar == nil {
			coords = append(slices.Clone(free), s.W)
		}
		for k, p := range coords {
			z, err := res.Density2(func(i int) float64 { return res.U[i*d+k] }, func(i int) float64 { return res.Derived[i][tIndex] }, us, ys)
			if err != nil {
				return nil, err
			}
			xs := make([]float64, len(us))
			for i, u := range us {
				xs[i] = p.At(u)
			}
			name := "param:" + p.Name
			if p.Name == "w_reh" {
				name = "w_reh"
			}
			putPDF2(out, name, xs, ys, z)
		}
	}
	rIndex := base + slices.Index(derived, "r")
	for _, fc := range s.Forecasts {
		det, err := res.Probability(func(i int) float64 {
			p, _ := infer.DetectionProbability(res.Derived[i][rIndex], fc.SigmaR, 3)
			return p
		})
		if err != nil {
			return nil, err
		}
		exc, err := res.Probability(func(i int) float64 {
			p, _ := infer.ExclusionProbability(res.Derived[i][rIndex], fc.SigmaR, 0.95)
			return p
		})
		if err != nil {
			return nil, err
		}
		out["P_detect_3sigma:"+fc.Name] = pipeline.Float(det.Value, pipeline.UnitNone)
		out["P_detect_3sigma:"+fc.Name+"_err"] = pipeline.Float(det.Err, pipeline.UnitNone)
		out["P_exclude_95:"+fc.Name] = pipeline.Float(exc.Value, pipeline.UnitNone)
		out["P_exclude_95:"+fc.Name+"_err"] = pipeline.Float(exc.Err, pipeline.UnitNone)
	}
	return out, nil
}

// integrateForSummaries integrates to ln Z within tol, then refines the
// starting partition (2, 4, 8... panels a dimension) until every derived
// quantity's 68% and 95% interval ends have error estimates below a
// fiftieth of its 68% width, so that the intervals, not only ln Z, are as
// good as stated (deterministically: the same partitions every time).
func integrateForSummaries(f infer.Integrand, d int, set infer.Settings) (*infer.Result, error) {
	var res *infer.Result
	for panels := 2; ; panels *= 2 {
		set.Panels = panels
		r, err := infer.Integrate(f, d, &set)
		if err != nil {
			if res != nil && (set.Cancel == nil || set.Cancel() == nil) {
				return res, nil // the finer partition is beyond the budget: keep the last
			}
			return nil, err
		}
		res = r
		worst := 0.0
		for j := range infer.Derived {
			g := func(i int) float64 { return res.Derived[i][len(res.Derived[i])-len(infer.Derived)+j] }
			q := res.Quantiles(g, 0.15865, 0.84135, 0.02275, 0.97725)
			width := q[1].Value - q[0].Value
			if !(width > 0) {
				continue
			}
			for _, e := range q {
				worst = math.Max(worst, e.Err/width)
			}
		}
		if worst <= 0.02 || res.Evals*(1<<d) > summaryBudget {
			return res, nil
		}
	}
}

// pdfPoints is the number of points of each recorded density.
const pdfPoints = 41

// putPDF records a density as pdf:NAME:x:NN and pdf:NAME:y:NN.
func putPDF(out pipeline.Values, name string, xs, ys []float64) {
	for i := range xs {
		out[fmt.Sprintf("pdf:%s:x:%02d", name, i)] = pipeline.Float(xs[i], pipeline.UnitNone)
		out[fmt.Sprintf("pdf:%s:y:%02d", name, i)] = pipeline.Float(ys[i], pipeline.UnitNone)
	}
}

// pdf2Points is the number of points along each axis of a recorded joint
// density.
const pdf2Points = 31

// grid is n evenly spaced points from lo to hi.
func grid(lo, hi float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = lo + float64(i)*(hi-lo)/float64(n-1)
	}
	return out
}

// putPDF2 records a joint density with log10 T_reh as pdf2:NAME:x:NN,
// pdf2:NAME:y:NN and pdf2:NAME:z:NN:MM.
func putPDF2(out pipeline.Values, name string, xs, ys []float64, z [][]float64) {
	for i := range xs {
		out[fmt.Sprintf("pdf2:%s:x:%02d", name, i)] = pipeline.Float(xs[i], pipeline.UnitNone)
	}
	for j := range ys {
		out[fmt.Sprintf("pdf2:%s:y:%02d", name, j)] = pipeline.Float(ys[j], pipeline.UnitNone)
	}
	for i := range z {
		for j := range z[i] {
			out[fmt.Sprintf("pdf2:%s:z:%02d:%02d", name, i, j)] = pipeline.Float(z[i][j], pipeline.UnitNone)
		}
	}
}

// PDF reads a recorded density back (pdf:NAME:x:NN, pdf:NAME:y:NN).
func PDF(vs pipeline.Values, name string) (xs, ys []float64, ok bool) {
	for i := 0; ; i++ {
		x, okx := vs[fmt.Sprintf("pdf:%s:x:%02d", name, i)]
		y, oky := vs[fmt.Sprintf("pdf:%s:y:%02d", name, i)]
		if !okx || !oky {
			return xs, ys, len(xs) > 1
		}
		xs, ys = append(xs, x.Float), append(ys, y.Float)
	}
}

// finiteAt reports whether the derived quantity j is a number where the
// posterior has mass (log10 T_reh is not, when N* is given directly).
func finiteAt(res *infer.Result, j int) bool {
	for i, l := range res.LnF {
		if !math.IsInf(l, -1) {
			v := res.Derived[i][j]
			return !math.IsNaN(v) && !math.IsInf(v, 0)
		}
	}
	return false
}

// summaryBudget bounds the evaluations integrateForSummaries spends on
// refining the intervals.
const summaryBudget = 2_000_000

// putProfile records the 68% and 95% profile-likelihood intervals of g
// (Delta chi^2 = 1 and 3.841, one parameter).
func putProfile(out pipeline.Values, name string, res *infer.Result, g func(int) float64) error {
	for _, lv := range []struct {
		suffix string
		delta  float64
	}{{"68", 1}, {"95", 3.841}} {
		iv, err := res.Profile(g, lv.delta)
		if err != nil {
			return err
		}
		out[name+":profile_lo"+lv.suffix] = pipeline.Float(iv.Lo.Value, pipeline.UnitNone)
		out[name+":profile_hi"+lv.suffix] = pipeline.Float(iv.Hi.Value, pipeline.UnitNone)
	}
	return nil
}
