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
// (along = AlongNStar) or along a model parameter (along = its name), and
// says what their marker shapes stand for.
//
// Along N*, one curve holds every result of one model (family, label and
// parameters) and method, whatever its reheating history, ordered by N*:
// for a given model and method, (n_s, r) is a function of N* alone.
// Along a parameter, one curve holds the results that agree in model, the
// other parameters, method and history, ordered by the parameter.
//
// Models are told apart by line style (one style per model and method,
// named once in the key), reheating histories by marker shape: "N*=55"
// becomes $N_* = 55$ in the key, other histories their own words. Beyond
// len(markerOrder) histories every point takes a circle and the shapes
// mean nothing, so no marker key is given.
//
// Results with an error, bands (Band set) and results lacking the
// parameter are skipped; a prediction listed once per constraint set is
// used once. An error is returned when nothing is left.
func CurvesAlong(rows []study.Result, along string) ([]Curve, []MarkerLabel, error) {
	groups, err := group(rows, along)
	if err != nil {
		return nil, nil, err
	}
	marks, key := historyMarkers(groups)
	out := make([]Curve, len(groups))
	for i, g := range groups {
		c := Curve{Label: g.label, Style: g.style, Join: true, Markers: make([]Marker, len(g.rows))}
		for k, r := range g.rows {
			c.Points = append(c.Points, compare.Point{Ns: r.Ns, R: r.R})
			c.Markers[k] = marks[g.histories[k]]
		}
		out[i] = c
	}
	return out, key, nil
}

// RCurvesAlong groups results as CurvesAlong does with along = param and
// returns r against factor times the parameter (factor 3 for "3 alpha"),
// for RAlpha.
func RCurvesAlong(rows []study.Result, param string, factor float64) ([]XYCurve, []MarkerLabel, error) {
	if param == AlongNStar {
		return nil, nil, fmt.Errorf("figures: r against a parameter needs a model parameter, not %s", AlongNStar)
	}
	if !(factor != 0) || math.IsInf(factor, 0) || math.IsNaN(factor) {
		return nil, nil, fmt.Errorf("figures: factor %g, want finite and non-zero", factor)
	}
	groups, err := group(rows, param)
	if err != nil {
		return nil, nil, err
	}
	marks, key := historyMarkers(groups)
	out := make([]XYCurve, len(groups))
	for i, g := range groups {
		c := XYCurve{Label: g.label, Style: g.style, Join: true, Markers: make([]Marker, len(g.rows))}
		for k, r := range g.rows {
			c.X = append(c.X, factor*g.x[k])
			c.R = append(c.R, r.R)
			c.Markers[k] = marks[g.histories[k]]
		}
		out[i] = c
	}
	return out, key, nil
}

// historyMarkers hands out a marker shape per reheating history (fixed N*
// in increasing order, then the others in order of first appearance),
// with the key that explains them.
func historyMarkers(groups []curveGroup) (map[string]Marker, []MarkerLabel) {
	var order []string
	seen := map[string]bool{}
	for _, g := range groups {
		for _, h := range g.histories {
			if !seen[h] {
				seen[h] = true
				order = append(order, h)
			}
		}
	}
	// Fixed N* first, in increasing N*, then the other histories as met.
	nstar := func(h string) (float64, bool) {
		v, ok := strings.CutPrefix(h, "N*=")
		if !ok {
			return 0, false
		}
		x, err := strconv.ParseFloat(v, 64)
		return x, err == nil
	}
	sort.SliceStable(order, func(i, j int) bool {
		a, okA := nstar(order[i])
		b, okB := nstar(order[j])
		if okA && okB {
			return a < b
		}
		return okA && !okB
	})
	marks := map[string]Marker{}
	if len(order) > len(markerOrder) {
		for _, h := range order {
			marks[h] = MarkerCircle
		}
		return marks, nil
	}
	var key []MarkerLabel
	for i, h := range order {
		marks[h] = markerOrder[i]
		key = append(key, MarkerLabel{markerOrder[i], historyText(h)})
	}
	return marks, key
}

