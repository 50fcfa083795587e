package nodes

import (
	"fmt"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/model"
)

// ParamPrefix prefixes a model family's parameters in node values
// ("param:alpha").
const ParamPrefix = "param:"

// Names of the values that specify a model.
const (
	keyFamily  = "family"
	keyFieldLo = "field_lo"
	keyFieldHi = "field_hi"
)

// ModelParams returns the model node's parameters for a family, its
// parameters and an optional canonical field range (nil for the family's
// default). The family's declared units label the parameters.
func ModelParams(family string, params map[string]float64, fieldRange []float64) (pipeline.Values, error) {
	fam, err := model.Lookup(family)
	if err != nil {
		return nil, err
	}
	units := map[string]string{}
	for _, p := range fam.Params {
		units[p.Name] = p.Unit
	}
	vs := pipeline.Values{keyFamily: pipeline.String(family)}
	for n, v := range params {
		u, ok := units[n]
		if !ok {
			u = pipeline.UnitNone // unknown names are refused by the family
		}
		vs[ParamPrefix+n] = pipeline.Float(v, u)
	}
	if fieldRange != nil {
		if len(fieldRange) != 2 {
			return nil, fmt.Errorf("field range: want [lo, hi], got %d values", len(fieldRange))
		}
		vs[keyFieldLo] = pipeline.Float(fieldRange[0], pipeline.UnitMp)
		vs[keyFieldHi] = pipeline.Float(fieldRange[1], pipeline.UnitMp)
	}
	return vs, nil
}

// buildModel builds a model from values holding its specification,
// checking a given field range against the family's default (New and
// WithRange): for the model node's parameters.
func buildModel(vs pipeline.Values) (*model.Model, error) { return modelFrom(vs, false) }

// rebuildModel rebuilds a model from the specification a model node
// recorded (carried forward by the stages below it), on its recorded field
// range, which the model node checked: the family does not compute its
// default range again (model.Family.NewOn).
func rebuildModel(vs pipeline.Values) (*model.Model, error) { return modelFrom(vs, true) }

func modelFrom(vs pipeline.Values, recorded bool) (*model.Model, error) {
	family, err := vs.Text(keyFamily)
	if err != nil {
		return nil, err
	}
	if family == CustomFamily {
		c, err := customFrom(vs)
		if err != nil {
			return nil, err
		}
		return c.Model()
	}
	fam, err := model.Lookup(family)
	if err != nil {
		return nil, err
	}
	given := make(map[string]float64, len(fam.Params))
	if recorded {
		// A recorded specification holds the family's parameters and no
		// others (specValues wrote it): they are looked up by name.
		for i, k := range paramKeys(fam) {
			if v, ok := vs[k]; ok {
				given[fam.Params[i].Name] = v.Float
			}
		}
	} else {
		for n, v := range vs {
			if name, ok := strings.CutPrefix(n, ParamPrefix); ok {
				given[name] = v.Float
			}
		}
	}
	vLo, hasLo := vs[keyFieldLo]
	vHi, hasHi := vs[keyFieldHi]
	if hasLo != hasHi {
		return nil, fmt.Errorf("field range needs both %s and %s", keyFieldLo, keyFieldHi)
	}
	if !hasLo {
		return fam.New(given)
	}
	lo, hi := floatOf(vLo), floatOf(vHi)
	if recorded {
		return fam.NewOn(given, lo, hi)
	}
	m, err := fam.New(given)
	if err != nil {
		return nil, err
	}
	if lo != m.Lo || hi != m.Hi {
		return m.WithRange(lo, hi)
	}
	return m, nil
}

// customKeys are the values that specify a user-written model besides its
// parameters and search range.
var customKeys = []string{"potential", "kinetic", "field", "origin", "domain_lo", "domain_hi"}

