package num

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Jet carries a value and its first three derivatives with respect to one
// independent variable. Arithmetic on jets propagates the derivatives
// exactly (forward-mode automatic differentiation, truncated at third
// order), so a potential written once with jets yields V, V', V” and V”'
// to rounding error, with no finite differences.
//
// Composition uses Faà di Bruno's formula to third order:
//
//	(f∘g)'   = f'(g) g'
//	(f∘g)''  = f''(g) g'^2 + f'(g) g''
//	(f∘g)''' = f'''(g) g'^3 + 3 f''(g) g' g'' + f'(g) g'''
type Jet struct {
	V, D1, D2, D3 float64
}

// Var returns the jet of the independent variable at x: (x, 1, 0, 0).
func Var(x float64) Jet { return Jet{V: x, D1: 1} }

// Const returns the jet of a constant c: (c, 0, 0, 0).
func Const(c float64) Jet { return Jet{V: c} }

// Add returns a + b.
func Add(a, b Jet) Jet { return Jet{a.V + b.V, a.D1 + b.D1, a.D2 + b.D2, a.D3 + b.D3} }

// Sub returns a - b.
func Sub(a, b Jet) Jet { return Jet{a.V - b.V, a.D1 - b.D1, a.D2 - b.D2, a.D3 - b.D3} }

// Neg returns -a.
func Neg(a Jet) Jet { return Jet{-a.V, -a.D1, -a.D2, -a.D3} }

// Scale returns c*a for a constant c.
func Scale(c float64, a Jet) Jet {
	return Jet{float64(c * a.V), float64(c * a.D1), float64(c * a.D2), float64(c * a.D3)}
}

// AddConst returns a + c for a constant c.
func AddConst(a Jet, c float64) Jet { a.V += c; return a }

// Mul returns a*b by the Leibniz rule.
func Mul(a, b Jet) Jet {
	return Jet{
		V:  float64(a.V * b.V),
		D1: float64(a.D1*b.V) + float64(a.V*b.D1),
		D2: float64(a.D2*b.V) + float64(float64(2*a.D1)*b.D1) + float64(a.V*b.D2),
		D3: float64(a.D3*b.V) + float64(float64(3*a.D2)*b.D1) + float64(float64(3*a.D1)*b.D2) + float64(a.V*b.D3),
	}
}

// Div returns a/b by the quotient rule, so that the value is the correctly
// rounded a.V/b.V (a.V * (1/b.V) is not: 49 * (1/49) != 1):
//
//	q = a/b, q1 = (a1 - q b1)/b, q2 = (a2 - 2 q1 b1 - q b2)/b,
//	q3 = (a3 - 3 q2 b1 - 3 q1 b2 - q b3)/b,
//
// with a1, a2, a3 the derivatives of a (and likewise for b and q).
func Div(a, b Jet) Jet {
	q := a.V / b.V
	q1 := (a.D1 - float64(q*b.D1)) / b.V
	q2 := (a.D2 - float64(float64(2*q1)*b.D1) - float64(q*b.D2)) / b.V
	q3 := (a.D3 - float64(float64(3*q2)*b.D1) - float64(float64(3*q1)*b.D2) - float64(q*b.D3)) / b.V
	return Jet{q, q1, q2, q3}
}

// Compose applies a scalar function f to the jet g, given f and its first
// three derivatives evaluated at g.V.
func Compose(g Jet, f0, f1, f2, f3 float64) Jet {
	return Jet{
		V:  f0,
		D1: float64(f1 * g.D1),
		D2: float64(float64(f2*g.D1)*g.D1) + float64(f1*g.D2),
		D3: float64(float64(float64(f3*g.D1)*g.D1)*g.D1) + float64(float64(float64(3*f2)*g.D1)*g.D2) + float64(f1*g.D3),
	}
}

// Recip returns 1/a.
func Recip(a Jet) Jet {
	r := 1 / a.V
	return Compose(a, r, float64(-r*r), float64(float64(float64(2*r)*r)*r), float64(float64(float64(float64(-6*r)*r)*r)*r))
}

// Exp returns exp(a).
func Exp(a Jet) Jet {
	e := detmath.Exp(a.V)
	return Compose(a, e, e, e, e)
}

// Log returns the natural logarithm of a.
func Log(a Jet) Jet {
	r := 1 / a.V
	return Compose(a, detmath.Log(a.V), r, float64(-r*r), float64(float64(float64(2*r)*r)*r))
}

