package expr

import (
	"math"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// function is one built-in function. The jet and float forms must compute
// the value with the same float64 operations, so that Value(x) equals
// Eval(num.Var(x)).V to the bit and constant folding changes nothing.
type function struct {
	name  string
	arity int
	jet   func(num.Jet) num.Jet // nil for pow, which the compiler lowers itself
	flt   func(float64) float64 // nil for pow
}

// funcs lists the built-in functions by name.
var funcs = map[string]*function{
	"exp":   {name: "exp", arity: 1, jet: num.Exp, flt: detmath.Exp},
	"log":   {name: "log", arity: 1, jet: num.Log, flt: detmath.Log},
	"sqrt":  {name: "sqrt", arity: 1, jet: num.Sqrt, flt: math.Sqrt},
	"sin":   {name: "sin", arity: 1, jet: num.Sin, flt: sinF},
	"cos":   {name: "cos", arity: 1, jet: num.Cos, flt: cosF},
	"tan":   {name: "tan", arity: 1, jet: num.Tan, flt: detmath.Tan},
	"sinh":  {name: "sinh", arity: 1, jet: num.Sinh, flt: detmath.Sinh},
	"cosh":  {name: "cosh", arity: 1, jet: num.Cosh, flt: detmath.Cosh},
	"tanh":  {name: "tanh", arity: 1, jet: num.Tanh, flt: detmath.Tanh},
	"asinh": {name: "asinh", arity: 1, jet: num.Asinh, flt: detmath.Asinh},
	"acosh": {name: "acosh", arity: 1, jet: num.Acosh, flt: detmath.Acosh},
	"atanh": {name: "atanh", arity: 1, jet: num.Atanh, flt: detmath.Atanh},
	"abs":   {name: "abs", arity: 1, jet: num.Abs, flt: absF},
	"pow":   {name: "pow", arity: 2},
}

// sinF and cosF take the value from math.Sincos, as num.Sin and num.Cos do.
func sinF(x float64) float64 { s, _ := detmath.Sincos(x); return s }
func cosF(x float64) float64 { _, c := detmath.Sincos(x); return c }

// absF mirrors num.Abs (which keeps the sign of -0), not math.Abs.
func absF(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// constants lists the named constants. Euler's number is deliberately
// absent: "e" is a common parameter name and reads like the exponent
// marker of a literal; exp(1) spells it unambiguously.
var constants = map[string]float64{
	"pi": math.Pi,
}

// funcNames returns the function names, sorted.
func funcNames() []string {
	names := make([]string, 0, len(funcs))
	for n := range funcs {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

// scope is what a source text may refer to.
type scope struct {
	field  string
	params map[string]float64
}

// checkDecl validates the field and parameter declarations.
func checkDecl(field string, params map[string]float64) error {
	if err := checkName("field", field); err != nil {
		return err
	}
	names := make([]string, 0, len(params))
	for n := range params {
		names = append(names, n)
	}
	sort.Strings(names) // report the same error on every run
	for _, n := range names {
		if err := checkName("parameter", n); err != nil {
			return err
		}
		if n == field {
			return &DeclError{Kind: "parameter", Name: n, Reason: "has the same name as the field"}
		}
		if v := params[n]; math.IsNaN(v) || math.IsInf(v, 0) {
			return &DeclError{Kind: "parameter", Name: n, Reason: "value " + formatNum(v) + " is not finite"}
		}
	}
	return nil
}

func checkName(kind, name string) error {
	switch {
	case !isIdent(name):
		return &DeclError{Kind: kind, Name: name, Reason: "is not an identifier (a letter or '_' followed by letters, digits and '_')"}
	case funcs[name] != nil:
		return &DeclError{Kind: kind, Name: name, Reason: "collides with the function " + name}
	}
	if _, ok := constants[name]; ok {
		return &DeclError{Kind: kind, Name: name, Reason: "collides with the constant " + name}
	}
	return nil
}

// allowed lists every name a source may use, for unknown-name errors:
// "allowed names: field x; parameters alpha, f; constant pi; functions abs, ...".
func (s *scope) allowed() string {
	var b strings.Builder
	b.WriteString("allowed names: field " + s.field + "; ")
	names := make([]string, 0, len(s.params))
	for n := range s.params {
		names = append(names, n)
	}
	sort.Strings(names)
	switch len(names) {
	case 0:
		b.WriteString("no parameters")
	case 1:
		b.WriteString("parameter " + names[0])
	default:
		b.WriteString("parameters " + strings.Join(names, ", "))
	}
	b.WriteString("; constant pi; functions " + strings.Join(funcNames(), ", "))
	return b.String()
}

// hint suggests a likely intended name for an unknown one, or returns "".
func (s *scope) hint(name string) string {
	if name == "e" {
		return "; for Euler's number write exp(1)"
	}
	candidates := append(funcNames(), "pi", s.field)
	for n := range s.params {
		candidates = append(candidates, n)
	}
	sort.Strings(candidates)
	for _, c := range candidates {
		if strings.EqualFold(c, name) {
			return "; names are case-sensitive: did you mean " + c + "?"
		}
	}
	return ""
}
