package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// brane is brane inflation, V = V0 (1 - (mu/phi)^p): the attraction of a
// D3-brane and an anti-D3-brane separated by phi, p = 4 in a warped throat
// (Kachru, Kallosh, Linde, Maldacena, McAllister & Trivedi 2003, "Towards
// inflation in string theory", JCAP 10 (2003) 013, hep-th/0308055), and
// p = d - 2 for d transverse dimensions in flat space (Dvali & Tye 1999,
// "Brane inflation", PLB 450, 72, hep-ph/9812483; the power law from
// memory). The field rolls towards the brane collision at phi = mu.
// V'/V = p mu^p/(phi (phi^p - mu^p)) falls monotonically on phi > mu (one
// end), and N(phi) = phi^2 ((phi/mu)^p/(p + 2) - 1/2)/p + const (derived
// here). V is NaN below mu, where it would be negative.
var brane = &Family{
	Name:      "brane",
	Formula:   "V = V0 (1 - (mu/phi)^p), phi > mu",
	Reference: "Kachru, Kallosh, Linde, Maldacena, McAllister & Trivedi 2003, JCAP 10 (2003) 013, hep-th/0308055; Dvali & Tye 1999, PLB 450, 72, hep-ph/9812483",
	Params: []Param{muParam,
		{Name: "p", Unit: "1", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: 4,
			Doc: "power of the brane-antibrane attraction (4 for a D3-brane in a warped throat)"}},
	Kind: KindPlateau,
	Tags: []string{"string theory", "KKLT"},
	build: func(p map[string]float64) (*Model, error) {
		mu, q := p["mu"], p["p"]
		n := func(phi float64) float64 { return phi * phi * (detmath.Pow(phi/mu, q)/(q+2) - 0.5) / q }
		n0 := n(mu)
		return &Model{
			Family: "brane", Params: p,
			V: onDomain(mu, inf, func(phi num.Jet) num.Jet {
				return num.Sub(num.Const(1), num.PowConst(num.Scale(mu, num.Recip(phi)), q))
			}),
			Lo: mu, Hi: reach(func(phi float64) float64 { return n(phi) - n0 }, mu, mu),
		}, nil
	},
}

// exponentialPlateau is V = V0 (1 - exp(-q phi)), the exponential plateau
// of supergravity inflation (Stewart 1995, "Inflation, supergravity and
// superstrings", PRD 51, 6847, hep-ph/9405389; the form from memory). It is
// the e-model with n = 1/2 and alpha = 2/(3 q^2) (Kallosh, Linde & Roest
// 2013, arXiv:1311.0472). epsilon_V = q^2/(2 (e^(q phi) - 1)^2) is
// monotonic (one end, at e^(q phi) = 1 + q/sqrt 2) and
// N(phi) = (e^(q phi) - q phi - 1)/q^2 from phi = 0 (derived here). V is
// computed as -expm1(-q phi), accurate where q phi is small, and is NaN for
// phi < 0, where it would be negative.
var exponentialPlateau = &Family{
	Name:      "exponential-plateau",
	Formula:   "V = V0 (1 - exp(-q phi))",
	Reference: "Stewart 1995, PRD 51, 6847, hep-ph/9405389; Kallosh, Linde & Roest 2013, JHEP 11 (2013) 198, arXiv:1311.0472 (e-model with n = 1/2)",
	Params: []Param{{Name: "q", Unit: "M_p^-1", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
		Doc: "steepness of the exponential"}},
	Kind: KindPlateau,
	Tags: []string{"supergravity"},
	build: func(p map[string]float64) (*Model, error) {
		q := p["q"]
		n := func(phi float64) float64 { return (detmath.Expm1(float64(q*phi)) - float64(q*phi)) / (float64(q * q)) }
		return &Model{
			Family: "exponential-plateau", Params: p,
			V:  onDomain(0, inf, func(phi num.Jet) num.Jet { return num.Neg(expm1(num.Scale(-q, phi))) }),
			Lo: 0, Hi: reach(n, 0, 1/q),
			// V/V' = (e^(q phi) - 1)/q: the e-model's count with b = q,
			// c = 1/q^2.
			Efolds: func(a, b float64) float64 { return plateauEfolds(1/(q*q), q, a, b) },
			// The end e^(q phi) = 1 + q/sqrt(2) of the comment above.
			EpsilonEnd: func() float64 { return detmath.Log1p(q/math.Sqrt2) / q },
		}, nil
	},
}

