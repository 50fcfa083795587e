package revision

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/study"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// MaxAttributed bounds the number of assumptions attributed one by one:
// the Shapley decomposition evaluates 2^k intermediate configurations for
// k assumptions. Beyond it the differing fields are grouped, first by
// table entry (the fields of model[2] or of reheating[0] switch
// together), then by section (model, reheating, slow_roll, ...), and each
// group is attributed as one assumption; Report.Grouping says which.
const MaxAttributed = 8

// Kinds of assumption.
const (
	KindConfig         = "config"
	KindStageVersion   = "stage-version"
	KindToolVersion    = "tool-version"
	KindConstraintData = "constraint-data"
)

// Groupings of configuration fields into attributed assumptions.
const (
	ByField   = "field"
	ByEntry   = "entry"
	BySection = "section"
)

// Run is what the comparison needs of one recorded run.
type Run struct {
	ID          pipeline.RunID
	ConfigText  string
	ToolVersion string
	// Nodes are the nodes the run linked; their stages, versions and
	// parameters give the stage versions and constraint data it used.
	Nodes []Node
	// Results are in recorded order: Results[i] is RUN#(i+1).
	Results []study.Result
}

// Node is what the comparison reads of a node a run linked.
type Node struct {
	Stage   string
	Version int
	Params  pipeline.Values
}

// Assumption is one thing that differs between the runs.
type Assumption struct {
	Kind string `json:"kind"`
	// Name is short: the field's path, the group's entry or section, or
	// the stage; it is what a main cause names.
	Name       string   `json:"name"`
	What       string   `json:"what"`
	Attributed bool     `json:"attributed"`
	Fields     []string `json:"fields,omitempty"` // the configuration paths it switches
	diffs      []Difference
}

// Quantities compared for each paired result: a prediction's, and a
// reheating band's span (its least and greatest N*, n_s and r).
var Quantities = []string{"N_star", "n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "H_star_GeV", "T_reh_GeV", "delta_chi2", "n_sigma", "detection_sigma",
	"N_star_min", "N_star_max", "n_s_min", "n_s_max", "r_min", "r_max"}

// Change is the change of one quantity of one paired result.
type Change struct {
	A     float64 `json:"a"`
	B     float64 `json:"b"`
	Total float64 `json:"total"`
	// Contributions holds one entry per attributed assumption, in the
	// order of Report.Attributed.
	Contributions []float64 `json:"contributions"`
	// Remainder is Total minus the contributions: the effect of what could
	// not be re-evaluated, plus rounding.
	Remainder float64 `json:"remainder"`
	// MainCause names the assumption with the largest share of Total (the
	// non-re-evaluable ones together when the remainder is largest); it
	// is empty when nothing changed, and "not separated: ..." when the
	// pair could not be attributed.
	MainCause string `json:"main_cause,omitempty"`
	// Share is the main cause's part of Total (1 = all of it); 0 when
	// MainCause is empty or not separated.
	Share float64 `json:"share,omitempty"`
}

// Pair is a result of run A and its counterpart in run B.
type Pair struct {
	RowA    int               `json:"row_a"` // the N of A#N
	RowB    int               `json:"row_b"`
	LabelA  string            `json:"label_a"`
	LabelB  string            `json:"label_b"`
	Changes map[string]Change `json:"changes"`
	// Unseparated names the intermediate configurations that failed for
	// this pair or do not contain it; when set, Changes carry the total
	// only (Contributions zero, Remainder the total).
	Unseparated []string `json:"not_separated,omitempty"`
}

// Changed reports whether any quantity of the pair differs.
func (p Pair) Changed() bool {
	for _, c := range p.Changes {
		if c.Total != 0 {
			return true
		}
	}
	return false
}

// Unpaired is a result present in one run only.
type Unpaired struct {
	Row   int    `json:"row"`
	Label string `json:"label"`
}

// Report is the comparison of two runs.
type Report struct {
	A           pipeline.RunID `json:"run_a"`
	B           pipeline.RunID `json:"run_b"`
	Assumptions []Assumption   `json:"assumptions"`
	// Grouping is how configuration fields became attributed assumptions:
	// ByField, or ByEntry or BySection beyond MaxAttributed fields.
	Grouping  string     `json:"grouping"`
	Pairs     []Pair     `json:"pairs"`
	Removed   []Unpaired `json:"removed"` // in A only
	Added     []Unpaired `json:"added"`   // in B only
	Evaluated int        `json:"configurations_evaluated"`
}

