package model

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"
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
	e := math.Exp(a.V)
	return num.Compose(a, math.Expm1(a.V), e, e, e)
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

// reachAt returns the field value at which efolds (growing with the
// field, from the value from) equals rangeEfolds, by bisection inside
// reach's bracket. Unlike reach it does not overshoot (reach may double
// the field), for potentials that flatten to the last bit of a float
// beyond it: there V' rounds to zero and no e-fold integral exists.
func reachAt(efolds func(phi float64) float64, from, w float64) float64 {
	hi := reach(efolds, from, w)
	lo := from
	if d := hi - from; d > w {
		lo = from + d/2
	}
	for i := 0; i < 200 && hi-lo > 1e-9*math.Abs(hi); i++ { // the range need not be exact
		mid := lo + (hi-lo)/2
		if n := efolds(mid); n >= rangeEfolds || math.IsInf(n, 1) || math.IsNaN(n) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}
