package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// hilltopModel is V = V0 (1 - (phi/mu)^q) on 0 < phi < mu, as in the
// hilltop family, and NaN outside [0, mu], where V < 0.
func hilltopModel(family string, p map[string]float64, mu, q float64) *Model {
	return &Model{
		Family: family, Params: p,
		V: onDomain(0, mu, func(phi num.Jet) num.Jet {
			return num.Sub(num.Const(1), num.PowConst(num.Scale(1/mu, phi), q))
		}),
		Lo: 0, Hi: mu,
	}
}

// hilltopQuadratic is the hilltop with p = 2, V = V0 (1 - phi^2/mu^2):
// the same potential as hilltop with p = 2 (Boubekeur & Lyth 2005, JCAP 07
// (2005) 010, hep-ph/0502047), listed under its own name. On 0 < phi < mu
// epsilon_V = 2 phi^2/(mu^4 (1 - phi^2/mu^2)^2) grows monotonically from
// 0 to infinity, so there is one end, and N(phi) grows like
// (mu^2/2) ln(1/phi) towards phi = 0 (derived here), so the range holds
// any number of e-folds. Slow roll needs |eta_V| = 2/mu^2 < 1, mu > sqrt 2;
// for N e-folds the field starts at phi_end e^(-2N/mu^2), which float64 and
// the slow-roll search resolve for mu >~ 2 at N = 55 (derived here).
var hilltopQuadratic = &Family{
	Name:      "hilltop-quadratic",
	Formula:   "V = V0 (1 - phi^2/mu^2), 0 < phi < mu",
	Reference: "Boubekeur & Lyth 2005, JCAP 07 (2005) 010, hep-ph/0502047 (hilltop with p = 2)",
	Params:    []Param{muParam},
	Kind:      KindSmallField,
	Tags:      []string{"hilltop"},
	build: func(p map[string]float64) (*Model, error) {
		return hilltopModel("hilltop-quadratic", p, p["mu"], 2), nil
	},
}

// hilltopQuartic is the hilltop with p = 4, V = V0 (1 - phi^4/mu^4)
// (Boubekeur & Lyth 2005, hep-ph/0502047). epsilon_V =
// 8 phi^6/(mu^8 (1 - phi^4/mu^4)^2) is monotonic on 0 < phi < mu (one end)
// and N(phi) = mu^4/(8 phi^2) - phi^2/8 + const (derived here) diverges at
// phi = 0.
var hilltopQuartic = &Family{
	Name:      "hilltop-quartic",
	Formula:   "V = V0 (1 - phi^4/mu^4), 0 < phi < mu",
	Reference: "Boubekeur & Lyth 2005, JCAP 07 (2005) 010, hep-ph/0502047 (hilltop with p = 4)",
	Params:    []Param{muParam},
	Kind:      KindSmallField,
	Tags:      []string{"hilltop"},
	build: func(p map[string]float64) (*Model, error) {
		return hilltopModel("hilltop-quartic", p, p["mu"], 4), nil
	},
}

// colemanWeinberg is inflation below the vacuum expectation value v of a
// Coleman–Weinberg potential, V = A phi^4 (ln(phi/v) - 1/4) + A v^4/4
// (Coleman & Weinberg 1973, PRD 7, 1888; as the inflaton potential of new
// inflation, Linde 1982, PLB 108, 389, and Albrecht & Steinhardt 1982, PRL
// 48, 1220; this normalisation as in Bostan, Güleryüz & Şenoğuz 2018,
// arXiv:1802.04160, from memory), written with V0 = A v^4/4 and x = phi/v
// as V = V0 (1 + x^4 (4 ln x - 1)). The field rolls from the maximum at
// phi = 0 to the minimum at phi = v, where V = 0; V' = 16 V0 x^3 ln x/v.
// The range is (0, v): epsilon_V rises from 0 at the origin to infinity at
// the minimum, one end; N(phi) diverges like v^2/(32 x^2 |ln x|) at the
// origin (derived here). With t = 4 ln x the potential is
// V = V0 g(t), g(t) = 1 - (1 - t) e^t, evaluated by its series near the
// minimum (t -> 0), where the closed form cancels, so that V keeps full
// relative precision down to the minimum. Beyond the minimum the formula is
// the other branch (inflation above the VEV, a separate model): V is NaN
// outside [0, v].
var colemanWeinberg = &Family{
	Name:      "coleman-weinberg",
	Formula:   "V = V0 (1 + (phi/v)^4 (4 ln(phi/v) - 1)), 0 < phi < v (inflation below the VEV)",
	Reference: "Coleman & Weinberg 1973, PRD 7, 1888; Linde 1982, PLB 108, 389; Albrecht & Steinhardt 1982, PRL 48, 1220; form of Bostan, Güleryüz & Şenoğuz 2018, arXiv:1802.04160",
	Params: []Param{{Name: "v", Unit: "M_p", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
		Doc: "vacuum expectation value of the inflaton (the minimum)"}},
	Kind: KindSmallField,
	Tags: []string{"radiative", "new inflation"},
	build: func(p map[string]float64) (*Model, error) {
		v := p["v"]
		return &Model{
			Family: "coleman-weinberg", Params: p,
			V: onDomain(0, v, func(phi num.Jet) num.Jet {
				return cwG(num.Scale(4, num.Log(num.Scale(1/v, phi))))
			}),
			Lo: 0, Hi: v,
		}, nil
	},
}

// cwG returns g(t) = 1 - (1 - t) e^t with g' = t e^t, g” = (1 + t) e^t and
// g”' = (2 + t) e^t. For |t| < 1/2 the value is summed from its series
// g = sum over k >= 2 of (k - 1) t^k/k! (derived here), which avoids the
// cancellation of the closed form; 30 terms reach rounding.
func cwG(t num.Jet) num.Jet {
	x := t.V
	e := detmath.Exp(x)
	var g float64
	if math.Abs(x) < 0.5 {
		term := x // t^k/k! at k = 1
		for k := 2; k <= 30; k++ {
			term *= x / float64(k)
			g += float64(float64(k-1) * term)
		}
	} else {
		g = 1 - float64((1-x)*e)
	}
	return num.Compose(t, g, x*e, (1+x)*e, (2+x)*e)
}