// Attributed returns the attributed assumptions, in the order of each
// Change's Contributions.
func (r *Report) Attributed() []Assumption {
	var out []Assumption
	for _, a := range r.Assumptions {
		if a.Attributed {
			out = append(out, a)
		}
	}
	return out
}

func quantity(r study.Result, q string) (float64, bool) {
	if r.Error != "" {
		return 0, false
	}
	if r.Inference != nil {
		x, ok := r.Inference[q]
		return x, ok
	}
	if b := r.Band; b != nil {
		switch q {
		case "N_star_min", "N_star_max":
			return b.NStar[bandEnd(q)], true
		case "n_s_min", "n_s_max":
			return b.Ns[bandEnd(q)], true
		case "r_min", "r_max":
			return b.R[bandEnd(q)], true
		}
		return 0, false
	}
	switch q {
	case "N_star":
		return r.NStar, true
	case "n_s":
		return r.Ns, true
	case "r":
		return r.R, true
	case "alpha_s":
		return r.AlphaS, true
	case "n_t":
		return r.Nt, true
	case "energy_scale_GeV":
		return opt(r.EnergyScaleGeV)
	case "H_star_GeV":
		return opt(r.HStarGeV)
	case "T_reh_GeV":
		return opt(r.TRehGeV)
	case "detection_sigma":
		return opt(r.DetectionSigma)
	case "delta_chi2":
		return opt(r.DeltaChi2)
	case "n_sigma":
		return opt(r.NSigma)
	}
	return 0, false
}

// quantitiesOf are the quantities compared for a pair: Quantities for
// predictions, the summaries both inferences recorded for inferences.
func quantitiesOf(a, b study.Result) []string {
	if a.Inference == nil && b.Inference == nil {
		return Quantities
	}
	var out []string
	for k := range a.Inference {
		if _, ok := b.Inference[k]; ok {
			out = append(out, k)
		}
	}
	sort.Strings(out)
	return out
}

// bandEnd is 0 for a band's least value, 1 for its greatest.
func bandEnd(q string) int {
	if strings.HasSuffix(q, "_max") {
		return 1
	}
	return 0
}

func opt(p *float64) (float64, bool) {
	if p == nil {
		return 0, false
	}
	return *p, true
}

// Differing lists what differs between the runs, the configuration fields
// grouped as the attribution will take them (see MaxAttributed).
func Differing(a, b Run) ([]Assumption, string, error) {
	ta, err := parseTree(a.ConfigText)
	if err != nil {
		return nil, "", fmt.Errorf("run %s configuration: %w", a.ID, err)
	}
	tb, err := parseTree(b.ConfigText)
	if err != nil {
		return nil, "", fmt.Errorf("run %s configuration: %w", b.ID, err)
	}
	out, grouping, err := group(Differences(ta, tb))
	if err != nil {
		return nil, "", err
	}
	if a.ToolVersion != b.ToolVersion {
		out = append(out, Assumption{Kind: KindToolVersion, Name: "tool version", What: fmt.Sprintf("inflatrace %s -> %s", a.ToolVersion, b.ToolVersion)})
	}
	va, vb := stageVersions(a), stageVersions(b)
	for _, st := range sortedKeys(va, vb) {
		if va[st] != "" && vb[st] != "" && va[st] != vb[st] {
			out = append(out, Assumption{Kind: KindStageVersion, Name: "stage " + st + " version", What: fmt.Sprintf("stage %s v%s -> v%s", st, va[st], vb[st])})
		}
	}
	ca, cb := constraintData(a), constraintData(b)
	for _, name := range sortedKeys(ca, cb) {
		if ca[name] != "" && cb[name] != "" && ca[name] != cb[name] {
			out = append(out, Assumption{Kind: KindConstraintData, Name: "constraint data " + name, What: fmt.Sprintf("constraint set %s: %s -> %s", name, ca[name], cb[name])})
		}
	}
	return out, grouping, nil
}

