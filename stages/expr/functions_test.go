package expr

import (
	"math"
	"testing"
)

// closedForm is a function of x with its first three derivatives written
// out by hand (calculus: common practice).
type closedForm struct {
	src    string
	params map[string]float64
	at     []float64
	want   func(x float64) [4]float64
	rel    float64
}

func checkClosedForms(t *testing.T, rows []closedForm) {
	t.Helper()
	for _, r := range rows {
		e := mustCompile(t, r.src, r.params)
		for _, x := range r.at {
			got, want := comps(e.At(x)), r.want(x)
			for k := range got {
				if !within(got[k], want[k], r.rel) {
					t.Errorf("%s at x=%g: derivative %d = %.17g, want %.17g (rel %.1e)", r.src, x, k, got[k], want[k], r.rel)
				}
			}
		}
	}
}

// Each built-in function of the field, against its derivatives in a form
// written independently of the jet rules (e.g. the third derivative of tan through sin and cos).
func TestFunctionDerivatives(t *testing.T) {
	const tight = 1e-13
	checkClosedForms(t, []closedForm{
		{src: "exp(x)", at: []float64{-3, -0.5, 0, 0.7, 5}, rel: tight, want: func(x float64) [4]float64 {
			e := math.Exp(x)
			return [4]float64{e, e, e, e}
		}},
		{src: "log(x)", at: []float64{0.1, 1.5, 7}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Log(x), 1 / x, -1 / (x * x), 2 / (x * x * x)}
		}},
		{src: "sqrt(x)", at: []float64{0.04, 2, 9}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Sqrt(x), 0.5 * math.Pow(x, -0.5), -0.25 * math.Pow(x, -1.5), 0.375 * math.Pow(x, -2.5)}
		}},
		{src: "sin(x)", at: []float64{-1.2, 0.3, 2.5}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Sin(x), math.Cos(x), -math.Sin(x), -math.Cos(x)}
		}},
		{src: "cos(x)", at: []float64{-1.2, 0.3, 2.5}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Cos(x), -math.Sin(x), -math.Cos(x), math.Sin(x)}
		}},
		{src: "tan(x)", at: []float64{-1.1, 0.4, 1.3}, rel: tight, want: func(x float64) [4]float64 {
			s, c := math.Sin(x), math.Cos(x)
			return [4]float64{s / c, 1 / (c * c), 2 * s / (c * c * c), 2 * (1 + 2*s*s) / (c * c * c * c)}
		}},
		{src: "sinh(x)", at: []float64{-2, 0.5, 3}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Sinh(x), math.Cosh(x), math.Sinh(x), math.Cosh(x)}
		}},
		{src: "cosh(x)", at: []float64{-2, 0.5, 3}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Cosh(x), math.Sinh(x), math.Cosh(x), math.Sinh(x)}
		}},
		{src: "tanh(x)", at: []float64{-1.5, 0.2, 2.5, 12}, rel: tight, want: func(x float64) [4]float64 {
			s, c := math.Sinh(x), math.Cosh(x)
			return [4]float64{math.Tanh(x), 1 / (c * c), -2 * s / (c * c * c), (4*s*s - 2) / (c * c * c * c)}
		}},
		{src: "asinh(x)", at: []float64{-2, 0.3, 4}, rel: tight, want: func(x float64) [4]float64 {
			q := 1 + x*x
			return [4]float64{math.Asinh(x), math.Pow(q, -0.5), -x * math.Pow(q, -1.5), (2*x*x - 1) * math.Pow(q, -2.5)}
		}},
		{src: "acosh(x)", at: []float64{1.2, 3, 10}, rel: tight, want: func(x float64) [4]float64 {
			q := (x - 1) * (x + 1)
			return [4]float64{math.Acosh(x), math.Pow(q, -0.5), -x * math.Pow(q, -1.5), (2*x*x + 1) * math.Pow(q, -2.5)}
		}},
		{src: "atanh(x)", at: []float64{-0.7, 0.25, 0.9}, rel: tight, want: func(x float64) [4]float64 {
			q := (1 - x) * (1 + x)
			return [4]float64{math.Atanh(x), 1 / q, 2 * x / (q * q), (2 + 6*x*x) / (q * q * q)}
		}},
		{src: "abs(x)", at: []float64{-2, -0.25}, rel: 0, want: func(x float64) [4]float64 {
			return [4]float64{-x, -1, 0, 0}
		}},
		{src: "abs(x)", at: []float64{0.25, 3}, rel: 0, want: func(x float64) [4]float64 {
			return [4]float64{x, 1, 0, 0}
		}},
	})
}

