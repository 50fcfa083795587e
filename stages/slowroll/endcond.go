package slowroll

import (
	"fmt"
	"math"
	"sort"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// EndCondition selects where the exact method ends inflation.
type EndCondition int

const (
	// EndEpsilonH ends inflation where epsilon_H = (dphi/dN)^2/2 = 1, i.e.
	// where the expansion stops accelerating (the default).
	EndEpsilonH EndCondition = iota
	// EndEpsilonV ends it where epsilon_V = 1 on the trajectory, the end
	// the slow-roll methods use (for like-with-like comparisons).
	EndEpsilonV
	// EndEtaV ends it where |eta_V| = 1 (hilltop-like models whose slow
	// roll fails through eta first).
	EndEtaV
	// EndField ends it where the field reaches ExactSettings.EndPhi, for
	// models in which another sector (e.g. a waterfall field) ends
	// inflation.
	EndField
)

// String gives the condition as an equation.
func (c EndCondition) String() string {
	switch c {
	case EndEpsilonH:
		return "epsilon_H = 1"
	case EndEpsilonV:
		return "epsilon_V = 1"
	case EndEtaV:
		return "|eta_V| = 1"
	case EndField:
		return "a given field value"
	}
	return fmt.Sprintf("EndCondition(%d)", int(c))
}

// potentialCondition returns g(phi) for the end conditions that are
// functions of the field alone: negative while inflating, crossing zero
// at the end. epsilon_H is approximated by epsilon_V for locating the
// slow-roll reference end.
func potentialCondition(c EndCondition) func(j num.Jet) float64 {
	switch c {
	case EndEtaV:
		return func(j num.Jet) float64 { return math.Abs(j.D2/j.V) - 1 }
	default:
		return func(j num.Jet) float64 { u := j.D1 / j.V; return float64(float64(0.5*u)*u) - 1 }
	}
}

// referenceEnd finds the slow-roll estimate of the end of inflation for
// the condition: the unique field value where g crosses from negative
// (inflating) behind to non-negative ahead along the roll, -V'. Only the
// start of the exact background depends on it. For EndField it is the
// given field.
func referenceEnd(m *model.Model, c EndCondition, endPhi float64) (End, error) {
	fail := func(kind InflationKind, phi float64, detail string) (End, error) {
		return End{}, &InflationError{Model: m.Describe(), Kind: kind, End: c, Phi: phi, Pi: math.NaN(), EpsilonH: math.NaN(), N: math.NaN(), Detail: detail}
	}
	if c == EndField {
		if !(endPhi > m.Lo && endPhi < m.Hi) {
			return fail(BadPotential, endPhi, fmt.Sprintf("the end field is outside the model's range (%g, %g)", m.Lo, m.Hi))
		}
		j := m.At(endPhi)
		if !(j.V > 0) || !isFinite(j.D1) {
			return fail(BadPotential, endPhi, fmt.Sprintf("V = %g, V' = %g at the end field", j.V, j.D1))
		}
		if j.D1 == 0 {
			if j.D2 > 0 {
				return fail(NeverEnds, endPhi, "the end field is a minimum of V, which the field only approaches")
			}
			return fail(Climbs, endPhi, "the end field is a maximum or flat point of V, which the rolling field cannot reach")
		}
		return End{Phi: endPhi, Direction: -math.Copysign(1, j.D1), V: j.V}, nil
	}
	g := potentialCondition(c)
	// Scan: uniform in the middle, refined geometrically towards both ends.
	const n = 240
	us := make([]float64, 0, n)
	for i := 0; i < n/4; i++ {
		q := detmath.Pow(10, -12+11*float64(i)/float64(n/4))
		us = append(us, q, 1-q)
	}
	for i := 1; i <= n/2; i++ {
		us = append(us, float64(i)/float64(n/2+1))
	}
	sort.Float64s(us)
	w := m.Hi - m.Lo
	var xs, gs []float64
	minG, maxG := math.Inf(1), math.Inf(-1)
	for _, u := range us {
		x := m.Lo + float64(w*u)
		if !(x > m.Lo && x < m.Hi) || len(xs) > 0 && x <= xs[len(xs)-1] {
			continue
		}
		j := m.At(x)
		gx := g(j)
		if !(j.V > 0) || !isFinite(gx) {
			// At the very edges of the range the potential may vanish.
			if math.Min(x-m.Lo, m.Hi-x) < 1e-6*w && !(j.V < 0) {
				continue
			}
			return fail(BadPotential, x, fmt.Sprintf("V = %g, end condition %g", j.V, gx))
		}
		xs, gs = append(xs, x), append(gs, gx)
		minG, maxG = math.Min(minG, gx), math.Max(maxG, gx)
	}
	if len(xs) < 2 {
		return fail(BadPotential, math.NaN(), "no usable field values in the range")
	}
	if maxG < 0 {
		return fail(NeverEnds, math.NaN(), fmt.Sprintf("the end condition is never reached in %g < phi < %g (largest value of the condition %.3g, end at 0)", m.Lo, m.Hi, maxG))
	}
	if minG >= 0 {
		return fail(NeverStarts, math.NaN(), fmt.Sprintf("the end condition holds everywhere in %g < phi < %g (smallest value %.3g)", m.Lo, m.Hi, minG))
	}
	type cand struct {
		i   int
		dir float64
	}
	var ends []cand
	climbs := 0
	for i := 0; i+1 < len(xs); i++ {
		if (gs[i] < 0) == (gs[i+1] < 0) {
			continue
		}
		slope := m.At(0.5 * (xs[i] + xs[i+1])).D1
		if !isFinite(slope) || slope == 0 {
			continue
		}
		dir := -math.Copysign(1, slope)
		if dir > 0 && gs[i] < 0 || dir < 0 && gs[i+1] < 0 {
			ends = append(ends, cand{i, dir})
		} else {
			climbs++
		}
	}
	if len(ends) == 0 {
		return fail(Climbs, math.NaN(), fmt.Sprintf("the end condition is crossed only where the field would climb the potential (%d crossings)", climbs))
	}
	if len(ends) > 1 {
		return fail(BadPotential, xs[ends[0].i], fmt.Sprintf("%d separate ends of inflation in the range; narrow it", len(ends)))
	}
	e := ends[0]
	r, err := num.BrentF(func(x float64) float64 { return g(m.At(x)) }, xs[e.i], xs[e.i+1], gs[e.i], gs[e.i+1], &num.RootSettings{XTol: 1e-13})
	if err != nil {
		return End{}, &InflationError{Model: m.Describe(), Kind: BadPotential, End: c, Phi: xs[e.i], Pi: math.NaN(), EpsilonH: math.NaN(), N: math.NaN(), Detail: "locating the slow-roll end", Err: err}
	}
	return End{Phi: r.X, Direction: e.dir, V: m.At(r.X).V}, nil
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
