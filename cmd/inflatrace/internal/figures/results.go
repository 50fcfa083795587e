package figures

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/study"
)

// AlongNStar joins predictions along N* in CurvesAlong.
const AlongNStar = "N_star"

// CurvesAlong groups results into curves for NsR, joined along N*
// (along = AlongNStar) or along a model parameter (along = its name).
//
// Along N*, one curve holds the results of one model, parameter set,
// slow-roll method, reheating kind and, when set, w_reh, ordered by N*
// (so a fixed-efolds scan, or a temperature scan at fixed w, is one curve).
// Along a parameter, one curve holds the results that agree in model, the
// other parameters, method and history (the history part of the label,
// such as "N*=55"), ordered by the parameter.
//
// Results with an error, bands (Band set) and results lacking the
// parameter are skipped; a prediction listed once per constraint set is
// used once. Curves come in order of first appearance, joined, with the
// first and last points tagged ("N*=50", "alpha=0.1"). An error is
// returned when nothing is left.
func CurvesAlong(rows []study.Result, along string) ([]Curve, error) {
	groups, err := group(rows, along)
	if err != nil {
		return nil, err
	}
	out := make([]Curve, len(groups))
	for i, g := range groups {
		c := Curve{Label: g.label, Join: true, Tags: make([]string, len(g.rows))}
		for _, r := range g.rows {
			c.Points = append(c.Points, compare.Point{Ns: r.Ns, R: r.R})
		}
		c.Tags[0] = tag(along, g.x[0])
		c.Tags[len(g.rows)-1] = tag(along, g.x[len(g.x)-1])
		out[i] = c
	}
	return out, nil
}

// RCurvesAlong groups results as CurvesAlong does with along = param and
// returns r against factor times the parameter (factor 3 for "3 alpha"),
// for RAlpha.
func RCurvesAlong(rows []study.Result, param string, factor float64) ([]XYCurve, error) {
	if param == AlongNStar {
		return nil, fmt.Errorf("figures: r against a parameter needs a model parameter, not %s", AlongNStar)
	}
	if !(factor != 0) || math.IsInf(factor, 0) || math.IsNaN(factor) {
		return nil, fmt.Errorf("figures: factor %g, want finite and non-zero", factor)
	}
	groups, err := group(rows, param)
	if err != nil {
		return nil, err
	}
	out := make([]XYCurve, len(groups))
	for i, g := range groups {
		c := XYCurve{Label: g.label, Join: true}
		for k, r := range g.rows {
			c.X = append(c.X, factor*g.x[k])
			c.R = append(c.R, r.R)
		}
		out[i] = c
	}
	return out, nil
}

// StripeFromResults builds the stripe of a model scanned over param from
// its predictions at the two ends of the N* span: atNMin at N*_min and
// atNMax at N*_max, one result per parameter value each (for instance two
// fixed-efolds scans). Both must hold the same parameter values.
func StripeFromResults(label string, atNMin, atNMax []study.Result, param string) (Stripe, error) {
	edge := func(rows []study.Result, which string) ([]float64, []compare.Point, error) {
		groups, err := group(rows, param)
		if err != nil {
			return nil, nil, fmt.Errorf("figures: stripe %q, %s edge: %w", label, which, err)
		}
		if len(groups) != 1 {
			return nil, nil, fmt.Errorf("figures: stripe %q, %s edge: results form %d curves (%s), want 1", label, which, len(groups), groups[0].label)
		}
		var pts []compare.Point
		for _, r := range groups[0].rows {
			pts = append(pts, compare.Point{Ns: r.Ns, R: r.R})
		}
		return groups[0].x, pts, nil
	}
	x0, lo, err := edge(atNMin, "N*_min")
	if err != nil {
		return Stripe{}, err
	}
	x1, hi, err := edge(atNMax, "N*_max")
	if err != nil {
		return Stripe{}, err
	}
	if len(x0) != len(x1) {
		return Stripe{}, fmt.Errorf("figures: stripe %q: %d parameter values at N*_min, %d at N*_max", label, len(x0), len(x1))
	}
	for k := range x0 {
		if x0[k] != x1[k] {
			return Stripe{}, fmt.Errorf("figures: stripe %q: %s = %g at N*_min but %g at N*_max", label, param, x0[k], x1[k])
		}
	}
	return Stripe{Label: label, Lower: lo, Upper: hi}, nil
}

