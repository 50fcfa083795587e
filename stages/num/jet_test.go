package num

import (
	"math"
	"testing"
)

// closedForm is a function with its first three derivatives written out by
// hand.
type closedForm struct {
	name string
	jet  func(Jet) Jet // the function built from the package's jets
	f    func(x float64) [4]float64
	xs   []float64 // evaluation points, away from singularities
	// rel is the relative tolerance of the jet against the closed form:
	// a few roundings per derivative, so a few 1e-15 for the elementary
	// functions and somewhat more for compositions.
	rel float64
}

// Derivatives of the elementary functions: Abramowitz & Stegun 1964,
// "Handbook of Mathematical Functions", ch. 4 (first derivatives of the
// exponential, logarithm, trigonometric, hyperbolic and inverse hyperbolic
// functions; equation numbers from memory). The second and third
// derivatives below are derived here by differentiating those first
// derivatives; the finite-difference test cross-checks every one of them.
var elementary = []closedForm{
	{"Exp", Exp, func(x float64) [4]float64 {
		e := math.Exp(x)
		return [4]float64{e, e, e, e}
	}, []float64{-3, 0, 0.7, 5}, 4e-16},
	{"Log", Log, func(x float64) [4]float64 {
		return [4]float64{math.Log(x), 1 / x, -1 / (x * x), 2 / (x * x * x)}
	}, []float64{0.3, 2, 7.5}, 4e-16},
	{"Sqrt", Sqrt, func(x float64) [4]float64 {
		return [4]float64{math.Sqrt(x), 0.5 * math.Pow(x, -0.5), -0.25 * math.Pow(x, -1.5), 0.375 * math.Pow(x, -2.5)}
	}, []float64{0.04, 1, 9, 30}, 2e-15},
	{"Recip", Recip, func(x float64) [4]float64 {
		return [4]float64{1 / x, -math.Pow(x, -2), 2 * math.Pow(x, -3), -6 * math.Pow(x, -4)}
	}, []float64{-2, 0.5, 3}, 2e-15},
	{"Sin", Sin, func(x float64) [4]float64 {
		return [4]float64{math.Sin(x), math.Cos(x), -math.Sin(x), -math.Cos(x)}
	}, []float64{-1.2, 0.3, 1.4, 4}, 4e-16},
	{"Cos", Cos, func(x float64) [4]float64 {
		return [4]float64{math.Cos(x), -math.Sin(x), -math.Cos(x), math.Sin(x)}
	}, []float64{-1.2, 0.3, 1.4, 4}, 4e-16},
	// tan' = sec^2, tan'' = 2 sec^2 tan, tan''' = 2 sec^2 (sec^2 + 2 tan^2).
	{"Tan", Tan, func(x float64) [4]float64 {
		c := math.Cos(x)
		sec2 := 1 / (c * c)
		t := math.Tan(x)
		return [4]float64{t, sec2, 2 * sec2 * t, 2 * sec2 * (sec2 + 2*t*t)}
	}, []float64{-1.2, 0.3, 1.4}, 4e-15},
	{"Sinh", Sinh, func(x float64) [4]float64 {
		return [4]float64{math.Sinh(x), math.Cosh(x), math.Sinh(x), math.Cosh(x)}
	}, []float64{-2, 0.5, 3}, 4e-16},
	{"Cosh", Cosh, func(x float64) [4]float64 {
		return [4]float64{math.Cosh(x), math.Sinh(x), math.Cosh(x), math.Sinh(x)}
	}, []float64{-2, 0.5, 3}, 4e-16},
	// tanh' = sech^2, tanh'' = -2 sech^2 tanh, tanh''' = sech^2 (4 tanh^2 - 2 sech^2).
	// x = 15 is on the plateau, where 1 - tanh^2 would lose every digit.
	{"Tanh", Tanh, func(x float64) [4]float64 {
		t := math.Tanh(x)
		c := math.Cosh(x)
		s := 1 / (c * c)
		return [4]float64{t, s, -2 * s * t, s * (4*t*t - 2*s)}
	}, []float64{-2, 0.5, 3, 15}, 4e-15},
	// asinh' = (1+x^2)^(-1/2), asinh'' = -x (1+x^2)^(-3/2), asinh''' = (2x^2-1)(1+x^2)^(-5/2).
	{"Asinh", Asinh, func(x float64) [4]float64 {
		q := 1 + x*x
		return [4]float64{math.Asinh(x), math.Pow(q, -0.5), -x * math.Pow(q, -1.5), (2*x*x - 1) * math.Pow(q, -2.5)}
	}, []float64{-3, 0.2, 5}, 4e-15},
	// acosh' = ((x-1)(x+1))^(-1/2), acosh'' = -x (x^2-1)^(-3/2), acosh''' = (2x^2+1)(x^2-1)^(-5/2).
	{"Acosh", Acosh, func(x float64) [4]float64 {
		q := (x - 1) * (x + 1)
		return [4]float64{math.Acosh(x), 1 / (math.Sqrt(x-1) * math.Sqrt(x+1)), -x * math.Pow(q, -1.5), (2*x*x + 1) * math.Pow(q, -2.5)}
	}, []float64{1.1, 2, 10}, 4e-15},
	// atanh' = 1/(1-x^2), atanh'' = 2x/(1-x^2)^2, atanh''' = (2+6x^2)/(1-x^2)^3.
	{"Atanh", Atanh, func(x float64) [4]float64 {
		q := (1 - x) * (1 + x)
		return [4]float64{math.Atanh(x), 1 / q, 2 * x / (q * q), (2 + 6*x*x) / (q * q * q)}
	}, []float64{-0.9, 0.1, 0.7}, 4e-15},
	{"Abs", Abs, func(x float64) [4]float64 {
		s := math.Copysign(1, x)
		return [4]float64{math.Abs(x), s, 0, 0}
	}, []float64{-2, 3}, 0},
}

