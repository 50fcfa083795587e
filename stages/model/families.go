package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

var inf = math.Inf(1)
var noDefault = math.NaN()

func init() {
	for _, f := range []*Family{
		tModel, eModel, starobinsky, powerLaw, natural, hilltop,
		hilltopQuadratic, hilltopQuartic, colemanWeinberg,
		brane, exponentialPlateau, loop, radionAssistedGauge,
		higgs, twoPlateau,
	} {
		register(f)
	}
}

var alphaParam = Param{Name: "alpha", Unit: "1", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
	Doc: "alpha-attractor parameter; the Kähler curvature is R_K = -2/(3 alpha)"}

// nParam is bounded by 100: beyond it the monomial's power 2n makes V
// underflow double precision between the end of inflation and the minimum,
// where the exact background still has to run, and n_s, r have long
// reached their n-independent plateau values.
var nParam = Param{Name: "n", Unit: "1", Min: 0, Max: 100, MinOpen: true, Default: 1,
	Doc: "power of the potential's monomial in the native field"}

// tModel is the alpha-attractor T-model, V = V0 tanh^(2n)(phi/sqrt(6 alpha)).
// It is V0 (chi^2/(6 alpha))^n on the Poincaré disk chi^2 < 6 alpha with
// kinetic function K(chi) = 1/(1 - chi^2/(6 alpha))^2, whose canonical map
// is chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha)) (Kallosh & Linde 2013,
// arXiv:1306.5220; Kallosh, Linde & Roest 2013, arXiv:1311.0472).
var tModel = &Family{
	Name:      "t-model",
	Formula:   "V = V0 tanh^(2n)(phi/sqrt(6 alpha)) = V0 (chi^2/(6 alpha))^n on the disk chi^2 < 6 alpha",
	Reference: "Kallosh & Linde 2013, JCAP 07 (2013) 002, arXiv:1306.5220; Kallosh, Linde & Roest 2013, JHEP 11 (2013) 198, arXiv:1311.0472",
	Params:    []Param{alphaParam, nParam},
	Kind:      KindPlateau,
	Tags:      []string{"alpha-attractor", "supergravity"},
	build: func(p map[string]float64) (*Model, error) {
		alpha, n := p["alpha"], p["n"]
		s := math.Sqrt(6 * alpha)
		// The range ends where N(phi) = (3 alpha/(4n)) (cosh(2 phi/s) - 1),
		// the slow-roll e-folds from phi = 0 (V/V' = (s/(4n)) sinh(2 phi/s),
		// integrated), reaches rangeEfolds: for large alpha that is
		// phi^2/(4n) of the monomial, for small alpha a few s beyond the
		// end; and at least 14 s, well onto the plateau (N ~ e^28 alpha
		// there). A range fixed in M_p would reach, at small alpha, where
		// cosh(phi/s)^2 overflows and V' rounds to 0.
		// N = (3 alpha/(2n)) sinh^2(phi/s) = rangeEfolds at
		// sinh(phi/s) = sqrt(2 n rangeEfolds/(3 alpha)).
		hi := math.Max(14*s, s*detmath.Asinh(math.Sqrt(2*n*rangeEfolds/(3*alpha))))
		return newTModel(p, 0, hi), nil
	},
	buildOn: func(p map[string]float64, lo, hi float64) (*Model, error) { return newTModel(p, lo, hi), nil },
}

// newTModel returns the T-model on the canonical range (lo, hi).
func newTModel(p map[string]float64, lo, hi float64) *Model {
	alpha, n := p["alpha"], p["n"]
	s := math.Sqrt(6 * alpha)
	return &Model{
		Family: "t-model", Params: p,
		V: func(phi num.Jet) num.Jet {
			return num.PowConst(num.Tanh(num.Scale(1/s, phi)), 2*n)
		},
		Lo: lo, Hi: hi,
		Efolds: func(a, b float64) float64 { return coshEfolds(s*s/(4*n), s, a, b) },
		// epsilon_V = 8 n^2/(s^2 sinh^2(2 phi/s)) falls monotonically on
		// phi > 0 and is 1 where sinh(2 phi/s) = 2 sqrt(2) n/s (derived
		// here).
		EpsilonEnd: func() float64 { return s / 2 * detmath.Asinh(2*math.Sqrt2*n/s) },
		Native: &NativeField{
			Name: "chi", Lo: -s, Hi: s, Origin: 0,
			Kinetic: func(x float64) float64 {
				q := 1 - x*x/(6*alpha)
				return 1 / (q * q)
			},
			V: func(x num.Jet) num.Jet {
				return num.PowConst(num.Scale(1/(6*alpha), num.Mul(x, x)), n)
			},
			ToCanonical:   func(x float64) float64 { return s * detmath.Atanh(x/s) },
			FromCanonical: func(phi float64) float64 { return s * detmath.Tanh(phi/s) },
			MapFormula:    "chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha))",
		},
	}
}

