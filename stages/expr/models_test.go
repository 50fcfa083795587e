package expr

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// Potentials of the shapes model definitions use, against their
// derivatives worked by hand (calculus: common practice).
func TestModelDerivatives(t *testing.T) {
	const tight = 1e-13
	var rows []closedForm
	for _, alpha := range []float64{0.1, 1, 10} {
		// T-model: V = tanh(s x)^2 with s = 1/sqrt(6 alpha). With t = tanh,
		// S = sech^2 and d/du t = S, d/du S = -2 t S:
		// V' = 2 s t S, V'' = s^2 (2 S^2 - 4 t^2 S), V''' = s^3 (8 t^3 S - 16 t S^2).
		s := 1 / math.Sqrt(6*alpha)
		rows = append(rows, closedForm{
			src: "tanh(x/sqrt(6*alpha))^2", params: map[string]float64{"alpha": alpha},
			at: []float64{-2, 0, 0.3, 1.5, 6}, rel: tight,
			want: func(x float64) [4]float64 {
				u := s * x
				th, c := math.Tanh(u), math.Cosh(u)
				S := 1 / (c * c)
				return [4]float64{th * th, 2 * s * th * S, s * s * (2*S*S - 4*th*th*S), s * s * s * (8*th*th*th*S - 16*th*S*S)}
			},
		})
		// E-model: V = (1 - w)^2 with w = exp(-k x), k = sqrt(2/(3 alpha)),
		// dw/dx = -k w: V' = 2k w(1 - w), V'' = -2k^2 w + 4k^2 w^2,
		// V''' = 2k^3 w - 8k^3 w^2.
		k := math.Sqrt(2 / (3 * alpha))
		rows = append(rows, closedForm{
			src: "(1 - exp(-sqrt(2/(3*alpha))*x))^2", params: map[string]float64{"alpha": alpha},
			at: []float64{-1, 0.4, 2, 8}, rel: tight,
			want: func(x float64) [4]float64 {
				w := math.Exp(-k * x)
				return [4]float64{(1 - w) * (1 - w), 2 * k * w * (1 - w), k * k * (4*w*w - 2*w), k * k * k * (2*w - 8*w*w)}
			},
		})
	}
	// Natural inflation: V = 1 + cos(x/f).
	for _, f := range []float64{1, 5, 20} {
		rows = append(rows, closedForm{
			src: "1 + cos(x/f)", params: map[string]float64{"f": f},
			at: []float64{0.5, 2, 7}, rel: tight,
			want: func(x float64) [4]float64 {
				s, c := math.Sin(x/f), math.Cos(x/f)
				return [4]float64{1 + c, -s / f, -c / (f * f), s / (f * f * f)}
			},
		})
	}
	// Higgs-like potential in the Einstein frame, in the Jordan-frame field:
	// V = (lambda/4) g^2 with g = x^2/(1 + xi x^2) = x^2/D. Then
	// g' = 2x/D^2, g'' = (2 - 6 xi x^2)/D^3, g''' = 24 xi x (xi x^2 - 1)/D^4 and
	// V' = (lambda/2) g g', V'' = (lambda/2)(g'^2 + g g''),
	// V''' = (lambda/2)(3 g' g'' + g g''').
	//
	// Deep on the plateau (xi x^2 >> 1) V'' and V''' are about 2e3 times
	// smaller than the terms of the quotient rule that produce them, so the
	// expression as written loses three digits there (the closed form, checked
	// in exact rational arithmetic, does not): a looser tolerance.
	higgs := []struct {
		xi  float64
		at  []float64
		rel float64
	}{
		{1, []float64{0.003, 0.05, 0.2, 1.5}, tight},
		{1e3, []float64{0.003, 0.05, 0.2}, tight},
		{1e3, []float64{1.5}, 2e-12},
	}
	for _, h := range higgs {
		lambda, xi := 0.13, h.xi
		rows = append(rows, closedForm{
			src: "lambda/4 * x^4 / (1 + xi*x^2)^2", params: map[string]float64{"lambda": lambda, "xi": xi},
			at: h.at, rel: h.rel,
			want: func(x float64) [4]float64 {
				D := 1 + xi*x*x
				g := x * x / D
				g1 := 2 * x / (D * D)
				g2 := (2 - 6*xi*x*x) / (D * D * D)
				g3 := 24 * xi * x * (xi*x*x - 1) / (D * D * D * D)
				return [4]float64{lambda / 4 * g * g, lambda / 2 * g * g1, lambda / 2 * (g1*g1 + g*g2), lambda / 2 * (3*g1*g2 + g*g3)}
			},
		})
	}
	checkClosedForms(t, rows)
}

// The T-model written in its native variable chains to the canonical one:
// with y = tanh(phi/sqrt(6 alpha)) the kinetic function is
// K(y) = 6 alpha/(1 - y^2)^2 and V = y^2. Building the jet of y(phi) from
// K alone — with dy/dphi = K^(-1/2) and, writing K1, K2 for dK/dy, d2K/dy2,
//
//	d2y/dphi2 = -K1/(2 K^2),  d3y/dphi3 = (K1^2/K^3 - K2/(2 K^2)) K^(-1/2)
//
// — and passing it to Eval must give the canonical T-model's jet in phi.
func TestEvalChainsThroughCanonicalMap(t *testing.T) {
	const alpha = 0.7
	params := map[string]float64{"alpha": alpha}
	v, err := Compile("y^2", "y", nil)
	if err != nil {
		t.Fatal(err)
	}
	kin, err := Compile("6*alpha / (1 - y^2)^2", "y", params)
	if err != nil {
		t.Fatal(err)
	}
	canonical := mustCompile(t, "tanh(x/sqrt(6*alpha))^2", params)
	for _, phi := range []float64{-1.5, 0.2, 1, 3} {
		y := math.Tanh(phi / math.Sqrt(6*alpha))
		k := kin.At(y)
		r := 1 / math.Sqrt(k.V)
		Y := num.Jet{
			V:  y,
			D1: r,
			D2: -k.D1 / (2 * k.V * k.V),
			D3: (k.D1*k.D1/(k.V*k.V*k.V) - k.D2/(2*k.V*k.V)) * r,
		}
		got, want := comps(v.Eval(Y)), comps(canonical.At(phi))
		for i := range got {
			if !within(got[i], want[i], 1e-12) {
				t.Errorf("phi=%g: derivative %d via the map = %.17g, canonical %.17g", phi, i, got[i], want[i])
			}
		}
	}
}
