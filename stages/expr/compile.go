package expr

import (
	"fmt"
	"sort"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Options adjusts Compile. The zero value (and a nil *Options) is the
// default.
type Options struct {
	// AllowConstant accepts an expression that does not refer to the
	// field, such as a constant kinetic function "1". By default such an
	// expression is refused with CodeConstant, since a potential that
	// ignores the field is almost always a typo in the field's name.
	AllowConstant bool
}

// Expr is a compiled expression of one field variable. It is immutable
// and safe for concurrent use.
type Expr struct {
	field   string
	params  []string // parameters referred to, sorted
	canon   string   // canonical source text
	root    *node    // folded evaluation tree
	depends bool     // whether the source refers to the field
}

// Compile compiles src, an expression of the variable named field with
// the named parameters, refusing an expression that does not refer to the
// field. It is CompileWith with default options.
func Compile(src string, field string, params map[string]float64) (*Expr, error) {
	return CompileWith(src, field, params, nil)
}

// CompileWith compiles src as Compile does, with options (nil means the
// defaults). Parameter values are bound at compile time: every subtree
// free of the field is folded to a constant.
//
// A problem in src is a *SyntaxError; a bad field or parameter
// declaration (a name that is not an identifier or collides with a
// function, the constant pi or the field; a non-finite value) is a
// *DeclError.
func CompileWith(src string, field string, params map[string]float64, opts *Options) (*Expr, error) {
	if opts == nil {
		opts = &Options{}
	}
	if err := checkDecl(field, params); err != nil {
		return nil, err
	}
	sc := &scope{field: field, params: params}
	tree, used, err := parse(src, sc)
	if err != nil {
		return nil, err
	}
	e := &Expr{
		field:   field,
		canon:   render(tree),
		root:    lower(tree, params, true),
		depends: tree.field,
	}
	for n := range used {
		e.params = append(e.params, n)
	}
	sort.Strings(e.params)
	if !e.depends && !opts.AllowConstant {
		line, col := firstToken(src)
		return nil, &SyntaxError{Source: src, Line: line, Col: col, Code: CodeConstant,
			Msg: fmt.Sprintf("the expression does not depend on the field %s (it is the constant %s)", field, formatNum(e.root.c))}
	}
	return e, nil
}

// Eval returns the expression and its first three derivatives given the
// jet x of the field. With x = num.Var(v) the derivatives are with respect
// to the field itself; with any other jet — the field as a function of
// another variable — Eval applies the chain rule and the derivatives are
// with respect to that variable. Eval allocates nothing.
//
// Domain problems (log or sqrt of a negative number, division by zero,
// acosh below 1, a non-integer power of a negative base) are not errors:
// they give NaN or ±Inf components, as the underlying math functions do,
// and the caller checks.
func (e *Expr) Eval(x num.Jet) num.Jet { return e.root.eval(x) }

// At returns the expression and its first three derivatives with respect
// to the field at the value x: Eval(num.Var(x)).
func (e *Expr) At(x float64) num.Jet { return e.root.eval(num.Var(x)) }

// Value returns the expression's value at the field value x. It performs
// the same float64 operations as the value component of Eval, so
// Value(x) == At(x).V to the bit, at about a quarter of the cost.
func (e *Expr) Value(x float64) float64 { return e.root.value(x) }

// Field returns the name of the field variable.
func (e *Expr) Field() string { return e.field }

// Params returns the sorted names of the parameters the expression refers
// to (a subset of those passed to Compile).
func (e *Expr) Params() []string { return append([]string(nil), e.params...) }

// DependsOnField reports whether the source refers to the field. The test
// is syntactic: "x - x" depends on the field. It can be false only for an
// expression compiled with Options.AllowConstant.
func (e *Expr) DependsOnField() bool { return e.depends }

// String returns the canonical source text: the parsed expression with
// parameters by name, literals in shortest round-trip form, single spaces
// around + - * / and no redundant parentheses. Compiling it again with the
// same field and parameters yields an expression with the same tree, so
// the same results to the bit; texts that differ only in layout have the
// same canonical text, which makes it suitable for content hashing
// (together with the parameter values).
func (e *Expr) String() string { return e.canon }

// lower turns the syntax tree into an evaluation tree. With fold, subtrees
// free of the field become constants (computed with the same float64
// operations evaluation would use) and constant operands select
// specialised instructions; without, every node is kept, which the tests
// use to check that folding changes nothing.
func lower(t *ast, params map[string]float64, fold bool) *node {
	switch t.kind {
	case aNum, aConst:
		return &node{op: opConst, c: t.val}
	case aParam:
		return &node{op: opConst, c: params[t.name]}
	case aField:
		return &node{op: opField}
	}
	a := lower(t.args[0], params, fold)
	var b *node
	if len(t.args) > 1 {
		b = lower(t.args[1], params, fold)
	}
	if fold && !t.field {
		// The whole subtree is constant and its children are folded.
		return &node{op: opConst, c: foldValue(t, a, b)}
	}
	switch t.kind {
	case aNeg:
		return &node{op: opNeg, a: a}
	case aCall:
		if t.fn.arity == 1 {
			return &node{op: opFunc, a: a, fn: t.fn}
		}
	}
	ac, bc := fold && a.op == opConst, fold && b.op == opConst
	switch t.kind {
	case aAdd:
		switch {
		case ac:
			return &node{op: opAddC, a: b, c: a.c}
		case bc:
			return &node{op: opAddC, a: a, c: b.c}
		}
		return &node{op: opAdd, a: a, b: b}
	case aSub:
		switch {
		case ac:
			return &node{op: opCSub, a: b, c: a.c}
		case bc:
			return &node{op: opAddC, a: a, c: -b.c}
		}
		return &node{op: opSub, a: a, b: b}
	case aMul:
		switch {
		case ac:
			return &node{op: opMulC, a: b, c: a.c}
		case bc:
			return &node{op: opMulC, a: a, c: b.c}
		}
		return &node{op: opMul, a: a, b: b}
	case aDiv:
		switch {
		case ac:
			return &node{op: opCDiv, a: b, c: a.c}
		case bc:
			return &node{op: opDivC, a: a, c: b.c}
		}
		return &node{op: opDiv, a: a, b: b}
	}
	// a^b or pow(a, b).
	switch {
	case !t.args[1].field && bc:
		return &node{op: opPowC, a: a, c: b.c}
	case !t.args[1].field:
		return &node{op: opPowE, a: a, b: b}
	case ac:
		return &node{op: opCPow, a: b, c: detmath.Log(a.c)}
	}
	return &node{op: opPow, a: a, b: b}
}

// foldValue computes a constant interior node from its folded children
// with the operations eval and value would perform on them.
func foldValue(t *ast, a, b *node) float64 {
	switch t.kind {
	case aNeg:
		return -a.c
	case aAdd:
		return a.c + b.c
	case aSub:
		return a.c - b.c
	case aMul:
		return a.c * b.c
	case aDiv:
		return a.c / b.c
	case aPow:
		return powConstF(a.c, b.c)
	}
	if t.fn.arity == 2 { // pow(a, b)
		return powConstF(a.c, b.c)
	}
	return t.fn.flt(a.c)
}
