package expr

import (
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// op is an instruction of the evaluation tree.
type op uint8

const (
	opField op = iota // x
	opConst           // c
	opNeg             // -a
	opAdd             // a + b
	opSub             // a - b
	opMul             // a * b
	opDiv             // a / b
	opAddC            // a + c (also a - c, as a + (-c), which IEEE 754 defines identically)
	opCSub            // c - a
	opMulC            // c * a
	opDivC            // a / c
	opCDiv            // c / a
	opPowC            // a ^ c
	opPowE            // a ^ b with b free of the field, evaluated at run time (unfolded trees only)
	opPow             // a ^ b = exp(b log a)
	opCPow            // c ^ b = exp(b log c), with log c stored in c
	opFunc            // fn(a)
)

// node is a node of the evaluation tree: the syntax tree lowered, with
// constant subtrees folded and constant operands specialised.
type node struct {
	op   op
	a, b *node
	c    float64
	fn   *function
}

// eval returns the jet of the subtree given the jet x of the field. It
// recurses on the tree and allocates nothing.
func (n *node) eval(x num.Jet) num.Jet {
	switch n.op {
	case opField:
		return x
	case opConst:
		return num.Const(n.c)
	case opNeg:
		return num.Neg(n.a.eval(x))
	case opAdd:
		return num.Add(n.a.eval(x), n.b.eval(x))
	case opSub:
		return num.Sub(n.a.eval(x), n.b.eval(x))
	case opMul:
		return num.Mul(n.a.eval(x), n.b.eval(x))
	case opDiv:
		return div(n.a.eval(x), n.b.eval(x))
	case opAddC:
		return num.AddConst(n.a.eval(x), n.c)
	case opCSub:
		return subFromConst(n.c, n.a.eval(x))
	case opMulC:
		return num.Scale(n.c, n.a.eval(x))
	case opDivC:
		return divConst(n.a.eval(x), n.c)
	case opCDiv:
		return div(num.Const(n.c), n.a.eval(x))
	case opPowC:
		return powConst(n.a.eval(x), n.c)
	case opPowE:
		return powConst(n.a.eval(x), n.b.eval(x).V)
	case opPow:
		return powJet(n.a.eval(x), n.b.eval(x))
	case opCPow:
		return num.Exp(num.Scale(n.c, n.a.eval(x)))
	case opFunc:
		return n.fn.jet(n.a.eval(x))
	}
	panic("expr: unknown op") // programmer error: lower built a node eval does not know
}

// value returns the value of the subtree at the field value x, with the
// same float64 operations as the V component of eval.
func (n *node) value(x float64) float64 {
	switch n.op {
	case opField:
		return x
	case opConst:
		return n.c
	case opNeg:
		return -n.a.value(x)
	case opAdd:
		return n.a.value(x) + n.b.value(x)
	case opSub:
		return n.a.value(x) - n.b.value(x)
	case opMul:
		return n.a.value(x) * n.b.value(x)
	case opDiv:
		return n.a.value(x) / n.b.value(x)
	case opAddC:
		return n.a.value(x) + n.c
	case opCSub:
		return n.c - n.a.value(x)
	case opMulC:
		return n.c * n.a.value(x)
	case opDivC:
		return n.a.value(x) / n.c
	case opCDiv:
		return n.c / n.a.value(x)
	case opPowC:
		return powConstF(n.a.value(x), n.c)
	case opPowE:
		return powConstF(n.a.value(x), n.b.value(x))
	case opPow:
		return powF(n.a.value(x), n.b.value(x))
	case opCPow:
		return detmath.Exp(n.c * n.a.value(x))
	case opFunc:
		return n.fn.flt(n.a.value(x))
	}
	panic("expr: unknown op")
}