// The operators and powers, with one or both operands depending on x.
func TestOperatorDerivatives(t *testing.T) {
	const tight = 1e-13
	ln2 := math.Ln2
	checkClosedForms(t, []closedForm{
		{src: "x + 2.5", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x + 2.5, 1, 0, 0} }},
		{src: "2.5 + x", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x + 2.5, 1, 0, 0} }},
		{src: "x - 2.5", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x - 2.5, 1, 0, 0} }},
		{src: "2.5 - x", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{2.5 - x, -1, 0, 0} }},
		{src: "-x", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{-x, -1, 0, 0} }},
		{src: "3 * x", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{3 * x, 3, 0, 0} }},
		{src: "x / 4", at: []float64{-1, 3}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x / 4, 0.25, 0, 0} }},
		{src: "pi * x", at: []float64{2}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{math.Pi * x, math.Pi, 0, 0} }},
		{src: "-(x * x)", at: []float64{-1.5, 2}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{-x * x, -2 * x, -2, 0} }},
		{src: "x * x * x", at: []float64{-1.5, 0.5, 2}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{x * x * x, 3 * x * x, 6 * x, 6}
		}},
		{src: "x * sin(x)", at: []float64{-1, 0.6, 2}, rel: tight, want: func(x float64) [4]float64 {
			s, c := math.Sin(x), math.Cos(x)
			return [4]float64{x * s, s + x*c, 2*c - x*s, -3*s - x*c}
		}},
		// sin x cos x = sin(2x)/2.
		{src: "sin(x) * cos(x)", at: []float64{-1, 0.3, 1.2}, rel: tight, want: func(x float64) [4]float64 {
			s, c := math.Sin(2*x), math.Cos(2*x)
			return [4]float64{s / 2, c, -2 * s, -4 * c}
		}},
		// (x+1)/(x-1) = 1 + 2/(x-1).
		{src: "(x + 1) / (x - 1)", at: []float64{-3, 0.5, 4}, rel: tight, want: func(x float64) [4]float64 {
			u := x - 1
			return [4]float64{1 + 2/u, -2 / (u * u), 4 / (u * u * u), -12 / (u * u * u * u)}
		}},
		{src: "3 / x", at: []float64{-2, 0.5, 7}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{3 / x, -3 / (x * x), 6 / (x * x * x), -18 / (x * x * x * x)}
		}},
		// sin/cos through the general quotient rule is tan.
		{src: "sin(x) / cos(x)", at: []float64{-1.1, 0.4, 1.3}, rel: tight, want: func(x float64) [4]float64 {
			s, c := math.Sin(x), math.Cos(x)
			return [4]float64{s / c, 1 / (c * c), 2 * s / (c * c * c), 2 * (1 + 2*s*s) / (c * c * c * c)}
		}},
		{src: "x^0", at: []float64{-1.5, 0, 2}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{1, 0, 0, 0} }},
		{src: "x^1", at: []float64{-1.5, 0, 2}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x, 1, 0, 0} }},
		{src: "x^(2^0) * 2^0", at: []float64{-1.5, 2}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x, 1, 0, 0} }},
		{src: "x^2", at: []float64{-1.5, 0, 2}, rel: 0, want: func(x float64) [4]float64 { return [4]float64{x * x, 2 * x, 2, 0} }},
		{src: "x^3", at: []float64{-1.5, 0, 2}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{x * x * x, 3 * x * x, 6 * x, 6}
		}},
		{src: "pow(x, 4)", at: []float64{-1.5, 0.5, 2}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{x * x * x * x, 4 * x * x * x, 12 * x * x, 24 * x}
		}},
		{src: "x^2.5", at: []float64{0.3, 4}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{math.Pow(x, 2.5), 2.5 * math.Pow(x, 1.5), 3.75 * math.Sqrt(x), 1.875 / math.Sqrt(x)}
		}},
		{src: "x^-2", at: []float64{-3, 0.5, 2}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{1 / (x * x), -2 / (x * x * x), 6 / (x * x * x * x), -24 / (x * x * x * x * x)}
		}},
		// A constant exponent built from parameters is still constant.
		{src: "x^(n/2)", params: map[string]float64{"n": 6}, at: []float64{-1.5, 2}, rel: tight, want: func(x float64) [4]float64 {
			return [4]float64{x * x * x, 3 * x * x, 6 * x, 6}
		}},
		// Tiny bases whose power underflows keep their lower-order terms.
		{src: "x^3", at: []float64{1e-110}, rel: tight, want: func(x float64) [4]float64 { return [4]float64{0, 3e-220, 6e-110, 6} }},
		{src: "x^4", at: []float64{-1e-100}, rel: tight, want: func(x float64) [4]float64 { return [4]float64{0, -4e-300, 12e-200, -24e-100} }},
		{src: "2^x", at: []float64{-2, 0.5, 3}, rel: tight, want: func(x float64) [4]float64 {
			p := math.Exp2(x)
			return [4]float64{p, p * ln2, p * ln2 * ln2, p * ln2 * ln2 * ln2}
		}},
		// x^x = exp(x log x).
		{src: "x^x", at: []float64{0.3, 1.7, 3}, rel: tight, want: func(x float64) [4]float64 {
			p, l := math.Pow(x, x), math.Log(x)+1
			return [4]float64{p, p * l, p * (l*l + 1/x), p * (l*l*l + 3*l/x - 1/(x*x))}
		}},
		{src: "pow(x, x)", at: []float64{0.3, 1.7}, rel: tight, want: func(x float64) [4]float64 {
			p, l := math.Pow(x, x), math.Log(x)+1
			return [4]float64{p, p * l, p * (l*l + 1/x), p * (l*l*l + 3*l/x - 1/(x*x))}
		}},
	})
}

// Division returns the correctly rounded quotient (a times the rounded
// reciprocal would give 0.9999999999999999 for 49/49).
func TestDivisionIsCorrectlyRounded(t *testing.T) {
	e := mustCompile(t, "x / y", map[string]float64{"y": 49})
	f := mustCompile(t, "y / x", map[string]float64{"y": 49})
	// x^0 refers to x, so this denominator is not folded: the general rule.
	g := mustCompile(t, "x / (x^0 * 49)", nil)
	for _, ex := range []*Expr{e, f, g} {
		if v := ex.Value(49); v != 1 {
			t.Errorf("%s at 49 = %.17g, want 1", ex, v)
		}
		if v := ex.At(49).V; v != 1 {
			t.Errorf("%s At(49).V = %.17g, want 1", ex, v)
		}
	}
	h := mustCompile(t, "x / (x - 48)", nil)
	if v := h.At(98).V; v != 98.0/50 {
		t.Errorf("x/(x-48) at 98 = %.17g, want %.17g", v, 98.0/50)
	}
}
