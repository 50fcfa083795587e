package slowroll

import (
	"fmt"
	"math"
	"sort"
	"sync"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// End is the end of inflation.
type End struct {
	Phi float64 // field value where epsilon_V = 1 [M_p]
	// Direction is +1 when the field grows during inflation, -1 when it
	// decreases (the sign of -V').
	Direction float64
	V         float64 // potential there (V0 = 1)
}

// Settings controls the slow-roll solution. Nil means the defaults.
type Settings struct {
	// ScanPoints is the number of field values at which epsilon_V is
	// sampled to bracket the end of inflation; default 96.
	ScanPoints int
	// Quad controls the e-fold quadrature; default relative 1e-12.
	Quad *num.QuadSettings
}

func (s *Settings) scanPoints() int {
	if s == nil || s.ScanPoints <= 0 {
		return 96
	}
	return s.ScanPoints
}

func (s *Settings) quad() *num.QuadSettings {
	if s == nil || s.Quad == nil {
		return &num.QuadSettings{RelTol: 1e-12, AbsTol: 1e-13}
	}
	return s.Quad
}

// RangeError reports that inflation does not behave as required inside
// the searched field range.
type RangeError struct {
	Model  string
	Lo, Hi float64
	Msg    string
}

func (e *RangeError) Error() string {
	return fmt.Sprintf("%s: %s (field range %g < phi < %g M_p)", e.Model, e.Msg, e.Lo, e.Hi)
}

// scanGrid returns ScanPoints field values strictly inside (lo, hi):
// uniform in the middle and geometrically refined towards both ends, so an
// end of inflation close to an edge of the range is still bracketed.
func scanGrid(lo, hi float64, n int) []float64 {
	w := hi - lo
	us := scanFractions(n)
	xs := make([]float64, 0, len(us))
	for _, u := range us {
		x := lo + float64(w*u)
		if x > lo && x < hi && (len(xs) == 0 || x > xs[len(xs)-1]) {
			xs = append(xs, x)
		}
	}
	return xs
}

// fractionCache holds scanFractions' results by n (read-only once
// stored).
var fractionCache sync.Map

// scanFractions returns the positions of scanGrid's n points as sorted
// fractions of the range's width, computed once for each n.
func scanFractions(n int) []float64 {
	if us, ok := fractionCache.Load(n); ok {
		return us.([]float64)
	}
	us := make([]float64, 0, n)
	third := n / 3
	for i := 0; i < third; i++ {
		t := float64(i) / float64(third)
		g := detmath.Pow(10, -12+float64(11*t)) // 1e-12 ... 1e-1 of the width
		us = append(us, g, 1-g)
	}
	rest := n - len(us)
	for i := 1; i <= rest; i++ {
		us = append(us, float64(i)/float64(rest+1))
	}
	sort.Float64s(us)
	stored, _ := fractionCache.LoadOrStore(n, us)
	return stored.([]float64)
}

// FindEnd locates the end of inflation, where epsilon_V = 1, inside the
// model's field range. It refuses a range in which inflation never ends,
// never happens, or where the field would climb the potential, and a range
// with several separate ends.
//
// A model with a closed-form end (model.Model.EpsilonEnd: a family whose
// epsilon_V is monotonic, so that the end is unique) is not scanned: the
// end is the sign change of epsilon_V - 1 nearest the closed form, found
// to the last bit by num.Polish from the potential itself, as the scan's
// root is. Where that sign change is not where the closed form says (the
// closed form and the potential disagree, or the field would climb the
// potential there), the range is scanned as for any model.
func FindEnd(m *model.Model, s *Settings) (End, error) {
	if m.EpsilonEnd != nil {
		if e, ok := closedFormEnd(m, EpsilonVCondition, m.EpsilonEnd()); ok {
			return e, nil
		}
	}
	return FindEndWhere(m, EpsilonVCondition, s)
}

// closedFormEnd confirms an end of inflation at phi0 for cond: inside the
// range, with cond changing sign within 1e-9 max(1, |phi0|) of it and the
// inflating side (cond < 0) behind the end along the roll, the end being
// the sign change nearest phi0 (num.Polish). ok is false where any of it
// fails.
func closedFormEnd(m *model.Model, cond Condition, phi0 float64) (End, bool) {
	if !(phi0 > m.Lo && phi0 < m.Hi) {
		return End{}, false
	}
	w := float64(1e-9 * math.Max(1, math.Abs(phi0)))
	lo, hi := math.Max(phi0-w, m.Lo), math.Min(phi0+w, m.Hi)
	f := func(x float64) float64 { return cond.Minus(At(m, x)) }
	flo, fhi := f(lo), f(hi)
	if !((flo < 0) != (fhi < 0)) || math.IsNaN(flo) || math.IsNaN(fhi) {
		return End{}, false
	}
	phi := num.Polish(f, phi0, lo, hi)
	j := m.At(phi)
	if !finite(j.D1) || j.D1 == 0 || !(j.V > 0) {
		return End{}, false
	}
	dir := -math.Copysign(1, j.D1)
	// Inflating behind the end: below it when the field grows.
	if (dir > 0) != (flo < 0) {
		return End{}, false
	}
	return End{Phi: phi, Direction: dir, V: j.V}, true
}

// Condition is a slow-roll criterion for the end of inflation, evaluated
// on a Point: its name, with which the error messages speak, and its
// value minus one (negative while inflating).
type Condition struct {
	Name  string
	Minus func(p Point) float64
}

// EpsilonVCondition ends inflation where epsilon_V = 1.
var EpsilonVCondition = Condition{"epsilon_V", func(p Point) float64 { return p.Epsilon - 1 }}

// EtaVCondition ends inflation where |eta_V| = 1, for hilltop-like models
// whose slow roll fails through eta first.
var EtaVCondition = Condition{"|eta_V|", func(p Point) float64 { return math.Abs(p.Eta) - 1 }}

// EndAtField ends inflation at a given field value (for models in which
// another sector ends it); the roll direction is that of -V' there.
func EndAtField(m *model.Model, phi float64) (End, error) {
	if !(phi > m.Lo && phi < m.Hi) {
		return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("the end field %g is outside the range", phi)}
	}
	j := m.At(phi)
	if !(j.V > 0) || j.D1 == 0 || !finite(j.D1) {
		return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("at the end field %g, V = %g and V' = %g: no roll", phi, j.V, j.D1)}
	}
	return End{Phi: phi, Direction: -math.Copysign(1, j.D1), V: j.V}, nil
}

