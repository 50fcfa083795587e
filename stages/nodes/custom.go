package nodes

import (
	"fmt"
	"math"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/expr"
	"github.com/inflatrace/inflatrace/stages/model"
)

// CustomFamily is the family name of user-written models.
const CustomFamily = "custom"

// Custom describes a user-written model: a potential V(field) and an
// optional kinetic function K(field), as expressions, with the native
// domain, the origin (where phi = 0) and the range searched for
// inflation, in the native field.
type Custom struct {
	Potential, Kinetic string // Kinetic empty: canonical
	Field              string
	Params             map[string]float64
	DomainLo, DomainHi float64 // open native domain (may be infinite)
	Origin             float64
	SearchLo, SearchHi float64 // range searched for inflation, in the field
}

// CustomParams returns the model node's parameters for a user model. The
// expressions enter in canonical form (expr.String), so that layout does
// not change the key.
func CustomParams(c Custom) (pipeline.Values, error) {
	v, k, err := c.compile()
	if err != nil {
		return nil, err
	}
	vs := pipeline.Values{
		keyFamily:   pipeline.String(CustomFamily),
		"potential": pipeline.String(v.String()),
		"field":     pipeline.String(c.Field),
		keyFieldLo:  pipeline.Float(c.SearchLo, pipeline.UnitMp),
		keyFieldHi:  pipeline.Float(c.SearchHi, pipeline.UnitMp),
	}
	if k != nil {
		vs["kinetic"] = pipeline.String(k.String())
		vs["origin"] = pipeline.Float(c.Origin, pipeline.UnitMp)
		if !math.IsInf(c.DomainLo, 0) {
			vs["domain_lo"] = pipeline.Float(c.DomainLo, pipeline.UnitMp)
		}
		if !math.IsInf(c.DomainHi, 0) {
			vs["domain_hi"] = pipeline.Float(c.DomainHi, pipeline.UnitMp)
		}
	}
	for n, x := range c.Params {
		vs[ParamPrefix+n] = pipeline.Float(x, pipeline.UnitNone)
	}
	return vs, nil
}

// CompileCustom compiles a user model's expressions, for early errors:
// syntax (with the column), unknown names (listing the allowed ones), a
// potential that does not depend on the field.
func CompileCustom(c Custom) error {
	_, _, err := c.compile()
	return err
}

func (c Custom) compile() (*expr.Expr, *expr.Expr, error) {
	if c.Field == "" {
		c.Field = "phi"
	}
	v, err := expr.Compile(c.Potential, c.Field, c.Params)
	if err != nil {
		return nil, nil, fmt.Errorf("potential: %w", err)
	}
	if strings.TrimSpace(c.Kinetic) == "" {
		return v, nil, nil
	}
	k, err := expr.CompileWith(c.Kinetic, c.Field, c.Params, &expr.Options{AllowConstant: true})
	if err != nil {
		return nil, nil, fmt.Errorf("kinetic: %w", err)
	}
	return v, k, nil
}

// customFrom reads a user model back from node values.
func customFrom(vs pipeline.Values) (Custom, error) {
	c := Custom{DomainLo: math.Inf(-1), DomainHi: math.Inf(1), Params: map[string]float64{}}
	var err error
	if c.Potential, err = vs.Text("potential"); err != nil {
		return c, err
	}
	c.Kinetic, _ = vs.Text("kinetic")
	c.Field, _ = vs.Text("field")
	if c.SearchLo, err = vs.Num(keyFieldLo); err != nil {
		return c, fmt.Errorf("a user-written model needs its search range: %w", err)
	}
	if c.SearchHi, err = vs.Num(keyFieldHi); err != nil {
		return c, err
	}
	c.Origin, _ = vs.Num("origin")
	if x, err := vs.Num("domain_lo"); err == nil {
		c.DomainLo = x
	}
	if x, err := vs.Num("domain_hi"); err == nil {
		c.DomainHi = x
	}
	for n, v := range vs {
		if p, ok := strings.CutPrefix(n, ParamPrefix); ok {
			c.Params[p] = v.Float
		}
	}
	return c, nil
}

// Model builds the user model: canonical when there is no kinetic
// function, otherwise normalised numerically (model.NewNative).
func (c Custom) Model() (*model.Model, error) {
	v, k, err := c.compile()
	if err != nil {
		return nil, err
	}
	if k == nil {
		if !(c.SearchLo < c.SearchHi) {
			return nil, fmt.Errorf("custom model: field range [%g, %g] is empty", c.SearchLo, c.SearchHi)
		}
		return &model.Model{Family: CustomFamily, Params: c.Params, V: v.Eval, Lo: c.SearchLo, Hi: c.SearchHi}, nil
	}
	return model.NewNative(model.NativeSpec{
		Family: CustomFamily, Params: c.Params, Field: v.Field(),
		V: v.Eval, K: k.Eval, Origin: c.Origin, Lo: c.DomainLo, Hi: c.DomainHi,
		SearchLo: c.SearchLo, SearchHi: c.SearchHi, SearchInField: true,
	})
}