// historyText is a history label as the key writes it: "N*=55" as
// $N_* = 55$, "instantaneous" as "instantaneous reheating", the rest as
// written.
func historyText(h string) string {
	if v, ok := strings.CutPrefix(h, "N*="); ok {
		return "$N_*$ = " + PlainText(v)
	}
	if h == "instantaneous" {
		return "instantaneous reheating"
	}
	// "w=1/3 T_reh=1e+09 GeV": symbols typeset, powers of ten as such.
	var b strings.Builder
	fields := strings.Fields(h)
	for i, f := range fields {
		name, value, ok := strings.Cut(f, "=")
		sym, known := historySymbols[name]
		if i > 0 {
			b.WriteString(" ")
		}
		if !ok || !known {
			b.WriteString(PlainText(f))
			continue
		}
		b.WriteString(sym + " = " + typesetNumber(value))
		if i+1 < len(fields) && strings.Contains(fields[i+1], "=") {
			b.WriteString(",")
		}
	}
	return b.String()
}

// historySymbols are the typeset symbols of a history label's fields.
var historySymbols = map[string]string{"w": "$w$", "T_reh": "$T_{reh}$", "N_reh": "$N_{reh}$", "N*": "$N_*$"}

// typesetNumber writes "1e+09" as 10 to the 9 and "2.5e+12" as 2.5 times
// 10 to the 12; anything else as it stands.
func typesetNumber(v string) string {
	mant, exp, ok := strings.Cut(v, "e")
	if !ok {
		return PlainText(v)
	}
	e, err := strconv.Atoi(exp)
	if err != nil {
		return PlainText(v)
	}
	pow := "$10^{" + strconv.Itoa(e) + "}$"
	if mant == "1" {
		return pow
	}
	return PlainText(mant) + "$\\times$" + pow
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

// curveGroup is one curve's results in order of x, with each result's
// history, the curve's key label (empty when an earlier curve of the same
// model already names it) and its style index (one per model and method).
type curveGroup struct {
	label     string
	style     int
	rows      []*study.Result
	x         []float64
	histories []string
}

func group(rows []study.Result, along string) ([]curveGroup, error) {
	methods := map[string]bool{}
	for _, r := range rows {
		methods[r.Method] = true
	}
	var order []string
	byKey := map[string]*curveGroup{}
	seen := map[string]bool{}
	styles := map[string]int{}
	for i := range rows {
		r := &rows[i]
		if r.Error != "" || r.Band != nil {
			continue
		}
		model, history := labelParts(*r)
		id := model + " | " + history + " | " + r.Method + " | " + r.End
		if seen[id] {
			continue
		}
		var x float64
		name := model
		if along == AlongNStar {
			x = r.NStar
		} else {
			v, ok := r.Params[along]
			if !ok {
				continue
			}
			x, name = v, dropParam(model, along)
		}
		if math.IsNaN(x) || math.IsNaN(r.Ns) || math.IsNaN(r.R) {
			continue
		}
		seen[id] = true
		// The label's model part names the family and every parameter
		// value, so without the joined parameter it names the curve.
		identity := r.Model + "\x00" + name + "\x00" + r.Method + "\x00" + r.End
		key := identity
		if along != AlongNStar {
			key += "\x00" + history
		}
		g, ok := byKey[key]
		if !ok {
			style, named := styles[identity]
			if !named {
				style = len(styles)
				styles[identity] = style
			}
			g = &curveGroup{style: style}
			if !named {
				g.label = PlainText(name)
				if len(methods) > 1 {
					g.label += " [" + PlainText(r.Method) + "]"
				}
			}
			byKey[key] = g
			order = append(order, key)
		}
		g.rows = append(g.rows, r)
		g.x = append(g.x, x)
		g.histories = append(g.histories, history)
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
		sorted := curveGroup{label: g.label, style: g.style}
		for _, j := range idx {
			sorted.rows = append(sorted.rows, g.rows[j])
			sorted.x = append(sorted.x, g.x[j])
			sorted.histories = append(sorted.histories, g.histories[j])
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
