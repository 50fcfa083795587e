package slowroll

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// Point holds the potential slow-roll parameters at one field value.
type Point struct {
	Phi     float64 // canonical field [M_p]
	N       float64 // e-folds before the end of inflation
	V       float64 // potential, with the model's V0 = 1 [M_p^4]
	Epsilon float64 // epsilon_V = (V'/V)^2/2
	Eta     float64 // eta_V = V''/V
	Xi2     float64 // xi^2_V = V' V'''/V^2
}

// At evaluates the slow-roll parameters of m at phi.
func At(m *model.Model, phi float64) Point { return FromJet(phi, m.At(phi)) }

// FromJet returns the slow-roll parameters at phi from the potential's
// jet there (V and its first three derivatives, m.At(phi)), for a caller
// that needs the jet itself too.
func FromJet(phi float64, j num.Jet) Point {
	u := j.D1 / j.V
	return Point{
		Phi:     phi,
		V:       j.V,
		Epsilon: 0.5 * u * u,
		Eta:     j.D2 / j.V,
		Xi2:     u * (j.D3 / j.V), // not V'V'''/V^2, which overflows for high powers
	}
}

// Observables are the predictions for the primordial spectra at the pivot.
type Observables struct {
	Ns     float64 // scalar spectral index n_s
	R      float64 // tensor-to-scalar ratio r
	AlphaS float64 // running alpha_s = dn_s/dln k
	Nt     float64 // tensor spectral index n_t
}

// FirstOrder returns the leading-order slow-roll observables:
//
//	n_s = 1 - 6 epsilon_V + 2 eta_V,   r = 16 epsilon_V,   n_t = -2 epsilon_V,
//	alpha_s = 16 epsilon_V eta_V - 24 epsilon_V^2 - 2 xi^2_V.
//
// n_s, r and n_t: Liddle & Lyth 2000, ch. 7 (also Liddle, Parsons & Barrow
// 1994, astro-ph/9408015, eqs. 3.5–3.7). The running: Kosowsky & Turner
// 1995, PRD 52, R1739, astro-ph/9504071, eq. 9.
func FirstOrder(p Point) Observables {
	e, h := p.Epsilon, p.Eta
	return Observables{
		Ns:     1 - float64(6*e) + float64(2*h),
		R:      16 * e,
		AlphaS: float64(float64(16*e)*h) - float64(float64(24*e)*e) - float64(2*p.Xi2),
		Nt:     -2 * e,
	}
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