// The monomial rule d/dx x^p = p x^(p-1) (Abramowitz & Stegun 1964, 3.3.x;
// common practice), applied three times.
func powerRule(p float64) func(float64) [4]float64 {
	return func(x float64) [4]float64 {
		return [4]float64{math.Pow(x, p), p * math.Pow(x, p-1), p * (p - 1) * math.Pow(x, p-2), p * (p - 1) * (p - 2) * math.Pow(x, p-3)}
	}
}

var powers = []closedForm{
	{"PowConst 2.5", func(a Jet) Jet { return PowConst(a, 2.5) }, powerRule(2.5), []float64{0.5, 2, 7}, 4e-15},
	{"PowConst -1.5", func(a Jet) Jet { return PowConst(a, -1.5) }, powerRule(-1.5), []float64{0.5, 2, 7}, 4e-15},
	{"PowConst 2/3", func(a Jet) Jet { return PowConst(a, 2.0/3) }, powerRule(2.0 / 3), []float64{0.01, 1.3, 40}, 4e-15},
	{"PowConst 2", func(a Jet) Jet { return PowConst(a, 2) }, func(x float64) [4]float64 { return [4]float64{x * x, 2 * x, 2, 0} }, []float64{-3, 0, 0.5, 2}, 0},
	{"PowConst 1", func(a Jet) Jet { return PowConst(a, 1) }, powerRule(1), []float64{-3, 0.5, 2}, 0},
	{"PowConst 0", func(a Jet) Jet { return PowConst(a, 0) }, func(x float64) [4]float64 { return [4]float64{1, 0, 0, 0} }, []float64{-3, 0.5, 2}, 0},
	{"PowConst 3", func(a Jet) Jet { return PowConst(a, 3) }, func(x float64) [4]float64 { return [4]float64{x * x * x, 3 * x * x, 6 * x, 6} }, []float64{-2, 0, 0.5, 2}, 4e-15},
	{"PowConst 4", func(a Jet) Jet { return PowConst(a, 4) }, powerRule(4), []float64{-2, 0.5, 2}, 4e-15},
	{"Pow const exponent", func(a Jet) Jet { return Pow(a, Const(2.5)) }, powerRule(2.5), []float64{0.5, 2}, 4e-15},
	// x^x: (x^x)' = x^x (ln x + 1), (x^x)'' = x^x ((ln x + 1)^2 + 1/x),
	// (x^x)''' = x^x ((ln x + 1)^3 + 3 (ln x + 1)/x - 1/x^2) (derived here).
	{"Pow x^x", func(a Jet) Jet { return Pow(a, a) }, func(x float64) [4]float64 {
		f := math.Pow(x, x)
		l := math.Log(x) + 1
		return [4]float64{f, f * l, f * (l*l + 1/x), f * (l*l*l + 3*l/x - 1/(x*x))}
	}, []float64{0.5, 1.5, 3}, 1e-14},
}