// loop is loop inflation, V = V0 (1 + alpha ln phi): a flat direction
// lifted by a one-loop radiative correction (Dvali, Shafi & Schaefer 1994,
// "Large scale structure and supersymmetric inflation without fine
// tuning", PRL 73, 1886, hep-ph/9406319, whose abstract gives n = 0.98).
// V vanishes at phi = exp(-1/alpha), the lower end of the range;
// epsilon_V = alpha^2/(2 phi^2 (1 + alpha ln phi)^2) falls monotonically
// above it (one end), and
// N(phi) = phi^2/(2 alpha) + (phi^2/2)(ln phi - 1/2) + const (derived
// here). V is NaN below exp(-1/alpha), where it would be negative.
var loop = &Family{
	Name:      "loop",
	Formula:   "V = V0 (1 + alpha ln(phi/M_p)), phi > exp(-1/alpha)",
	Reference: "Dvali, Shafi & Schaefer 1994, PRL 73, 1886, hep-ph/9406319",
	Params: []Param{{Name: "alpha", Unit: "1", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
		Doc: "coefficient of the one-loop logarithm"}},
	Kind: KindSmallField,
	Tags: []string{"radiative", "supersymmetry"},
	build: func(p map[string]float64) (*Model, error) {
		a := p["alpha"]
		lo := detmath.Exp(-1 / a)
		n := func(phi float64) float64 {
			if phi == 0 {
				return 0 // the limit of phi^2 ln phi
			}
			return float64(phi*phi)/(float64(2*a)) + float64(float64(phi*phi)/2*(detmath.Log(phi)-0.5))
		}
		n0 := n(lo)
		return &Model{
			Family: "loop", Params: p,
			V:  onDomain(lo, inf, func(phi num.Jet) num.Jet { return num.AddConst(num.Scale(a, num.Log(phi)), 1) }),
			Lo: lo, Hi: reach(func(phi float64) float64 { return n(phi) - n0 }, lo, math.Max(lo, 1e-3)),
		}, nil
	},
}

// radionAssistedGauge is radion-assisted gauge inflation, V = V0 phi^2/(alpha + phi^2): a
// gauge (Wilson-line) inflaton whose potential is flattened by a shrinking
// extra dimension (Fairbairn, Lopez Honorez & Tytgat 2003, "Radion assisted
// gauge inflation", PRD 67, 101302, hep-ph/0302160; this single-field form
// from memory). It is quadratic for phi^2 << alpha and a plateau beyond.
// epsilon_V = 2 alpha^2/(phi^2 (alpha + phi^2)^2) falls monotonically (one
// end) and N(phi) = phi^2/4 + phi^4/(8 alpha) from phi = 0 (derived here).
// V is NaN for phi < 0, the mirror image with its own end.
var radionAssistedGauge = &Family{
	Name:      "radion-assisted-gauge",
	Formula:   "V = V0 phi^2/(alpha + phi^2)",
	Reference: "Fairbairn, Lopez Honorez & Tytgat 2003, PRD 67, 101302, hep-ph/0302160",
	Params: []Param{{Name: "alpha", Unit: "M_p^2", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
		Doc: "square of the field scale where the potential turns from quadratic to a plateau"}},
	Kind: KindPlateau,
	Tags: []string{"extra dimensions", "gauge inflation"},
	build: func(p map[string]float64) (*Model, error) {
		a := p["alpha"]
		n := func(phi float64) float64 {
			return float64(float64(phi*phi)/4) + float64(float64(float64(phi*phi)*phi)*phi)/(float64(8*a))
		}
		return &Model{
			Family: "radion-assisted-gauge", Params: p,
			V: onDomain(0, inf, func(phi num.Jet) num.Jet {
				// The derivatives from 1 - alpha/D (no cancellation where
				// phi^2 >> alpha), the value from phi^2/D (none where
				// phi^2 << alpha), D = alpha + phi^2.
				d := num.AddConst(num.Mul(phi, phi), a)
				j := num.Sub(num.Const(1), num.Scale(a, num.Recip(d)))
				j.V = phi.V * phi.V / d.V
				return j
			}),
			Lo: 0, Hi: reach(n, 0, 1),
		}, nil
	},
}
