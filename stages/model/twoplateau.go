package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// twoPlateau is a quintessential alpha-attractor with two plateaus: on the
// Poincaré disk chi^2 < 6 alpha (K = 1/(1 - chi^2/(6 alpha))^2, canonical
// chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha)), Kallosh, Linde & Roest 2013,
// arXiv:1311.0472) the potential is exponential in chi,
//
//	V = V0 e^(-2 gamma) (exp(gamma (1 + chi/sqrt(6 alpha))) - 1),
//
// of the kind studied by Akrami, Kallosh, Linde & Vardanyan 2018 ("Dark
// energy, alpha-attractors, and large-scale structure surveys", JCAP 06
// (2018) 041, arXiv:1712.09693) with their cosmological constant Lambda set
// to 0 (the correspondence of this form to their equations is from
// memory). At phi -> +inf, V -> V0 (1 - e^(-2 gamma)): the inflationary
// plateau, where V ≈ V0 exp(-2 gamma e^(-2u)), u = phi/sqrt(6 alpha), an
// E-model-like plateau with r ≈ 12 alpha/N^2 (the paper's abstract). After
// inflation ends the field falls by e^(-2 gamma) (a kination phase where
// gamma^2 >> 12 alpha) onto the second plateau, a dark-energy tail
// V ≈ 2 gamma V0 e^(-2 gamma) exp(sqrt(2/(3 alpha)) phi) as phi -> -inf.
//
// Asymptotic equation of state (AsymptoticW): on an exponential tail
// V ∝ exp(lambda phi) the scalar-dominated late-time attractor has
// w = -1 + lambda^2/3 when lambda^2 < 6 (Copeland, Liddle & Wands 1998,
// PRD 57, 4686, gr-qc/9711068, from memory); here lambda^2 = 2/(3 alpha),
// so w = -1 + 2/(9 alpha), the abstract's w for its Lambda = 0 models
// (published-values B8, V); for alpha <= 1/9 there is no such attractor.
//
// Range: from u = -(ln(1 + 2 gamma)/2 + 8), well on the tail, to
// u = ln(1 + 2000 gamma/alpha)/2 + 3 on the upper plateau, where
// N ≈ (3 alpha/(4 gamma)) e^(2u) (derived here) exceeds 600. On the tail
// epsilon_V -> 1/(3 alpha): for alpha > 1/3 it falls below 1 again there,
// but that crossing has inflation ahead of it, not behind, so the end of
// inflation is unique. Inflation ends at all only if epsilon_V exceeds 1,
// roughly gamma > sqrt(12 alpha) (max of gamma^2 sech^4 u/(12 alpha),
// derived here) or alpha < 1/3.
var twoPlateau = &Family{
	Name:      "two-plateau",
	Formula:   "V = V0 e^(-2 gamma) (exp(gamma (1 + tanh(phi/sqrt(6 alpha)))) - 1): inflationary plateau at phi -> +inf, dark-energy tail ~ exp(sqrt(2/(3 alpha)) phi) at phi -> -inf",
	Reference: "Akrami, Kallosh, Linde & Vardanyan 2018, JCAP 06 (2018) 041, arXiv:1712.09693",
	Params: []Param{alphaParam,
		{Name: "gamma", Unit: "1", Min: 0, Max: 350, MinOpen: true, Default: noDefault,
			Doc: "log of the drop between the plateaus, V_tail/V_plateau ~ e^(-2 gamma) (at most 350 for float64)"}},
	Kind: KindPlateau,
	Tags: []string{"alpha-attractor", "quintessential", "dark energy"},
	AsymptoticW: func(p map[string]float64) (float64, bool) {
		lambda2 := 2 / (3 * p["alpha"])
		if !(lambda2 < 6) {
			return math.NaN(), false
		}
		return -1 + lambda2/3, true
	},
	build: func(p map[string]float64) (*Model, error) {
		alpha, gamma := p["alpha"], p["gamma"]
		s := math.Sqrt(float64(6 * alpha))
		scale := detmath.Exp(-2 * gamma)
		return &Model{
			Family: "two-plateau", Params: p,
			V: func(phi num.Jet) num.Jet {
				// gamma (1 + tanh u) = 2 gamma/(1 + e^(-2u)), accurate on the tail.
				w := num.Scale(2*gamma, num.Recip(num.AddConst(num.Exp(num.Scale(-2/s, phi)), 1)))
				return num.Scale(scale, expm1(w))
			},
			Lo: float64(-s * (float64(detmath.Log1p(float64(2*gamma))/2) + 8)),
			Hi: float64(s * (float64(detmath.Log1p(float64(2000*gamma)/alpha)/2) + 3)),
			Native: &NativeField{
				Name: "chi", Lo: -s, Hi: s, Origin: 0,
				Kinetic: func(x float64) float64 {
					q := 1 - x*x/(6*alpha)
					return 1 / (q * q)
				},
				V: func(x num.Jet) num.Jet {
					return num.Scale(scale, expm1(num.Scale(gamma, num.AddConst(num.Scale(1/s, x), 1))))
				},
				ToCanonical:   func(x float64) float64 { return s * detmath.Atanh(x/s) },
				FromCanonical: func(phi float64) float64 { return s * detmath.Tanh(phi/s) },
				MapFormula:    "chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha))",
			},
		}, nil
	},
}