// curveGroup is one curve's results in order of x.
type curveGroup struct {
	label string
	rows  []study.Result
	x     []float64
}

func group(rows []study.Result, along string) ([]curveGroup, error) {
	var order []string
	byKey := map[string]*curveGroup{}
	seen := map[string]bool{}
	for _, r := range rows {
		if r.Error != "" || r.Band != nil {
			continue
		}
		model, history := labelParts(r)
		id := model + " | " + history
		if seen[id] {
			continue
		}
		var x float64
		var key, label string
		if along == AlongNStar {
			x = r.NStar
			label = model + " | " + r.Reheating
			if r.WReh != nil && r.Reheating != "instantaneous" {
				label += " w=" + strconv.FormatFloat(*r.WReh, 'g', -1, 64)
			}
			key = strings.Join([]string{r.Model, model, r.Method, label}, "\x00")
		} else {
			v, ok := r.Params[along]
			if !ok {
				continue
			}
			x = v
			label = dropParam(model, along) + " | " + history
			key = strings.Join([]string{r.Model, r.Method, otherParams(r.Params, along), label}, "\x00")
		}
		if math.IsNaN(x) || math.IsNaN(r.Ns) || math.IsNaN(r.R) {
			continue
		}
		seen[id] = true
		g, ok := byKey[key]
		if !ok {
			g = &curveGroup{label: label}
			byKey[key] = g
			order = append(order, key)
		}
		g.rows = append(g.rows, r)
		g.x = append(g.x, x)
	}
	if len(order) == 0 {
		return nil, fmt.Errorf("figures: no results to join along %s", along)
	}
	out := make([]curveGroup, len(order))
	for i, k := range order {
		g := byKey[k]
		idx := make([]int, len(g.rows))
		for j := range idx {
			idx[j] = j
		}
		sort.SliceStable(idx, func(a, b int) bool { return g.x[idx[a]] < g.x[idx[b]] })
		sorted := curveGroup{label: g.label}
		for _, j := range idx {
			sorted.rows = append(sorted.rows, g.rows[j])
			sorted.x = append(sorted.x, g.x[j])
		}
		out[i] = sorted
	}
	return out, nil
}

// labelParts splits a result label "model(params) | history | constraint"
// into its model and history parts; without a label, the model part is
// rebuilt from the family and parameters and the history is the reheating
// kind.
func labelParts(r study.Result) (model, history string) {
	parts := strings.Split(r.Label, " | ")
	if r.Label == "" || len(parts) < 2 {
		if len(r.Params) == 0 {
			return r.Model, r.Reheating
		}
		return r.Model + "(" + otherParams(r.Params, "") + ")", r.Reheating
	}
	return parts[0], parts[1]
}

// dropParam removes "name=..." from the parenthesised list of a model
// label "family(a=1, name=2)"; the parentheses go when the list empties.
func dropParam(model, name string) string {
	open := strings.IndexByte(model, '(')
	if open < 0 || !strings.HasSuffix(model, ")") {
		return model
	}
	var keep []string
	for _, p := range strings.Split(model[open+1:len(model)-1], ", ") {
		if !strings.HasPrefix(p, name+"=") {
			keep = append(keep, p)
		}
	}
	if len(keep) == 0 {
		return model[:open]
	}
	return model[:open] + "(" + strings.Join(keep, ", ") + ")"
}

// otherParams is "a=1, b=2" for the parameters other than skip, sorted by
// name, values exact.
func otherParams(ps map[string]float64, skip string) string {
	names := make([]string, 0, len(ps))
	for n := range ps {
		if n != skip {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = n + "=" + strconv.FormatFloat(ps[n], 'g', -1, 64)
	}
	return strings.Join(parts, ", ")
}

// tag is "N*=50" or "alpha=0.1", four significant digits.
func tag(along string, x float64) string {
	name := along
	if along == AlongNStar {
		name = "N*"
	}
	return name + "=" + strconv.FormatFloat(x, 'g', 4, 64)
}
