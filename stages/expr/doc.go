// Package expr compiles user-written functions of one field — potentials
// V(x) and kinetic functions K(x) — into evaluators on num.Jet, so that
// the value and its first three derivatives come out exact to rounding
// (forward-mode automatic differentiation), with no finite differences.
//
//	e, err := expr.Compile("tanh(x/sqrt(6*alpha))^2", "x", map[string]float64{"alpha": 1})
//	j := e.At(0.5) // j.V, j.D1, j.D2, j.D3
//
// # Language
//
// The grammar, in EBNF (white space — blanks, tabs, newlines — separates
// tokens and is otherwise ignored):
//
//	Expr    = Term { ( "+" | "-" ) Term } .
//	Term    = Unary { ( "*" | "/" ) Unary } .
//	Unary   = "-" Unary | Power .
//	Power   = Primary [ "^" Unary ] .
//	Primary = Number | Name | Name "(" Expr { "," Expr } ")" | "(" Expr ")" .
//	Number  = ( Digits [ "." [ Digits ] ] | "." Digits ) [ ( "e" | "E" ) [ "+" | "-" ] Digits ] .
//	Digits  = Digit { Digit } .
//	Name    = ( Letter | "_" ) { Letter | Digit | "_" } .
//
// So + and - bind loosest, then * and /, all left-associative (1/2/2 is
// 0.25); unary minus binds tighter than * but looser than ^ (-x^2 is
// -(x^2), 2*-3 is -6); ^ is right-associative and its exponent may carry
// a sign (2^3^2 is 512, x^-2 is 1/x^2). There is no unary plus and no **.
//
// A Name is the field, a parameter, the constant pi, or one of the
// functions exp, log (natural), sqrt, sin, cos, tan, sinh, cosh, tanh,
// asinh, acosh, atanh, abs (one argument each) and pow(a, b), which is
// a^b. Nothing else exists: the language has no assignment, no other
// names, no side effects and nothing to read from — it is a pure
// evaluator of arithmetic. Euler's number is not a constant: "e" is a
// common parameter name and looks like a literal's exponent marker;
// exp(1) spells it. The field and the parameters must be identifiers and
// may not be a function's name or pi, and a parameter may not be named
// like the field, so no name ever shadows another.
//
// # Semantics
//
// Parameters are bound when compiling, and every subtree that does not
// refer to the field is folded to a constant then, with exactly the
// float64 operations evaluation would perform, so folding changes no
// result. Operations with one constant operand use cheaper jet rules
// (c*u scales u); these agree with the general rules to rounding.
//
// a^b and pow(a, b) with b free of the field use the monomial rule
// (x^2 of a negative x is fine; a non-integer power of a negative base is
// NaN). With an exponent that depends on the field they are exp(b log a),
// NaN for a < 0 even when b happens to be an integer. The choice is made
// from the text, not from the values.
//
// Domain problems — log or sqrt of a negative number, division by zero,
// acosh below 1, atanh outside (-1, 1), overflow — are not errors. They
// produce NaN or ±Inf in the jet, as the math package does, and the
// caller checks (math.IsNaN, math.IsInf) where it matters.
//
// By default Compile refuses an expression that does not refer to the
// field (usually a misspelt field name); Options.AllowConstant accepts
// one, for a constant kinetic function. The check is syntactic: x - x
// refers to the field.
//
// # Errors
//
// Problems in the source are *SyntaxError values with a 1-based line and
// column (in code points), a Code for the class, a message, and Caret,
// which renders the line with a caret under the column. Unknown names
// list everything that is allowed; wrong argument counts name the
// function. Problems with the declarations passed in are *DeclError.
//
// # Design
//
// The parser is a hand-written recursive descent over the grammar above,
// one function per rule, with a lexer called on demand so that errors
// come in source order. Its recursion and the depth of the tree are both
// bounded (1000 levels), so hostile text cannot exhaust the stack.
//
// Compiling produces two trees. The syntax tree keeps what the user wrote
// and is printed as the canonical text (Expr.String): literals in shortest
// round-trip form, parameters by name, parentheses only where the tree
// needs them — including a + (b + c), since floating-point addition does
// not associate. The evaluation tree is the syntax tree lowered, with
// constants folded and specialised instructions; Eval walks it
// recursively, a switch per node, passing 32-byte jets by value, so it
// allocates nothing and the Expr is immutable and safe for concurrent
// use. A flat stack machine would need a per-call stack (an allocation, or
// shared mutable state); a tree of closures would run about as fast but
// cannot be inspected, and the tests compare the folded tree with an
// unfolded one built by the same lowering. Value walks the same tree with
// float64s only and performs, by construction, the same operations as the
// value component of Eval, so Value(x) == At(x).V to the bit.
//
// Two jet rules are implemented here instead of taken from num. Division
// uses the quotient rule, so the value is the correctly rounded quotient
// rather than a times the rounded reciprocal (num.Div), and x/49 at 49 is
// exactly 1. Constant powers compute each derivative with its own
// math.Pow, since num.PowConst derives them by dividing x^p by x, which
// loses them when x^p underflows.
//
// Eval accepts any jet for the field, and then applies the chain rule:
// if x(phi) is the field as a function of a canonical field phi, and X is
// its jet in phi, Eval(X) is the jet of V(x(phi)) in phi.
package expr
