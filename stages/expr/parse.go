package expr

import (
	"fmt"
	"strings"
)

// maxDepth bounds both the parser's recursion and the depth of the syntax
// tree, so that hostile input cannot exhaust the stack. Real potentials
// are a few levels deep; a sum of a thousand terms is not a potential.
const maxDepth = 1000

// astKind is the kind of a syntax-tree node.
type astKind uint8

const (
	aNum   astKind = iota // literal: val
	aField                // the field variable
	aParam                // a parameter: name
	aConst                // a named constant: name, val
	aNeg                  // -args[0]
	aAdd                  // args[0] + args[1]
	aSub                  // args[0] - args[1]
	aMul                  // args[0] * args[1]
	aDiv                  // args[0] / args[1]
	aPow                  // args[0] ^ args[1]
	aCall                 // fn(args...)
)

// ast is a node of the syntax tree, which keeps the structure the user
// wrote (minus redundant parentheses) for printing.
type ast struct {
	kind  astKind
	val   float64
	name  string
	fn    *function
	args  []*ast
	depth int  // 1 for a leaf
	field bool // whether the subtree refers to the field
}

func leaf(kind astKind) *ast { return &ast{kind: kind, depth: 1} }

// parser is a recursive-descent parser with one token of lookahead.
type parser struct {
	lx    *lexer
	sc    *scope
	tok   token
	depth int             // current recursion depth in unary
	used  map[string]bool // parameters referred to
}

// parse parses a complete source text.
func parse(src string, sc *scope) (*ast, map[string]bool, error) {
	p := &parser{lx: newLexer(src), sc: sc, used: map[string]bool{}}
	if err := p.next(); err != nil {
		return nil, nil, err
	}
	if p.tok.kind == tEOF {
		return nil, nil, p.errAt(p.tok, CodeEmpty, "the expression is empty")
	}
	n, err := p.expr()
	if err != nil {
		return nil, nil, err
	}
	switch p.tok.kind {
	case tEOF:
		return n, p.used, nil
	case tRParen:
		return nil, nil, p.errAt(p.tok, CodeUnbalanced, "')' closes no '('")
	}
	return nil, nil, p.errAt(p.tok, CodeUnexpected, "unexpected %s after a complete expression; missing operator?", p.tok.describe())
}

func (p *parser) next() error {
	t, err := p.lx.next()
	if err != nil {
		return err
	}
	p.tok = t
	return nil
}

func (p *parser) errAt(t token, code Code, format string, args ...any) *SyntaxError {
	return &SyntaxError{Source: p.lx.src, Line: t.line, Col: t.col, Code: code, Msg: fmt.Sprintf(format, args...)}
}

// node builds an interior node, enforcing the depth limit at the operator
// token at.
func (p *parser) node(at token, kind astKind, fn *function, args ...*ast) (*ast, error) {
	n := &ast{kind: kind, fn: fn, args: args}
	for _, a := range args {
		n.depth = max(n.depth, a.depth+1)
		n.field = n.field || a.field
	}
	if n.depth > maxDepth {
		return nil, p.errAt(at, CodeTooDeep, "the expression is nested more than %d levels deep", maxDepth)
	}
	return n, nil
}

// expr = term { ("+" | "-") term } .
func (p *parser) expr() (*ast, error) {
	l, err := p.term()
	if err != nil {
		return nil, err
	}
	for p.tok.kind == tPlus || p.tok.kind == tMinus {
		op := p.tok
		if err := p.next(); err != nil {
			return nil, err
		}
		r, err := p.term()
		if err != nil {
			return nil, err
		}
		kind := aAdd
		if op.kind == tMinus {
			kind = aSub
		}
		if l, err = p.node(op, kind, nil, l, r); err != nil {
			return nil, err
		}
	}
	return l, nil
}

// term = unary { ("*" | "/") unary } .
func (p *parser) term() (*ast, error) {
	l, err := p.unary()
	if err != nil {
		return nil, err
	}
	for p.tok.kind == tStar || p.tok.kind == tSlash {
		op := p.tok
		if err := p.next(); err != nil {
			return nil, err
		}
		r, err := p.unary()
		if err != nil {
			return nil, err
		}
		kind := aMul
		if op.kind == tSlash {
			kind = aDiv
		}
		if l, err = p.node(op, kind, nil, l, r); err != nil {
			return nil, err
		}
	}
	return l, nil
}

// unary = "-" unary | power .
//
// Every recursive path of the grammar passes through here, so this is
// where the recursion depth is bounded.
func (p *parser) unary() (*ast, error) {
	p.depth++
	defer func() { p.depth-- }()
	if p.depth > maxDepth {
		return nil, p.errAt(p.tok, CodeTooDeep, "the expression is nested more than %d levels deep", maxDepth)
	}
	if p.tok.kind != tMinus {
		return p.power()
	}
	op := p.tok
	if err := p.next(); err != nil {
		return nil, err
	}
	a, err := p.unary()
	if err != nil {
		return nil, err
	}
	return p.node(op, aNeg, nil, a)
}

