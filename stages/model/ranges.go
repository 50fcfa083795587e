package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Field ranges. Each family's canonical range is chosen so that the end of
// inflation (epsilon_V = 1) is the only one inside it and that, for typical
// parameters, it holds rangeEfolds e-folds of slow roll before the end by
// the family's closed-form N(phi) (derived in each family's comment), well
// above the 200 the catalogue promises.
const rangeEfolds = 600

// reach returns the first field value from + w 2^k (k = 0, 1, ...) at
// which efolds, the slow-roll e-folds counted from the edge where
// inflation ends, reaches rangeEfolds (efolds must grow with the field).
func reach(efolds func(phi float64) float64, from, w float64) float64 {
	for k := 0; k < 2000; k++ {
		phi := from + math.Ldexp(w, k)
		if n := efolds(phi); n >= rangeEfolds || math.IsInf(n, 1) || math.IsNaN(n) {
			return phi
		}
	}
	return from + math.Ldexp(w, 2000)
}

// expm1 returns exp(a) - 1, accurate for small a.
func expm1(a num.Jet) num.Jet {
	e := detmath.Exp(a.V)
	return num.Compose(a, detmath.Expm1(a.V), e, e, e)
}

// muParam is the scale of a hilltop, brane or similar potential.
var muParam = Param{Name: "mu", Unit: "M_p", Min: 0, Max: inf, MinOpen: true, MaxOpen: true, Default: noDefault,
	Doc: "field scale of the potential"}

// onDomain restricts a potential to the family's field domain
// lo <= phi <= hi: outside it, where the formula describes another branch
// of the model or a negative potential, every component is NaN, so that no
// search (a root polish walking away from the end of inflation, say)
// strays onto that branch and reports its ends.
func onDomain(lo, hi float64, v func(num.Jet) num.Jet) func(num.Jet) num.Jet {
	return func(phi num.Jet) num.Jet {
		if !(phi.V >= lo && phi.V <= hi) {
			nan := math.NaN()
			return num.Jet{V: nan, D1: nan, D2: nan, D3: nan}
		}
		return v(phi)
	}
}

// plateauReach returns the field phi at which c (e^(b phi) - 1 - b phi),
// the E-model's e-folds from phi = 0 (plateauEfolds), equals
// rangeEfolds: with x = b phi, the root of g(x) = ln(e^x - 1 - x) -
// ln(rangeEfolds/c) by Newton's method, g'(x) = expm1(x)/(e^x - 1 - x).
// g is increasing and concave (its slope falls from 2/x to 1), so from a
// start above the root the first step lands below it and the iterates
// then rise to it monotonically; the iteration stops when a step no longer
// moves x by more than a few units in the last place, and its iterates
// depend on c and b alone. The start, with T = rangeEfolds/c, is
// min(sqrt(2 T), max(2, ln(2 T))): above the root, since e^x - 1 - x >
// x^2/2 everywhere and > e^x/2 for x > 1.68 (so a root below 1.68 has
// T < 2.7 and ln(2 T) < 1.7, and one above has x < ln(2 T)); and finite
// where sqrt(2 T) would make e^x overflow (small alpha).
func plateauReach(c, b float64) float64 {
	T := rangeEfolds / c
	lnT := detmath.Log(T)
	x := math.Min(math.Sqrt(2*T), math.Max(2, detmath.Log(2*T)))
	for i := 0; i < 100; i++ {
		e1 := expm1MinusX(x)
		step := (detmath.Log(e1) - lnT) * e1 / detmath.Expm1(x)
		if !(math.Abs(step) > 4e-16*x) {
			break
		}
		x -= step
	}
	return x / b
}