// Compositions and arithmetic, checking the Leibniz and Faà di Bruno rules
// with non-trivial inner jets. Closed forms derived here by hand.
var composites = []closedForm{
	// e^(sin x): ' = cos e^s, '' = (cos^2 - sin) e^s, ''' = (cos^3 - 3 sin cos - cos) e^s.
	{"Exp(Sin)", func(a Jet) Jet { return Exp(Sin(a)) }, func(x float64) [4]float64 {
		s, c := math.Sin(x), math.Cos(x)
		e := math.Exp(s)
		return [4]float64{e, c * e, (c*c - s) * e, (c*c*c - 3*s*c - c) * e}
	}, []float64{-1, 0.4, 2.5}, 1e-14},
	// e^x sin x: ' = e^x (sin + cos), '' = 2 e^x cos, ''' = 2 e^x (cos - sin).
	{"Mul(Exp,Sin)", func(a Jet) Jet { return Mul(Exp(a), Sin(a)) }, func(x float64) [4]float64 {
		s, c := math.Sin(x), math.Cos(x)
		e := math.Exp(x)
		return [4]float64{e * s, e * (s + c), 2 * e * c, 2 * e * (c - s)}
	}, []float64{-1, 0.4, 2.5}, 1e-14},
	// x/(1+x^2): ' = (1-x^2)/(1+x^2)^2, '' = 2x(x^2-3)/(1+x^2)^3, ''' = -6(x^4-6x^2+1)/(1+x^2)^4.
	{"Div", func(a Jet) Jet { return Div(a, AddConst(Mul(a, a), 1)) }, func(x float64) [4]float64 {
		q := 1 + x*x
		return [4]float64{x / q, (1 - x*x) / (q * q), 2 * x * (x*x - 3) / (q * q * q), -6 * (x*x*x*x - 6*x*x + 1) / (q * q * q * q)}
	}, []float64{-2, 0.3, 1.7}, 5e-14}, // x = 1.7 is near the zero of x^2 - 3: cancellation
	// 3 e^x + sin x - 2 (linear operations).
	{"Add/Sub/Neg/Scale/AddConst", func(a Jet) Jet { return Sub(Scale(3, Exp(a)), AddConst(Neg(Sin(a)), 2)) }, func(x float64) [4]float64 {
		e, s, c := math.Exp(x), math.Sin(x), math.Cos(x)
		return [4]float64{3*e + s - 2, 3*e + c, 3*e - s, 3*e - c}
	}, []float64{-1, 0.4, 2.5}, 1e-14},
	{"Add", func(a Jet) Jet { return Add(Exp(a), Cos(a)) }, func(x float64) [4]float64 {
		e, s, c := math.Exp(x), math.Sin(x), math.Cos(x)
		return [4]float64{e + c, e - s, e - c, e + s}
	}, []float64{-1, 0.4, 2.5}, 1e-14},
	// ln cosh x: ' = tanh, '' = sech^2, ''' = -2 sech^2 tanh.
	{"Log(Cosh)", func(a Jet) Jet { return Log(Cosh(a)) }, func(x float64) [4]float64 {
		t := math.Tanh(x)
		c := math.Cosh(x)
		s := 1 / (c * c)
		return [4]float64{math.Log(c), t, s, -2 * s * t}
	}, []float64{-1.5, 0.5, 1.2}, 1e-14}, // the jet forms sech^2 as 1 - tanh^2 here, so |x| stays small
	// tanh^2(x/s), the t-model shape: ' = 2 T S/s, '' = 2 S (S - 2 T^2)/s^2,
	// ''' = 8 T S (3 T^2 - 2)/s^3 with T = tanh(x/s), S = sech^2(x/s).
	{"PowConst(Tanh(Scale))", func(a Jet) Jet { return PowConst(Tanh(Scale(1/2.5, a)), 2) }, func(x float64) [4]float64 {
		s := 2.5
		T := math.Tanh(x / s)
		c := math.Cosh(x / s)
		S := 1 / (c * c)
		return [4]float64{T * T, 2 * T * S / s, 2 * S * (S - 2*T*T) / (s * s), 8 * T * S * (3*T*T - 2) / (s * s * s)}
	}, []float64{0.5, 3, 12}, 1e-14},
}