// group makes the attributed assumptions of the differing fields: one per
// field, or, beyond MaxAttributed, one per table entry, then one per
// section.
func group(ds []Difference) ([]Assumption, string, error) {
	levels := []struct {
		name string
		key  func(path string) string
	}{
		{ByField, func(p string) string { return p }},
		{ByEntry, func(p string) string { s, _, _ := strings.Cut(p, "."); return s }},
		{BySection, func(p string) string {
			if i := strings.IndexAny(p, ".["); i >= 0 {
				return p[:i]
			}
			return p
		}},
	}
	for _, lv := range levels {
		var out []Assumption
		at := map[string]int{}
		for _, d := range ds {
			k := lv.key(d.Path)
			i, ok := at[k]
			if !ok {
				i = len(out)
				at[k] = i
				out = append(out, Assumption{Kind: KindConfig, Name: k, Attributed: true})
			}
			out[i].diffs = append(out[i].diffs, d)
			out[i].Fields = append(out[i].Fields, d.Path)
		}
		if len(out) > MaxAttributed {
			continue
		}
		for i := range out {
			var ws []string
			for _, d := range out[i].diffs {
				ws = append(ws, d.String())
			}
			out[i].What = strings.Join(ws, "; ")
		}
		return out, lv.name, nil
	}
	return nil, "", fmt.Errorf("%d configuration fields differ, in more than %d sections; attribution evaluates 2^k configurations and is limited to %d assumptions: compare through an intermediate run (run --from)", len(ds), MaxAttributed, MaxAttributed)
}

func stageVersions(r Run) map[string]string {
	m := map[string]string{}
	for _, n := range r.Nodes {
		v := fmt.Sprint(n.Version)
		if old, ok := m[n.Stage]; ok && old != v && !strings.Contains(old, v) {
			v = old + "," + v
		}
		m[n.Stage] = v
	}
	return m
}

// constraintData is each constraint set's numbers as the run's compare
// nodes recorded them.
func constraintData(r Run) map[string]string {
	m := map[string]string{}
	for _, n := range r.Nodes {
		if n.Stage != nodes.CompareStage {
			continue
		}
		name, _ := n.Params.Text("constraint")
		var parts []string
		for _, p := range []string{"mean_n_s", "sigma_n_s", "mean_r", "sigma_r", "rho"} {
			x, _ := n.Params.Num(p)
			parts = append(parts, p+"="+pipeline.FormatFloat(x))
		}
		m[name] = strings.Join(parts, " ")
	}
	return m
}