// eModel is the alpha-attractor E-model,
// V = V0 (1 - exp(-sqrt(2/(3 alpha)) phi))^(2n). Its native variable is the
// half-plane coordinate y > 0 with K(y) = 3 alpha/(2 y^2) (from the Kähler
// potential -3 alpha ln(T + conj T) at real T = y/2), so that
// y = exp(sqrt(2/(3 alpha)) phi) and V = V0 (1 - 1/y)^(2n)
// (Kallosh, Linde & Roest 2013, arXiv:1311.0472). For alpha = 1, n = 1 it
// is the Starobinsky potential.
var eModel = &Family{
	Name:      "e-model",
	Formula:   "V = V0 (1 - exp(-sqrt(2/(3 alpha)) phi))^(2n) = V0 (1 - 1/y)^(2n) on the half-plane y > 0",
	Reference: "Kallosh, Linde & Roest 2013, JHEP 11 (2013) 198, arXiv:1311.0472",
	Params:    []Param{alphaParam, nParam},
	Kind:      KindPlateau,
	Tags:      []string{"alpha-attractor", "supergravity"},
	build: func(p map[string]float64) (*Model, error) {
		alpha, n := p["alpha"], p["n"]
		b := math.Sqrt(2 / (3 * alpha))
		// The range ends where N(phi) = (3 alpha/(4n)) (e^(b phi) - 1 - b phi),
		// the slow-roll e-folds from phi = 0 (V/V' = (e^(b phi) - 1)/(2 n b),
		// integrated), reaches rangeEfolds: phi^2/(4n) for large alpha, a
		// few 1/b beyond the end for small alpha, where a fixed range in M_p
		// would reach y = e^(b phi) beyond the largest float; and at least
		// 30/b, well onto the plateau.
		hi := 30 / b
		if c := 3 * alpha / (4 * n); c*expm1MinusX(30) < rangeEfolds {
			hi = plateauReach(c, b) // beyond 30/b: alpha below 1e-10 n or so
		}
		return newEModel(p, 0, hi), nil
	},
	buildOn: func(p map[string]float64, lo, hi float64) (*Model, error) { return newEModel(p, lo, hi), nil },
}

// newEModel returns the E-model on the canonical range (lo, hi).
func newEModel(p map[string]float64, lo, hi float64) *Model {
	alpha, n := p["alpha"], p["n"]
	b := math.Sqrt(2 / (3 * alpha))
	return &Model{
		Family: "e-model", Params: p,
		V:  func(phi num.Jet) num.Jet { return plateauExp(phi, b, 2*n) },
		Lo: lo, Hi: hi,
		Efolds: func(lo, hi float64) float64 { return plateauEfolds(3*alpha/(4*n), b, lo, hi) },
		// epsilon_V = 2 n^2 b^2/(e^(b phi) - 1)^2 falls monotonically on
		// phi > 0 and is 1 where e^(b phi) = 1 + sqrt(2) n b (derived
		// here).
		EpsilonEnd: func() float64 { return detmath.Log1p(math.Sqrt2*n*b) / b },
		Native: &NativeField{
			Name: "y", Lo: 0, Hi: inf, Origin: 1,
			Kinetic: func(y float64) float64 { return 3 * alpha / (2 * y * y) },
			V: func(y num.Jet) num.Jet {
				return num.PowConst(num.Sub(num.Const(1), num.Recip(y)), 2*n)
			},
			ToCanonical:   func(y float64) float64 { return detmath.Log(y) / b },
			FromCanonical: func(phi float64) float64 { return detmath.Exp(b * phi) },
			MapFormula:    "y = exp(sqrt(2/(3 alpha)) phi)",
		},
	}
}

// plateauExp returns (1 - exp(-b phi))^q.
func plateauExp(phi num.Jet, b, q float64) num.Jet {
	return num.PowConst(num.Sub(num.Const(1), num.Exp(num.Scale(-b, phi))), q)
}

// starobinsky is the Einstein-frame potential of R + R^2/(6 M^2) gravity,
// V = V0 (1 - exp(-sqrt(2/3) phi))^2 (Starobinsky 1980, PLB 91, 99).
var starobinsky = &Family{
	Name:      "starobinsky",
	Formula:   "V = V0 (1 - exp(-sqrt(2/3) phi))^2",
	Reference: "Starobinsky 1980, Phys. Lett. B 91, 99",
	Kind:      KindPlateau,
	Tags:      []string{"modified gravity"},
	build: func(p map[string]float64) (*Model, error) {
		b := math.Sqrt(2.0 / 3)
		return &Model{
			Family: "starobinsky", Params: p,
			V:  func(phi num.Jet) num.Jet { return plateauExp(phi, b, 2) },
			Lo: 0, Hi: 30 / b,
			// The e-model's count at alpha = 1, n = 1: c = 1/(2 n b^2) = 3/4.
			Efolds: func(lo, hi float64) float64 { return plateauEfolds(0.75, b, lo, hi) },
			// The e-model's end at alpha = 1, n = 1: e^(b phi) = 1 + sqrt(2) b.
			EpsilonEnd: func() float64 { return detmath.Log1p(math.Sqrt2*b) / b },
		}, nil
	},
}