// power = primary [ "^" unary ] .
//
// The exponent is a unary, so ^ is right-associative (2^3^2 = 2^9) and
// takes a signed exponent (x^-2), while -x^2 = -(x^2).
func (p *parser) power() (*ast, error) {
	base, err := p.primary()
	if err != nil {
		return nil, err
	}
	if p.tok.kind != tCaret {
		return base, nil
	}
	op := p.tok
	if err := p.next(); err != nil {
		return nil, err
	}
	ex, err := p.unary()
	if err != nil {
		return nil, err
	}
	return p.node(op, aPow, nil, base, ex)
}

// primary = number | name | name "(" args ")" | "(" expr ")" .
func (p *parser) primary() (*ast, error) {
	t := p.tok
	switch t.kind {
	case tNum:
		if err := p.next(); err != nil {
			return nil, err
		}
		n := leaf(aNum)
		n.val = t.val
		return n, nil
	case tName:
		if err := p.next(); err != nil {
			return nil, err
		}
		if p.tok.kind == tLParen {
			return p.call(t)
		}
		return p.name(t)
	case tLParen:
		if err := p.next(); err != nil {
			return nil, err
		}
		n, err := p.expr()
		if err != nil {
			return nil, err
		}
		return n, p.closeParen(t, "")
	}
	msg := "expected an operand, found " + t.describe()
	switch t.kind {
	case tStar:
		msg += " (powers are written ^, not **)"
	case tPlus:
		msg += " (there is no unary plus)"
	}
	return nil, p.errAt(t, CodeUnexpected, "%s", msg)
}

// closeParen consumes the ')' matching the '(' at open; in names the
// construct for messages ("" for a parenthesised expression).
func (p *parser) closeParen(open token, in string) error {
	switch p.tok.kind {
	case tRParen:
		return p.next()
	case tEOF:
		return p.errAt(open, CodeUnbalanced, "this '(' is never closed")
	}
	if in != "" {
		return p.errAt(p.tok, CodeUnexpected, "expected ',' or ')' in the arguments of %s, found %s", in, p.tok.describe())
	}
	return p.errAt(p.tok, CodeUnexpected, "expected an operator or ')', found %s", p.tok.describe())
}

// name resolves a name that is not followed by an argument list.
func (p *parser) name(t token) (*ast, error) {
	switch {
	case t.text == p.sc.field:
		n := leaf(aField)
		n.name, n.field = t.text, true
		return n, nil
	case funcs[t.text] != nil:
		f := funcs[t.text]
		return nil, p.errAt(t, CodeNeedsArgs, "function %s needs %s in parentheses: %s", f.name, argWords(f.arity), f.usage())
	}
	if _, ok := p.sc.params[t.text]; ok {
		p.used[t.text] = true
		n := leaf(aParam)
		n.name = t.text
		return n, nil
	}
	if v, ok := constants[t.text]; ok {
		n := leaf(aConst)
		n.name, n.val = t.text, v
		return n, nil
	}
	return nil, p.errAt(t, CodeUnknownName, "unknown name %q%s; %s", t.text, p.sc.hint(t.text), p.sc.allowed())
}

// call parses the argument list of the function named by t; the current
// token is its '('.
func (p *parser) call(t token) (*ast, error) {
	f := funcs[t.text]
	if f == nil {
		_, isParam := p.sc.params[t.text]
		_, isConst := constants[t.text]
		if isParam || isConst || t.text == p.sc.field {
			return nil, p.errAt(t, CodeNotFunction, "%s is not a function; write %s*(...) for a product", t.text, t.text)
		}
		return nil, p.errAt(t, CodeUnknownName, "unknown function %q%s; the functions are %s", t.text, p.sc.hint(t.text), strings.Join(funcNames(), ", "))
	}
	open := p.tok
	if err := p.next(); err != nil {
		return nil, err
	}
	var args []*ast
	if p.tok.kind != tRParen {
		for {
			a, err := p.expr()
			if err != nil {
				return nil, err
			}
			args = append(args, a)
			if p.tok.kind != tComma {
				break
			}
			if err := p.next(); err != nil {
				return nil, err
			}
		}
	}
	if err := p.closeParen(open, f.name); err != nil {
		return nil, err
	}
	if len(args) != f.arity {
		return nil, p.errAt(t, CodeArity, "function %s takes %s, got %d: %s", f.name, argWords(f.arity), len(args), f.usage())
	}
	return p.node(t, aCall, f, args...)
}

func argWords(n int) string {
	if n == 1 {
		return "1 argument"
	}
	return fmt.Sprintf("%d arguments", n)
}

// usage shows how the function is called, e.g. "pow(a, b)".
func (f *function) usage() string {
	if f.arity == 2 {
		return f.name + "(a, b)"
	}
	return f.name + "(u)"
}
