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
	phi, _, _, _ := reachBracket(efolds, from, w)
	return phi
}

// reachBracket is reach, returning also efolds at the value found (nHi)
// and at the step before it (prev, nPrev; prev = from and nPrev = NaN
// when the first step reaches).
func reachBracket(efolds func(phi float64) float64, from, w float64) (phi, nHi, prev, nPrev float64) {
	prev, nPrev = from, math.NaN()
	for k := 0; k < 2000; k++ {
		phi = from + math.Ldexp(w, k)
		n := efolds(phi)
		if n >= rangeEfolds || math.IsInf(n, 1) || math.IsNaN(n) {
			return phi, n, prev, nPrev
		}
		prev, nPrev = phi, n
	}
	return from + math.Ldexp(w, 2000), math.NaN(), prev, nPrev
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
//
// The bisection's comparisons are answered without evaluating efolds
// wherever the midpoint lies clearly on one side of the crossing: a
// Brent root search (num.BrentF, a handful of evaluations) first narrows
// the crossing to a bracket of relative width about 1e-12, and only
// midpoints within that bracket are evaluated. For efolds growing with
// the field this gives the bisection's answer to the bit, at a third of
// its evaluations (a family's default range is rebuilt by every stage
// that reads the model). Where the root search cannot run (efolds not
// finite at the bracket's end) every midpoint is evaluated.
func reachAt(efolds func(phi float64) float64, from, w float64) float64 {
	hi, nHi, prev, nPrev := reachBracket(efolds, from, w)
	lo := from
	if d := hi - from; d > w {
		lo = from + d/2
	}
	reached := func(phi float64) bool {
		n := efolds(phi)
		return n >= rangeEfolds || math.IsInf(n, 1) || math.IsNaN(n)
	}
	// reach's last two steps bracket the crossing: they are from + d/2 =
	// lo and hi, whose values are known.
	below, above := math.Inf(-1), math.Inf(1)
	if prev == lo {
		below, above = crossing(efolds, lo, hi, nPrev, nHi)
	}
	for i := 0; i < 200 && hi-lo > 1e-9*math.Abs(hi); i++ { // the range need not be exact
		mid := lo + (hi-lo)/2
		var r bool
		switch {
		case mid < below:
			r = false
		case mid > above:
			r = true
		default:
			r = reached(mid)
		}
		if r {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}

// crossing returns field values below and above which efolds, growing
// with the field, is below and at least rangeEfolds, from a Brent search
// on [lo, hi] (where efolds is nLo, NaN when not evaluated, and nHi): the root's bracket widened by a margin, so that every
// value outside [below, above] is on the side its position says. Where
// the search cannot run, it returns (-Inf, +Inf), which decides nothing.
func crossing(efolds func(phi float64) float64, lo, hi, nLo, nHi float64) (below, above float64) {
	none := func() (float64, float64) { return math.Inf(-1), math.Inf(1) }
	f := func(phi float64) float64 { return efolds(phi) - rangeEfolds }
	if math.IsNaN(nLo) { // reach's first step reached: lo is from, not evaluated
		nLo = efolds(lo)
	}
	flo, fhi := nLo-rangeEfolds, nHi-rangeEfolds
	if !(flo < 0) || !(fhi >= 0) || math.IsInf(fhi, 0) || math.IsInf(flo, 0) {
		return none()
	}
	xtol := 1e-12 * math.Abs(hi)
	r, err := num.BrentF(f, lo, hi, flo, fhi, &num.RootSettings{XTol: xtol})
	if err != nil {
		return none()
	}
	// Brent stops with the root within tol = 2 eps |x| + xtol/2 of its
	// answer (the half-width of its last bracket); the margin is twice
	// that, and more than the rounding of efolds could move a crossing.
	margin := 2 * (4*2.220446049250313e-16*math.Abs(r.X) + xtol)
	return r.X - margin, r.X + margin
}
