package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/kinetic"
	"github.com/inflatrace/inflatrace/stages/num"
)

// higgs is Higgs inflation: the Standard Model Higgs h with non-minimal
// coupling xi h^2 R/2 to gravity (Bezrukov & Shaposhnikov 2008, "The
// Standard Model Higgs boson as the inflaton", PLB 659, 703,
// arXiv:0710.3755). In the Einstein frame, with Omega^2 = 1 + xi h^2 and
// the electroweak vacuum expectation value neglected (M_p = 1),
//
//	V = (lambda/4) h^4/Omega^4,  (dphi/dh)^2 = (Omega^2 + 6 xi^2 h^2)/Omega^4.
//
// The canonical field has no closed-form inverse; it is computed
// numerically (kinetic, via NewNative) on the native domain -inf < h < inf
// with h = 0 at phi = 0.
//
// lambda is not a parameter: it multiplies the whole potential, which
// slow roll does not see, and the reheating stage fixes the overall scale
// V0 from A_s. The potential is therefore written V = V0 h^4/Omega^4 with
// V0 = lambda/4, so lambda = 4 V0 follows from the normalisation (on the
// plateau V -> V0/xi^2; published-values B3: xi/sqrt(lambda) ≈ 47000 for
// N ≈ 58).
//
// Range: 0 < h < h_max with (1 + 6 xi) h_max^2/8 = 600. In slow roll,
// epsilon_V = 8/(h^2 (1 + xi h^2 + 6 xi^2 h^2)) falls monotonically in h
// (one end) and N(h) = (1 + 6 xi) h^2/8 - (3/4) ln(1 + xi h^2) + const
// (both derived here from V_h/V = 4/(h Omega^2)), so the range holds about
// 600 e-folds for every xi. For xi -> 0 the model is lambda phi^4/4; for
// xi >> 1 the plateau is the Starobinsky potential (phi ≈ sqrt(3/2)
// ln(1 + xi h^2), Bezrukov & Shaposhnikov 2008).
var higgs = &Family{
	Name:      "higgs",
	Formula:   "V = V0 h^4/(1 + xi h^2)^2 with (dphi/dh)^2 = (1 + xi h^2 + 6 xi^2 h^2)/(1 + xi h^2)^2 (Einstein frame, V0 = lambda/4); phi computed numerically",
	Reference: "Bezrukov & Shaposhnikov 2008, PLB 659, 703, arXiv:0710.3755; Bezrukov & Shaposhnikov 2014, PLB 734, 249, arXiv:1403.6078",
	Params: []Param{{Name: "xi", Unit: "1", Min: 0, Max: 1e10, MinOpen: true, Default: noDefault,
		Doc: "non-minimal coupling of the Higgs to the Ricci scalar (xi ~ 5e4 sqrt(lambda) for the observed A_s)"}},
	Kind: KindPlateau,
	Tags: []string{"non-minimal coupling", "Standard Model", "numerical canonical map"},
	build: func(p map[string]float64) (*Model, error) {
		xi := p["xi"]
		return NewNative(NativeSpec{
			Family: "higgs", Params: p, Field: "h",
			V: func(h num.Jet) num.Jet {
				h2 := num.Mul(h, h)
				om := num.AddConst(num.Scale(xi, h2), 1)
				return num.Div(num.Mul(h2, h2), num.Mul(om, om))
			},
			K:      higgsKinetic(xi),
			Origin: 0, Lo: math.Inf(-1), Hi: math.Inf(1),
			SearchLo: 0, SearchHi: math.Sqrt(8 * rangeEfolds / (1 + float64(6*xi))), SearchInField: true,
			Kinetic:    &kinetic.Settings{PhiMax: 200},
			MapFormula: NumericalMapFormula + " with K(h) = (1 + xi h^2 + 6 xi^2 h^2)/(1 + xi h^2)^2",
		})
	},
}

// higgsKinetic is K(h) = (1 + xi h^2 + 6 xi^2 h^2)/(1 + xi h^2)^2.
func higgsKinetic(xi float64) func(num.Jet) num.Jet {
	return func(h num.Jet) num.Jet {
		h2 := num.Mul(h, h)
		om := num.AddConst(num.Scale(xi, h2), 1)
		return num.Div(num.Add(om, num.Scale(6*xi*xi, h2)), num.Mul(om, om))
	}
}
