package expr

import (
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// div returns a/b by the quotient rule, solving a = q b order by order:
//
//	q'   = (a'   - q b')                    / b
//	q''  = (a''  - 2 q' b'  - q b'')         / b
//	q''' = (a''' - 3 q'' b' - 3 q' b'' - q b''') / b
//
// Unlike num.Div, which multiplies by the reciprocal, the value is the
// correctly rounded a.V/b.V, so x/49 at x = 49 is exactly 1.
func div(a, b num.Jet) num.Jet {
	q := a.V / b.V
	q1 := (a.D1 - float64(q*b.D1)) / b.V
	q2 := (a.D2 - float64(float64(2*q1)*b.D1) - float64(q*b.D2)) / b.V
	q3 := (a.D3 - float64(float64(3*q2)*b.D1) - float64(float64(3*q1)*b.D2) - float64(q*b.D3)) / b.V
	return num.Jet{V: q, D1: q1, D2: q2, D3: q3}
}

// divConst returns a/c for a constant c, component by component.
func divConst(a num.Jet, c float64) num.Jet {
	return num.Jet{V: a.V / c, D1: a.D1 / c, D2: a.D2 / c, D3: a.D3 / c}
}

// subFromConst returns c - a for a constant c.
func subFromConst(c float64, a num.Jet) num.Jet {
	return num.Jet{V: c - a.V, D1: -a.D1, D2: -a.D2, D3: -a.D3}
}

// powConst returns a^p for a constant p, with the monomial rule
//
//	(x^p)' = p x^(p-1),  (x^p)'' = p (p-1) x^(p-2),  (x^p)''' = p (p-1) (p-2) x^(p-3)
//
// each from its own math.Pow. num.PowConst obtains the derivatives by
// dividing x^p by x repeatedly, which loses them when x^p underflows
// (x^3 at x = 1e-110 gives a third derivative of 0 instead of 6). The
// cases p = 0, 1, 2 are exact as in num.PowConst. For x < 0 and
// non-integer p the result is NaN, as for math.Pow.
func powConst(a num.Jet, p float64) num.Jet {
	switch p {
	case 0:
		return num.Const(1)
	case 1:
		return a
	case 2:
		return num.Mul(a, a)
	}
	x := a.V
	f0 := detmath.Pow(x, p)
	f1 := p * detmath.Pow(x, p-1)
	f2 := p * ((p - 1) * detmath.Pow(x, p-2))
	f3 := p * ((p - 1) * ((p - 2) * detmath.Pow(x, p-3)))
	return num.Compose(a, f0, f1, f2, f3)
}

// powConstF is the value of powConst.
func powConstF(x, p float64) float64 {
	switch p {
	case 0:
		return 1
	case 1:
		return x
	case 2:
		return x * x
	}
	return detmath.Pow(x, p)
}

// powJet returns a^b for a non-constant exponent as exp(b log a), which is
// NaN for a < 0 whatever b.
func powJet(a, b num.Jet) num.Jet { return num.Exp(num.Mul(b, num.Log(a))) }

// powF is the value of powJet.
func powF(a, b float64) float64 { return detmath.Exp(b * detmath.Log(a)) }