func allClosedForms() []closedForm {
	var all []closedForm
	all = append(all, elementary...)
	all = append(all, powers...)
	all = append(all, composites...)
	return all
}

// TestJetAgainstClosedForms compares each jet's value and three
// derivatives with the hand-written closed forms above.
func TestJetAgainstClosedForms(t *testing.T) {
	for _, c := range allClosedForms() {
		for _, x := range c.xs {
			got := c.jet(Var(x))
			want := c.f(x)
			for k, g := range [4]float64{got.V, got.D1, got.D2, got.D3} {
				// Exact zeros in the closed form must come out as zero
				// to rounding of the largest term.
				abs := 0.0
				if want[k] == 0 {
					abs = 1e-15 * math.Max(1, math.Abs(want[0]))
				}
				if !within(g, want[k], c.rel, abs) {
					t.Errorf("%s at x=%g: derivative %d = %.17g, want %.17g (rel tol %g)", c.name, x, k, g, want[k], c.rel)
				}
			}
		}
	}
}

// TestClosedFormsByFiniteDifferences cross-checks the hand-written closed
// forms (not the jets) with fourth-order central differences of the value,
// so that a slip in a derivation above cannot hide a matching slip in the
// code. Tolerances reflect the stencils' truncation (h^4) and rounding
// (eps/h^k) errors at h = 2e-3 min(1, max(0.05, |x|)), or 1e-4 next to a
// pole or branch point, relative to max(1, |f|, |f^(k)|).
func TestClosedFormsByFiniteDifferences(t *testing.T) {
	for _, c := range allClosedForms() {
		if c.name == "Abs" {
			continue // the closed form is piecewise; nothing to difference
		}
		for _, x := range c.xs {
			h := 2e-3 * math.Max(0.05, math.Min(1, math.Abs(x)))
			if c.name == "Atanh" || c.name == "Acosh" || c.name == "Tan" {
				h = 1e-4 // close to a branch point or pole
			}
			f0 := func(y float64) float64 { return c.f(y)[0] }
			d1, d2, d3 := fd(f0, x, h)
			want := c.f(x)
			scale := math.Max(1, math.Abs(want[0]))
			for k, tol := range map[int]float64{1: 1e-8, 2: 1e-6, 3: 2e-4} {
				got := [4]float64{0, d1, d2, d3}[k]
				s := math.Max(scale, math.Abs(want[k]))
				if math.Abs(got-want[k]) > tol*s {
					t.Errorf("%s at x=%g: closed-form derivative %d = %.12g, finite difference %.12g", c.name, x, k, want[k], got)
				}
			}
		}
	}
}

func TestJetConstructors(t *testing.T) {
	// Definitions (common practice for forward-mode differentiation).
	cases := []struct {
		name      string
		got, want Jet
	}{
		{"Var", Var(2.5), Jet{2.5, 1, 0, 0}},
		{"Const", Const(-4), Jet{-4, 0, 0, 0}},
		{"Mul by Const is Scale", Mul(Const(3), Sin(Var(0.7))), Scale(3, Sin(Var(0.7)))},
		{"AddConst", AddConst(Var(1), 2), Jet{3, 1, 0, 0}},
		{"Compose identity", Compose(Var(0.3), 0.3, 1, 0, 0), Var(0.3)},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %+v, want %+v", c.name, c.got, c.want)
		}
	}
}

// TestPowConstDomain: x^p for x < 0 and non-integer p is NaN, as the doc
// comment promises (as math.Pow; Go specification of math.Pow).
func TestPowConstDomain(t *testing.T) {
	if j := PowConst(Var(-2), 2.5); !math.IsNaN(j.V) {
		t.Errorf("PowConst(-2, 2.5).V = %g, want NaN", j.V)
	}
	// At 0 with p = 3 the monomial rule gives (0, 0, 0, 6).
	if j := PowConst(Var(0), 3); j != (Jet{0, 0, 0, 6}) {
		t.Errorf("PowConst(0, 3) = %+v, want {0 0 0 6}", j)
	}
}