// FindEndWhere is FindEnd for another slow-roll end condition.
func FindEndWhere(m *model.Model, cond Condition, s *Settings) (End, error) {
	xs := scanGrid(m.Lo, m.Hi, s.scanPoints())
	g := make([]float64, len(xs))
	minEps, maxEps := math.Inf(1), math.Inf(-1)
	for i, x := range xs {
		p := At(m, x)
		if p.V == 0 {
			// V rounds to zero (a monomial of high power near its minimum,
			// tanh^(2n) at large n): no inflation there, as at a minimum.
			g[i] = math.Inf(1)
			maxEps = math.Inf(1)
			continue
		}
		if !(p.V > 0) || !finite(p.Epsilon) {
			// Within a millionth of the range's width of its ends the
			// potential may vanish (a minimum on the edge, the top of a
			// hill): no inflation there. Anywhere else it is an error.
			if math.Min(x-m.Lo, m.Hi-x) < 1e-6*(m.Hi-m.Lo) && !(p.V < 0) {
				g[i] = math.Inf(1)
				maxEps = math.Inf(1)
				continue
			}
			if !(p.V > 0) {
				return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("V = %g <= 0 at phi = %g", p.V, x)}
			}
			return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("epsilon_V is %g at phi = %g", p.Epsilon, x)}
		}
		g[i] = cond.Minus(p)
		minEps, maxEps = math.Min(minEps, g[i]+1), math.Max(maxEps, g[i]+1)
	}
	if maxEps < 1 {
		return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("inflation never ends: %s < 1 everywhere (largest %.3g)", cond.Name, maxEps)}
	}
	if minEps > 1 {
		return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("inflation never happens: %s > 1 everywhere (smallest %.3g)", cond.Name, minEps)}
	}
	type cand struct {
		i   int
		dir float64
	}
	var ends []cand
	for i := 0; i+1 < len(xs); i++ {
		if (g[i] < 0) == (g[i+1] < 0) {
			continue
		}
		slope := m.At(0.5 * (xs[i] + xs[i+1])).D1
		if !finite(slope) || slope == 0 {
			continue
		}
		dir := -math.Copysign(1, slope)
		// An end: inflating (g < 0) behind, not inflating ahead, along the roll.
		if (dir > 0 && g[i] < 0) || (dir < 0 && g[i+1] < 0) {
			ends = append(ends, cand{i, dir})
		}
	}
	if len(ends) == 0 {
		return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, cond.Name + " crosses 1 only where the field would climb the potential: no end of inflation"}
	}
	if len(ends) > 1 {
		locs := ""
		for _, c := range ends {
			locs += fmt.Sprintf(" %.4g", 0.5*(xs[c.i]+xs[c.i+1]))
		}
		return End{}, &RangeError{m.Describe(), m.Lo, m.Hi, "several separate ends of inflation near phi =" + locs + "; narrow the field range"}
	}
	c := ends[0]
	f := func(x float64) float64 { return cond.Minus(At(m, x)) }
	r, err := num.BrentF(f, xs[c.i], xs[c.i+1], g[c.i], g[c.i+1], &num.RootSettings{XTol: 1e-15})
	if err != nil {
		return End{}, fmt.Errorf("%s: end of inflation: %w", m.Describe(), err)
	}
	phi := num.Polish(f, r.X, xs[c.i], xs[c.i+1])
	return End{Phi: phi, Direction: c.dir, V: m.At(phi).V}, nil
}