// powerLaw is chaotic inflation V = V0 phi^p (Linde 1983, PLB 129, 177).
var powerLaw = &Family{
	Name:      "power-law",
	Formula:   "V = V0 phi^p",
	Reference: "Linde 1983, Phys. Lett. B 129, 177",
	// p is bounded by 100: beyond it phi^p overflows double precision
	// inside the field range that holds 600 e-folds (phi ~ sqrt(1200 p)),
	// and n_s = 1 - (p + 2)/(2N) is far from any data long before.
	Params: []Param{{Name: "p", Unit: "1", Min: 0, Max: 100, MinOpen: true, Default: noDefault,
		Doc: "power of the monomial (2/3, 1 and 4/3 for axion monodromy)"}},
	Kind: KindLargeField,
	Tags: []string{"chaotic", "axion monodromy"},
	build: func(p map[string]float64) (*Model, error) {
		q := p["p"]
		return &Model{
			Family: "power-law", Params: p,
			V: func(phi num.Jet) num.Jet { return num.PowConst(phi, q) },
			// N(phi) = (phi^2 - phi_end^2)/(2p) with phi_end = p/sqrt(2): the
			// range holds 1.44 x 600 e-folds beyond the end.
			Lo: 0, Hi: float64(1.2 * math.Sqrt(float64(float64(2*q)*rangeEfolds)+float64(float64(q*q)/2))),
			// V/V' = phi/p: the count from a to b is (b^2 - a^2)/(2p).
			Efolds: func(a, b float64) float64 { return (b - a) * (b + a) / (2 * q) },
			// epsilon_V = p^2/(2 phi^2): the end is at phi = p/sqrt(2).
			EpsilonEnd: func() float64 { return q / math.Sqrt2 },
		}, nil
	},
}

// natural is natural inflation V = V0 (1 + cos(phi/f)) (Freese, Frieman &
// Olinto 1990, PRL 65, 3233; Adams et al. 1993, PRD 47, 426,
// hep-ph/9207245). The field rolls from the maximum at phi = 0 towards the
// minimum at phi = pi f.
var natural = &Family{
	Name:      "natural",
	Formula:   "V = V0 (1 + cos(phi/f))",
	Reference: "Freese, Frieman & Olinto 1990, PRL 65, 3233; Adams, Bond, Freese, Frieman & Olinto 1993, PRD 47, 426, hep-ph/9207245",
	Params: []Param{{Name: "f", Unit: "M_p", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
		Doc: "axion decay constant"}},
	Kind: KindSmallField,
	Tags: []string{"axion"},
	build: func(p map[string]float64) (*Model, error) {
		f := p["f"]
		return &Model{
			Family: "natural", Params: p,
			// 1 + cos(phi/f) written as 2 cos^2(phi/(2f)): near the minimum
			// the sum cancels to rounding noise of relative size 1e-16/V,
			// which no e-fold quadrature converges through at large f.
			V: func(phi num.Jet) num.Jet {
				c := num.Cos(num.Scale(1/(2*f), phi))
				return num.Scale(2, num.Mul(c, c))
			},
			Lo: 0, Hi: math.Pi * f,
		}, nil
	},
}

// hilltop is V = V0 (1 - (phi/mu)^p), valid for 0 < phi < mu, with p = 2
// (quadratic) and p = 4 (quartic) the usual cases (Boubekeur & Lyth 2005,
// JCAP 07 (2005) 010, hep-ph/0502047).
var hilltop = &Family{
	Name:      "hilltop",
	Formula:   "V = V0 (1 - (phi/mu)^p), 0 < phi < mu",
	Reference: "Boubekeur & Lyth 2005, JCAP 07 (2005) 010, hep-ph/0502047",
	Params: []Param{
		{Name: "mu", Unit: "M_p", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault, Doc: "hilltop width"},
		{Name: "p", Unit: "1", Min: 2, Max: inf, MaxOpen: true, Default: 2, Doc: "power (2 quadratic, 4 quartic)"},
	},
	Kind: KindSmallField,
	Tags: []string{"hilltop"},
	build: func(p map[string]float64) (*Model, error) {
		mu, q := p["mu"], p["p"]
		return &Model{
			Family: "hilltop", Params: p,
			V: func(phi num.Jet) num.Jet {
				return num.Sub(num.Const(1), num.PowConst(num.Scale(1/mu, phi), q))
			},
			Lo: 0, Hi: mu,
		}, nil
	},
}