// carrySpec copies the values that specify a model from in to out: the
// family, its parameters, the search range and, for a user-written model,
// its expressions and domain.
func carrySpec(in, out pipeline.Values) {
	if f, err := model.Lookup(text(in, keyFamily)); err == nil {
		// A built-in family's specification is the values specValues
		// writes: looked up by name.
		for _, k := range [...]string{keyFamily, keyFieldLo, keyFieldHi} {
			if v, ok := in[k]; ok {
				out[k] = v
			}
		}
		for _, k := range paramKeys(f) {
			if v, ok := in[k]; ok {
				out[k] = v
			}
		}
		return
	}
	for k, v := range in {
		if k == keyFamily || k == keyFieldLo || k == keyFieldHi || strings.HasPrefix(k, ParamPrefix) {
			out[k] = v
		}
	}
	for _, k := range customKeys {
		if v, ok := in[k]; ok {
			out[k] = v
		}
	}
}

// specCount returns the number of values carrySpec copies from vs (at
// most: for a built-in family, the values specValues writes).
func specCount(vs pipeline.Values) int {
	if f, err := model.Lookup(text(vs, keyFamily)); err == nil {
		return 3 + len(f.Params) // family, range (always recorded) and parameters
	}
	n := 0
	for k := range vs {
		if k == keyFamily || k == keyFieldLo || k == keyFieldHi || strings.HasPrefix(k, ParamPrefix) {
			n++
		}
	}
	for _, k := range customKeys {
		if _, ok := vs[k]; ok {
			n++
		}
	}
	return n
}

// specOf returns the specification to carry forward from a node whose
// input specified m, in a map with room for extra more values.
func specOf(m *model.Model, in pipeline.Values, extra int) pipeline.Values {
	if m.Family == CustomFamily {
		out := make(pipeline.Values, len(in)+extra)
		carrySpec(in, out)
		return out
	}
	return specValues(m, extra)
}

// specValues returns the values that specify m, to carry forward, in a
// map with room for extra more values.
func specValues(m *model.Model, extra int) pipeline.Values {
	if m.Family == CustomFamily {
		panic("specValues: a user-written model's specification is carried with carrySpec")
	}
	fam, _ := model.Lookup(m.Family)
	vs := make(pipeline.Values, 3+len(fam.Params)+extra)
	vs[keyFamily] = pipeline.String(m.Family)
	for i, k := range paramKeys(fam) {
		p := fam.Params[i]
		vs[k] = pipeline.Float(m.Params[p.Name], p.Unit)
	}
	vs[keyFieldLo] = pipeline.Float(m.Lo, pipeline.UnitMp)
	vs[keyFieldHi] = pipeline.Float(m.Hi, pipeline.UnitMp)
	return vs
}

// familyParamKeys holds, for each built-in family, its parameters' value
// names (ParamPrefix + name, in declared order), written once rather than
// for every node.
var familyParamKeys = func() map[*model.Family][]string {
	keys := map[*model.Family][]string{}
	for _, n := range model.Names() {
		f, _ := model.Lookup(n)
		ks := make([]string, len(f.Params))
		for i, p := range f.Params {
			ks[i] = ParamPrefix + p.Name
		}
		keys[f] = ks
	}
	return keys
}()

// paramKeys returns the value names of f's parameters, in declared order.
func paramKeys(f *model.Family) []string {
	if ks, ok := familyParamKeys[f]; ok {
		return ks
	}
	ks := make([]string, len(f.Params))
	for i, p := range f.Params {
		ks[i] = ParamPrefix + p.Name
	}
	return ks
}

// number returns the float named n and whether there is one (a missing
// value costs no error).
func number(vs pipeline.Values, n string) (float64, bool) {
	v, ok := vs[n]
	if !ok || v.Kind != pipeline.KindFloat {
		return 0, false
	}
	return v.Float, true
}

// floatOf is v's float, 0 when it holds none (as number gives).
func floatOf(v pipeline.Value) float64 {
	if v.Kind != pipeline.KindFloat {
		return 0
	}
	return v.Float
}

// text returns the string named n, or "" when there is none.
func text(vs pipeline.Values, n string) string {
	if v, ok := vs[n]; ok && v.Kind == pipeline.KindString {
		return v.Str
	}
	return ""
}

// onlyInput returns the single input of a one-input stage.
func onlyInput(stage string, inputs []pipeline.Values) (pipeline.Values, error) {
	if len(inputs) != 1 {
		return nil, fmt.Errorf("stage %s: want 1 input, got %d", stage, len(inputs))
	}
	return inputs[0], nil
}
