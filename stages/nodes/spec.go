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

// buildModel rebuilds a model from values holding its specification.
func buildModel(vs pipeline.Values) (*model.Model, error) {
	family, err := vs.Text(keyFamily)
	if err != nil {
		return nil, err
	}
	fam, err := model.Lookup(family)
	if err != nil {
		return nil, err
	}
	given := map[string]float64{}
	for n, v := range vs {
		if name, ok := strings.CutPrefix(n, ParamPrefix); ok {
			given[name] = v.Float
		}
	}
	m, err := fam.New(given)
	if err != nil {
		return nil, err
	}
	_, hasLo := vs[keyFieldLo]
	_, hasHi := vs[keyFieldHi]
	if hasLo != hasHi {
		return nil, fmt.Errorf("field range needs both %s and %s", keyFieldLo, keyFieldHi)
	}
	if hasLo {
		lo, _ := vs.Num(keyFieldLo)
		hi, _ := vs.Num(keyFieldHi)
		if lo != m.Lo || hi != m.Hi {
			if m, err = m.WithRange(lo, hi); err != nil {
				return nil, err
			}
		}
	}
	return m, nil
}

// specValues returns the values that specify m, to carry forward.
func specValues(m *model.Model) pipeline.Values {
	fam, _ := model.Lookup(m.Family)
	vs := pipeline.Values{keyFamily: pipeline.String(m.Family)}
	for _, p := range fam.Params {
		vs[ParamPrefix+p.Name] = pipeline.Float(m.Params[p.Name], p.Unit)
	}
	vs[keyFieldLo] = pipeline.Float(m.Lo, pipeline.UnitMp)
	vs[keyFieldHi] = pipeline.Float(m.Hi, pipeline.UnitMp)
	return vs
}

// onlyInput returns the single input of a one-input stage.
func onlyInput(stage string, inputs []pipeline.Values) (pipeline.Values, error) {
	if len(inputs) != 1 {
		return nil, fmt.Errorf("stage %s: want 1 input, got %d", stage, len(inputs))
	}
	return inputs[0], nil
}
