package model

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Param declares one family parameter: its unit and the open or closed
// interval it must lie in.
type Param struct {
	Name string
	Unit string // "1" (dimensionless) or "M_p"
	// Min and Max bound the value; MinOpen/MaxOpen make the bound strict.
	Min, Max         float64
	MinOpen, MaxOpen bool
	// Default, when not NaN, is used if the parameter is not given.
	Default float64
	Doc     string
}

// Kinds of potential, for listing: the shape of V where the observable
// scales leave the horizon, after the classification by the sign of V” of
// Dodelson, Kinney & Kolb 1997 (PRD 56, 3207, astro-ph/9702166; from
// memory), with plateaus set apart.
const (
	// KindLargeField: V” > 0, monomial-like, the field rolls towards a
	// minimum at the origin from super-Planckian values.
	KindLargeField = "large-field"
	// KindSmallField: V” < 0, the field rolls off a maximum (or down a
	// logarithm) towards a minimum.
	KindSmallField = "small-field"
	// KindPlateau: V approaches a constant at large field, V” < 0.
	KindPlateau = "plateau"
)

// Family is a built-in model family.
type Family struct {
	Name      string
	Formula   string // the potential, in words
	Reference string // a published reference for the family
	Params    []Param
	// Kind is one of KindLargeField, KindSmallField, KindPlateau.
	Kind string
	// Tags are short labels for listing ("alpha-attractor", "string
	// theory", "numerical canonical map", ...).
	Tags []string
	// AsymptoticW, when not nil, returns the equation of state w the
	// family implies for the field's late-time evolution, long after
	// inflation, for parameters as validated by New (Model.Params); ok is
	// false where the family has no such attractor. Nil for families whose
	// field ends in a minimum.
	AsymptoticW func(params map[string]float64) (w float64, ok bool)
	build       func(p map[string]float64) (*Model, error)
	// buildOn, when not nil, builds the model on a given canonical range
	// without computing the default one (NewOn), for families whose
	// default range costs a root search.
	buildOn func(p map[string]float64, lo, hi float64) (*Model, error)
}

// ParamNames returns the declared parameter names in order.
func (f *Family) ParamNames() []string {
	names := make([]string, len(f.Params))
	for i, p := range f.Params {
		names[i] = p.Name
	}
	return names
}

// ParamError reports a bad family parameter.
type ParamError struct {
	Family, Param string
	Msg           string
}

func (e *ParamError) Error() string {
	if e.Param == "" {
		return fmt.Sprintf("family %s: %s", e.Family, e.Msg)
	}
	return fmt.Sprintf("family %s: parameter %s: %s", e.Family, e.Param, e.Msg)
}

// New builds a model from the given parameters, applying defaults and
// checking every value against its declared range. Unknown and missing
// parameters are errors that list the allowed names.
func (f *Family) New(given map[string]float64) (*Model, error) {
	p, err := f.params(given)
	if err != nil {
		return nil, err
	}
	// A build fails only where the model is computed (a numerical canonical
	// map); its error already names the family.
	return f.build(p)
}

// NewOn is New followed by WithRange(lo, hi) for a range that New (and
// WithRange) already accepted for these parameters: the range a model's
// specification records. A family that computes its default range by a
// root search (the alpha-attractors) builds the model on (lo, hi) without
// computing the default range, so the range is not checked against it
// again; the model is the one New and WithRange would give. Parameters are
// checked as by New.
func (f *Family) NewOn(given map[string]float64, lo, hi float64) (*Model, error) {
	if f.buildOn == nil {
		m, err := f.New(given)
		if err != nil || (lo == m.Lo && hi == m.Hi) {
			return m, err
		}
		return m.WithRange(lo, hi)
	}
	if !(lo < hi) || math.IsNaN(lo) || math.IsNaN(hi) {
		return nil, fmt.Errorf("field range [%g, %g] is empty", lo, hi)
	}
	p, err := f.params(given)
	if err != nil {
		return nil, err
	}
	return f.buildOn(p, lo, hi)
}

// params returns the parameters New builds with: given, with defaults
// applied, each checked against its declared range.
func (f *Family) params(given map[string]float64) (map[string]float64, error) {
	// Declared names are looked up, not the given ones iterated: a count
	// of those found tells whether any given name is unknown.
	p := make(map[string]float64, len(f.Params))
	found := 0
	for _, d := range f.Params {
		if v, ok := given[d.Name]; ok {
			p[d.Name] = v
			found++
		}
	}
	if found < len(given) {
		var unknown []string
		for n := range given {
			if !f.hasParam(n) {
				unknown = append(unknown, n)
			}
		}
		sort.Strings(unknown)
		return nil, &ParamError{Family: f.Name, Param: unknown[0], Msg: "unknown parameter (allowed: " + f.allowed() + ")"}
	}
	for _, d := range f.Params {
		v, ok := p[d.Name]
		if !ok {
			if math.IsNaN(d.Default) {
				return nil, &ParamError{Family: f.Name, Param: d.Name, Msg: "missing (required: " + f.allowed() + ")"}
			}
			v = d.Default
			p[d.Name] = v
		}
		if err := d.check(v); err != nil {
			return nil, &ParamError{Family: f.Name, Param: d.Name, Msg: err.Error()}
		}
	}
	return p, nil
}

// hasParam reports whether the family declares a parameter named n.
func (f *Family) hasParam(n string) bool {
	for _, d := range f.Params {
		if d.Name == n {
			return true
		}
	}
	return false
}

// allowed lists the declared parameter names for error messages ("none"
// when there are none).
func (f *Family) allowed() string {
	if len(f.Params) == 0 {
		return "none"
	}
	return strings.Join(f.ParamNames(), ", ")
}

func (d Param) check(v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("value %g is not finite", v)
	}
	lowOK := v > d.Min || (!d.MinOpen && v == d.Min)
	highOK := v < d.Max || (!d.MaxOpen && v == d.Max)
	if !lowOK || !highOK {
		return fmt.Errorf("value %g outside %s", v, d.Interval())
	}
	return nil
}

// Interval writes the allowed range, e.g. "(0, inf)".
func (d Param) Interval() string {
	l, r := "[", "]"
	if d.MinOpen {
		l = "("
	}
	if d.MaxOpen {
		r = ")"
	}
	return fmt.Sprintf("%s%g, %g%s", l, d.Min, d.Max, r)
}

var registry = map[string]*Family{}

func register(f *Family) { registry[f.Name] = f }

// renamed maps a family's former name to its current one, so that a study
// written with the old name is refused with an error naming the new one
// (the old name is not accepted as an alias: a key records the name).
var renamed = map[string]string{
	// Named after the words of the paper it cites (Fairbairn, Lopez Honorez
	// & Tytgat 2003, "Radion assisted gauge inflation", hep-ph/0302160).
	"radion-gauge": "radion-assisted-gauge",
}

// Lookup returns the built-in family with this name, or an error listing
// the known families (or naming the new name of a renamed family).
func Lookup(name string) (*Family, error) {
	if f, ok := registry[name]; ok {
		return f, nil
	}
	if to, ok := renamed[name]; ok {
		return nil, fmt.Errorf("family %q was renamed %q", name, to)
	}
	return nil, fmt.Errorf("unknown model family %q (known: %s)", name, strings.Join(Names(), ", "))
}

// Names lists the built-in families in sorted order.
func Names() []string {
	names := make([]string, 0, len(registry))
	for n := range registry {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

// Check refuses a value outside the parameter's declared range (Interval).
func (d Param) Check(v float64) error { return d.check(v) }