// Sqrt returns the square root of a.
func Sqrt(a Jet) Jet {
	s := math.Sqrt(a.V)
	return Compose(a, s, 0.5/s, -0.25/(float64(s*a.V)), 0.375/(float64(float64(s*a.V)*a.V)))
}

// PowConst returns a^p for a constant exponent p. For a.V <= 0 with a
// non-integer p the result is NaN, as for math.Pow.
func PowConst(a Jet, p float64) Jet {
	switch p {
	case 0:
		return Const(1)
	case 1:
		return a
	case 2:
		return Mul(a, a)
	}
	x := a.V
	if x == 0 {
		// Derivatives of x^p at 0 by the monomial rule, finite for p >= 3
		// or integer p; math.Pow handles the signs of the other cases.
		return Compose(a, detmath.Pow(0, p), float64(p*detmath.Pow(0, p-1)), float64(float64(p*(p-1))*detmath.Pow(0, p-2)), float64(float64(float64(p*(p-1))*(p-2))*detmath.Pow(0, p-3)))
	}
	f0 := detmath.Pow(x, p)
	if f0 == 0 || math.Abs(f0) < 0x1p-1000 || math.IsInf(f0, 0) {
		// x^p under- or overflows: dividing it by x would lose the
		// derivatives, which may still be representable.
		return Compose(a, f0, float64(p*detmath.Pow(x, p-1)), float64(float64(p*(p-1))*detmath.Pow(x, p-2)), float64(float64(float64(p*(p-1))*(p-2))*detmath.Pow(x, p-3)))
	}
	f1 := float64(p*f0) / x
	f2 := float64((p-1)*f1) / x
	f3 := float64((p-2)*f2) / x
	return Compose(a, f0, f1, f2, f3)
}

// Pow returns a^b for jets a > 0 and b, as exp(b log a).
func Pow(a, b Jet) Jet {
	if b.D1 == 0 && b.D2 == 0 && b.D3 == 0 {
		return PowConst(a, b.V)
	}
	return Exp(Mul(b, Log(a)))
}

// Sin returns sin(a).
func Sin(a Jet) Jet {
	s, c := detmath.Sincos(a.V)
	return Compose(a, s, c, -s, -c)
}

// Cos returns cos(a).
func Cos(a Jet) Jet {
	s, c := detmath.Sincos(a.V)
	return Compose(a, c, -s, -c, s)
}

// Tan returns tan(a).
func Tan(a Jet) Jet {
	t := detmath.Tan(a.V)
	s := 1 + float64(t*t) // sec^2
	return Compose(a, t, s, float64(float64(2*t)*s), float64(float64(2*s)*(1+float64(float64(3*t)*t))))
}

// Sinh returns sinh(a).
func Sinh(a Jet) Jet {
	s, c := detmath.Sinh(a.V), detmath.Cosh(a.V)
	return Compose(a, s, c, s, c)
}

// Cosh returns cosh(a).
func Cosh(a Jet) Jet {
	s, c := detmath.Sinh(a.V), detmath.Cosh(a.V)
	return Compose(a, c, s, c, s)
}

// Tanh returns tanh(a).
func Tanh(a Jet) Jet {
	t := detmath.Tanh(a.V)
	c := detmath.Cosh(a.V)
	s := 1 / (float64(c * c)) // sech^2, not 1-t^2, which cancels on the plateau
	return Compose(a, t, s, float64(float64(-2*t)*s), float64(s*(float64(float64(6*t)*t)-2)))
}

// Asinh returns asinh(a).
func Asinh(a Jet) Jet {
	x := a.V
	q := 1 + float64(x*x)
	r := 1 / math.Sqrt(q)
	return Compose(a, detmath.Asinh(x), r, float64(-x*r)/q, float64((float64(float64(2*x)*x)-1)*r)/(float64(q*q)))
}

// Acosh returns acosh(a) for a >= 1.
func Acosh(a Jet) Jet {
	x := a.V
	q := float64(x*x) - 1
	r := 1 / math.Sqrt(q)
	return Compose(a, detmath.Acosh(x), r, float64(-x*r)/q, float64((float64(float64(2*x)*x)+1)*r)/(float64(q*q)))
}

// Atanh returns atanh(a) for |a| < 1.
func Atanh(a Jet) Jet {
	x := a.V
	q := 1 - float64(x*x)
	return Compose(a, detmath.Atanh(x), 1/q, float64(2*x)/(float64(q*q)), (2+float64(float64(6*x)*x))/(float64(float64(q*q)*q)))
}

// Abs returns |a|; its derivatives at 0 are taken from the right.
func Abs(a Jet) Jet {
	if a.V < 0 {
		return Neg(a)
	}
	return a
}
