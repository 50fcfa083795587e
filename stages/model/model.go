package model

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/stages/kinetic"
	"github.com/inflatrace/inflatrace/stages/num"
)

// Model is one fully specified inflation model.
type Model struct {
	// Family is the family's name, e.g. "e-model".
	Family string
	// Params are the family parameters (units as the family declares).
	Params map[string]float64
	// V is the potential of the canonical field with V0 = 1. Called with
	// num.Var(phi) it returns V(phi) and its first three derivatives.
	V func(phi num.Jet) num.Jet
	// Lo and Hi bound the canonical field range searched for inflation
	// (open interval; the potential need not be defined at the ends).
	Lo, Hi float64
	// Native describes the field the model is written in when its kinetic
	// term is not canonical; nil for canonical models.
	Native *NativeField
	// Efolds, when not nil, is the first-order slow-roll e-fold count from
	// a to b in closed form, the integral from a to b of V/V' dphi, for
	// a and b inside the range; nil where V/V' has no elementary
	// antiderivative (the count is then integrated numerically). The
	// slow-roll stage counts with it, and checks it at every reported pivot
	// against an independent quadrature (slowroll.CheckPivot).
	Efolds func(a, b float64) float64
	// EpsilonEnd, when not nil, returns in closed form the canonical field
	// value where epsilon_V = 1, for families whose epsilon_V is monotonic
	// on the range (so that it is the only end there). The slow-roll
	// stage's end search starts from it and confirms the sign change of
	// epsilon_V - 1 there, to the last bit, from the potential itself
	// (slowroll.FindEnd); nil where there is no closed form or no single
	// end (the range is then scanned).
	EpsilonEnd func() float64
}

// NativeField is a model's own field variable x with Lagrangian
// L = ½ K(x) (∂x)² − V(x), and the canonical map phi(x) with
// dphi/dx = sqrt(K(x)): analytic for the alpha-attractors, numerical
// (Map != nil) for models built with NewNative.
type NativeField struct {
	// Name of the variable (e.g. "chi" for the Poincaré disk).
	Name string
	// Lo and Hi bound the variable's domain (open; K may have poles there).
	Lo, Hi float64
	// Origin is the value of x at which phi = 0.
	Origin float64
	// Kinetic is K(x).
	Kinetic func(x float64) float64
	// V is the potential in terms of x (V0 = 1).
	V func(x num.Jet) num.Jet
	// ToCanonical is phi(x); FromCanonical its inverse. For a numerical
	// map both return NaN outside the range the map resolves.
	ToCanonical, FromCanonical func(float64) float64
	// MapFormula is the map in words, recorded with results
	// (NumericalMapFormula for numerical maps).
	MapFormula string
	// KineticJet is K(x) with its derivatives; set for numerical maps
	// (nil for the analytic families).
	KineticJet func(x num.Jet) num.Jet
	// Map is the numerical canonical map; nil when the map is analytic.
	Map *kinetic.Map
}

// Numerical reports whether the canonical map is computed numerically.
func (nf *NativeField) Numerical() bool { return nf.Map != nil }

// At returns V and its first three derivatives at the canonical field phi.
func (m *Model) At(phi float64) num.Jet { return m.V(num.Var(phi)) }

// Describe returns "family(a=1, b=2)" with sorted parameters.
func (m *Model) Describe() string {
	names := make([]string, 0, len(m.Params))
	for n := range m.Params {
		names = append(names, n)
	}
	sort.Strings(names)
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = fmt.Sprintf("%s=%g", n, m.Params[n])
	}
	return m.Family + "(" + strings.Join(parts, ", ") + ")"
}

// WithRange returns a copy of m searching the canonical field range
// (lo, hi) instead of the family's default; the range must lie inside the
// default, where the family is defined.
func (m *Model) WithRange(lo, hi float64) (*Model, error) {
	if !(lo < hi) || math.IsNaN(lo) || math.IsNaN(hi) {
		return nil, fmt.Errorf("field range [%g, %g] is empty", lo, hi)
	}
	if lo < m.Lo || hi > m.Hi {
		return nil, fmt.Errorf("field range [%g, %g] leaves the domain (%g, %g) of %s", lo, hi, m.Lo, m.Hi, m.Family)
	}
	c := *m
	c.Lo, c.Hi = lo, hi
	return &c, nil
}