func sortedKeys(a, b map[string]string) []string {
	set := map[string]bool{}
	for k := range a {
		set[k] = true
	}
	for k := range b {
		set[k] = true
	}
	var out []string
	for k := range set {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// Evaluate runs a configuration through the engine.
type Evaluate func(ctx context.Context, configText string) ([]study.Result, error)

// Compare builds the report. eval evaluates an intermediate configuration
// (through the cached DAG); it is called for each of the 2^k subsets of
// the k attributed assumptions, including run A's and run B's own
// configurations.
func Compare(ctx context.Context, a, b Run, eval Evaluate) (*Report, error) {
	as, grouping, err := Differing(a, b)
	if err != nil {
		return nil, err
	}
	rep := &Report{A: a.ID, B: b.ID, Assumptions: as, Grouping: grouping}
	attributed := rep.Attributed()
	var others []Assumption
	var all []Difference
	for _, x := range as {
		if !x.Attributed {
			others = append(others, x)
		}
		all = append(all, x.diffs...)
	}
	// Results pair by identity (model, parameters, reheating, method,
	// end, constraint), never by position; see pairResults.
	pairs, onlyA, onlyB := pairResults(a.Results, b.Results, diffSections(all))
	for _, i := range onlyA {
		rep.Removed = append(rep.Removed, Unpaired{i + 1, a.Results[i].Label})
	}
	for _, j := range onlyB {
		rep.Added = append(rep.Added, Unpaired{j + 1, b.Results[j].Label})
	}
	ta, err := parseTree(a.ConfigText)
	if err != nil {
		return nil, err
	}
	// values[S][pair][quantity] for every subset S of the attributed
	// assumptions; a nil map where configuration S failed or lacks the pair.
	n := len(attributed)
	values := make([][]map[string]float64, 1<<n)
	missing := make([][]string, len(pairs)) // per pair: the subsets that could not be evaluated for it
	for mask := 0; mask < 1<<n; mask++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		var sub []Difference
		var names []string
		for i := 0; i < n; i++ {
			if mask&(1<<i) != 0 {
				sub = append(sub, attributed[i].diffs...)
				names = append(names, attributed[i].Name)
			}
		}
		values[mask] = make([]map[string]float64, len(pairs))
		var idx map[int]int // A result index -> index in res
		tree, err := apply(ta, sub)
		var res []study.Result
		if err == nil {
			var text string
			if text, err = render(tree); err == nil {
				res, err = eval(ctx, text)
			}
		}
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		if err == nil {
			// Configuration S is paired with A as B is, over the
			// sections S changes.
			sp, _, _ := pairResults(a.Results, res, diffSections(sub))
			idx = map[int]int{}
			for _, pr := range sp {
				idx[pr.i] = pr.j
			}
		}
		rep.Evaluated++
		for p, pr := range pairs {
			ri, ok := idx[pr.i]
			if !ok || ri >= len(res) || res[ri].Error != "" {
				missing[p] = append(missing[p], describeSubset(names))
				continue
			}
			m := map[string]float64{}
			for _, q := range quantitiesOf(a.Results[pr.i], b.Results[pr.j]) {
				if x, ok := quantity(res[ri], q); ok {
					m[q] = x
				}
			}
			values[mask][p] = m
		}
	}
	weights := shapleyWeights(n)
	for p, pr := range pairs {
		ra, rb := a.Results[pr.i], b.Results[pr.j]
		pair := Pair{RowA: pr.i + 1, RowB: pr.j + 1, LabelA: ra.Label, LabelB: rb.Label, Changes: map[string]Change{}, Unseparated: missing[p]}
		for _, q := range quantitiesOf(ra, rb) {
			xa, okA := quantity(ra, q)
			xb, okB := quantity(rb, q)
			if !okA || !okB {
				continue
			}
			c := Change{A: xa, B: xb, Total: xb - xa, Contributions: make([]float64, n)}
			complete := len(missing[p]) == 0
			for mask := range values {
				if _, ok := values[mask][p][q]; !ok {
					complete = false
				}
			}
			sum := 0.0
			if complete {
				for i := 0; i < n; i++ {
					for mask := 0; mask < 1<<n; mask++ {
						if mask&(1<<i) != 0 {
							continue
						}
						c.Contributions[i] += float64(weights[popcount(mask)] * (values[mask|1<<i][p][q] - values[mask][p][q]))
					}
					sum += c.Contributions[i]
				}
			}
			c.Remainder = c.Total - sum
			c.MainCause, c.Share = mainCause(c, attributed, others, complete)
			pair.Changes[q] = c
		}
		rep.Pairs = append(rep.Pairs, pair)
	}
	return rep, nil
}

// mainCause names the assumption that moved c the most, with its share
// of the total.
func mainCause(c Change, attributed, others []Assumption, separated bool) (string, float64) {
	if c.Total == 0 {
		return "", 0
	}
	names := func(as []Assumption) string {
		var ns []string
		for _, a := range as {
			ns = append(ns, a.Name)
		}
		return strings.Join(ns, " + ")
	}
	if !separated {
		if len(attributed) == 1 && len(others) == 0 {
			return attributed[0].Name, 1
		}
		return "not separated: " + names(append(append([]Assumption(nil), attributed...), others...)), 0
	}
	best := -1
	for i, x := range c.Contributions {
		if best < 0 || math.Abs(x) > math.Abs(c.Contributions[best]) {
			best = i
		}
	}
	if best < 0 || math.Abs(c.Remainder) > math.Abs(c.Contributions[best]) {
		if len(others) == 0 {
			return "remainder (rounding)", c.Remainder / c.Total
		}
		return names(others), c.Remainder / c.Total
	}
	return attributed[best].Name, c.Contributions[best] / c.Total
}

// shapleyWeights returns w[s] = s! (n - s - 1)! / n! for coalition size s.
func shapleyWeights(n int) []float64 {
	w := make([]float64, n)
	for s := 0; s < n; s++ {
		w[s] = detmath.Exp(lgammaInt(s+1) + lgammaInt(n-s) - lgammaInt(n+1))
	}
	return w
}

func lgammaInt(k int) float64 { v, _ := detmath.Lgamma(float64(k)); return v }

func popcount(x int) int {
	n := 0
	for ; x != 0; x &= x - 1 {
		n++
	}
	return n
}

// describeSubset names an intermediate configuration by the assumptions
// switched to run B's value.
func describeSubset(names []string) string {
	if len(names) == 0 {
		return "(run A's)"
	}
	return "{" + strings.Join(names, ", ") + "}"
}

// Finder finds recorded nodes by key: the read half of a
// pipeline.Recorder (a ledger).
type Finder interface {
	Lookup(ctx context.Context, k pipeline.KeyID) (pipeline.NodeRecord, bool, error)
}

// ReadThrough is a Recorder that finds nodes in a store (and in what it
// computed itself) but writes nothing to the store: intermediate
// configurations are evaluated through the cached DAG without being
// recorded as runs.
type ReadThrough struct {
	L     Finder
	mu    sync.Mutex
	extra map[pipeline.KeyID]pipeline.NodeRecord
}

// BeginRun implements pipeline.Recorder; nothing is written.
func (r *ReadThrough) BeginRun(context.Context, pipeline.RunInfo) error { return nil }

// Lookup implements pipeline.Recorder. A node found in the store is kept
// in memory too: the 2^k intermediate configurations share most of their
// nodes, and each is read from the store once.
func (r *ReadThrough) Lookup(ctx context.Context, k pipeline.KeyID) (pipeline.NodeRecord, bool, error) {
	r.mu.Lock()
	n, ok := r.extra[k]
	r.mu.Unlock()
	if ok {
		return n, true, nil
	}
	n, ok, err := r.L.Lookup(ctx, k)
	if err == nil && ok {
		r.keep(n)
	}
	return n, ok, err
}

func (r *ReadThrough) keep(n pipeline.NodeRecord) {
	r.mu.Lock()
	if r.extra == nil {
		r.extra = map[pipeline.KeyID]pipeline.NodeRecord{}
	}
	r.extra[n.Key] = n
	r.mu.Unlock()
}

// RecordNode implements pipeline.Recorder; computed nodes are kept in memory.
func (r *ReadThrough) RecordNode(_ context.Context, _ pipeline.RunID, n pipeline.NodeRecord, a pipeline.Action) error {
	if a == pipeline.Computed {
		r.keep(n)
	}
	return nil
}

// RecordResults implements pipeline.Recorder; nothing is written.
func (r *ReadThrough) RecordResults(context.Context, pipeline.RunID, []pipeline.ResultRef) error {
	return nil
}

// FinishRun implements pipeline.Recorder; nothing is written.
func (r *ReadThrough) FinishRun(context.Context, pipeline.RunID, pipeline.RunStatus, time.Time, string) error {
	return nil
}

// Evaluator returns an Evaluate that parses a configuration (relative
// constraint files resolved against dir), expands it and executes it
// through rec.
func Evaluator(rec pipeline.Recorder, dir, tool string, jobs int, now func() time.Time) Evaluate {
	return func(ctx context.Context, text string) ([]study.Result, error) {
		s, err := study.Parse(filepath.Join(dir, "(intermediate)"), []byte(text), dir)
		if err != nil {
			return nil, err
		}
		inference := s.NumModels() == 0 && len(s.Inferences) > 0
		var g *pipeline.Graph
		if inference {
			g, err = s.InferenceGraph()
		} else {
			g, err = s.Graph()
		}
		if err != nil {
			return nil, err
		}
		rep, err := pipeline.Execute(ctx, rec, pipeline.RunInfo{ID: "intermediate"}, g, pipeline.Options{Jobs: jobs, Tool: tool, Now: now})
		if err != nil {
			return nil, err
		}
		if rep.Failed > 0 {
			return nil, errors.New("some nodes failed")
		}
		if inference {
			outs := make([]pipeline.Values, len(g.Results))
			for i, r := range g.Results {
				outs[i] = rep.Outcomes[r.Node].Outputs
			}
			return s.InferenceResults(outs), nil
		}
		return study.Results(g, rep), nil
	}
}

// identity is what a result is, across runs: its model (family, or the
// written potential and kinetic term), parameter values, reheating history
// (as its label writes it), method, end condition and constraint. Each part
// is keyed by the configuration section it comes from.
func identity(r study.Result) map[string]string {
	if r.Inference != nil {
		// An inference is its [[inference]] entry (its label) against a
		// set; its priors are what a revision changes.
		label, _, _ := strings.Cut(r.Label, " | ")
		return map[string]string{"model": "inference|" + label, "reheating": "", "slow_roll": "", "constraint": r.Constraint}
	}
	names := make([]string, 0, len(r.Params))
	for k := range r.Params {
		names = append(names, k)
	}
	sort.Strings(names)
	var ps []string
	for _, k := range names {
		ps = append(ps, fmt.Sprintf("%s=%v", k, r.Params[k]))
	}
	parts := strings.Split(r.Label, " | ")
	reh := r.Reheating
	if len(parts) >= 2 {
		reh += " " + parts[1]
	}
	return map[string]string{
		"model":      r.Model + "|" + r.Potential + "|" + r.Kinetic + "|" + strings.Join(ps, ","),
		"reheating":  reh,
		"slow_roll":  r.Method + "|" + r.End,
		"constraint": r.Constraint,
	}
}

// identitySections are the parts of identity, in a fixed order.
var identitySections = []string{"model", "reheating", "slow_roll", "constraint"}

// diffSections returns the configuration sections in which a value is
// replaced by another single value ("model" for model[2].alpha = 1 -> 2 or
// for n = 2 written where the default was used, "slow_roll" for
// slow_roll.method): there a result of A has one successor
// in B. A list that grows or shrinks, or an entry added or removed, adds
// and removes results instead, and pairs nothing across.
func diffSections(ds []Difference) map[string]bool {
	// An absent field is its default: one value too, unless the whole
	// entry is absent (a path ending in an index).
	single := func(path string, v any) bool {
		switch v.(type) {
		case nil:
			return !strings.HasSuffix(path, "]")
		case []any, map[string]any:
			return false
		}
		return true
	}
	out := map[string]bool{}
	for _, d := range ds {
		if !single(d.Path, d.A) || !single(d.Path, d.B) {
			continue
		}
		sec := d.Path
		if i := strings.IndexAny(sec, ".["); i >= 0 {
			sec = sec[:i]
		}
		if sec == "forecast" {
			sec = "constraint" // forecasts are compared like constraint sets
		}
		out[sec] = true
	}
	return out
}

// idx2 is a pair of result indices, in run A and run B.
type idx2 struct{ i, j int }

// pairResults pairs the results of two runs by identity, never by
// position: first those whose whole identity agrees; then, among the rest,
// those that agree on every part the differing sections cannot change
// (changed is the set of sections whose fields differ), in order of
// appearance (a w_reh changed from 0 to 1/3 pairs each history with its
// successor). What is left is only in A (removed) or only in B (added).
func pairResults(a, b []study.Result, changed map[string]bool) (pairs []idx2, onlyA, onlyB []int) {
	key := func(r study.Result, reduced bool) string {
		id := identity(r)
		var k []string
		for _, sec := range identitySections {
			v := id[sec]
			if reduced && changed[sec] {
				if sec != "model" {
					continue
				}
				v, _, _ = strings.Cut(v, "|") // the family stays: models never pair across families
			}
			k = append(k, v)
		}
		return strings.Join(k, "\x00")
	}
	usedA, usedB := make([]bool, len(a)), make([]bool, len(b))
	for _, reduced := range []bool{false, true} {
		queue := map[string][]int{}
		for j := range b {
			if !usedB[j] {
				k := key(b[j], reduced)
				queue[k] = append(queue[k], j)
			}
		}
		for i := range a {
			if usedA[i] {
				continue
			}
			k := key(a[i], reduced)
			if q := queue[k]; len(q) > 0 {
				pairs = append(pairs, idx2{i, q[0]})
				queue[k] = q[1:]
				usedA[i], usedB[q[0]] = true, true
			}
		}
	}
	sort.Slice(pairs, func(x, y int) bool { return pairs[x].i < pairs[y].i })
	for i := range a {
		if !usedA[i] {
			onlyA = append(onlyA, i)
		}
	}
	for j := range b {
		if !usedB[j] {
			onlyB = append(onlyB, j)
		}
	}
	return pairs, onlyA, onlyB
}
