package model

import (
	"fmt"
	"maps"
	"math"

	"github.com/inflatrace/inflatrace/stages/kinetic"
	"github.com/inflatrace/inflatrace/stages/num"
)

// NumericalMapFormula is the MapFormula of models whose canonical field is
// computed numerically.
const NumericalMapFormula = "numerical: phi = integral of sqrt(K) dx from the origin"

// NativeSpec describes a model written in a native field x with
// Lagrangian L = ½ K(x) (∂x)² − V(x) and no closed-form canonical map; see
// NewNative.
type NativeSpec struct {
	// Family and Params are recorded in the Model (Params is copied).
	Family string
	Params map[string]float64
	// Field names x (e.g. "h"); default "x".
	Field string
	// V is the potential and K the kinetic function, both as functions of
	// x written with num.Jet operations, so that V, K and their derivatives
	// are exact. V carries the overall scale V0 = 1.
	V, K func(x num.Jet) num.Jet
	// Origin is the value of x where phi = 0; Lo and Hi bound the native
	// domain (open; either may be infinite or a pole of K). The origin must
	// lie strictly inside.
	Origin, Lo, Hi float64
	// SearchLo and SearchHi bound the range searched for inflation (the
	// Model's Lo and Hi): canonical field values, or, when SearchInField is
	// set, values of x, mapped to phi. The range must lie inside the part of
	// the domain the canonical map resolves (kinetic.Map.Resolved).
	SearchLo, SearchHi float64
	SearchInField      bool
	// Kinetic controls the canonical map; nil means the defaults, except
	// that for a canonical search range PhiMax is set just beyond it (so
	// the table is no longer than needed).
	Kinetic *kinetic.Settings
	// MapFormula describes the map for the record; default
	// NumericalMapFormula.
	MapFormula string
}

// NewNative builds a Model from a potential and a kinetic function of a
// native field, normalising the field numerically: the canonical field is
// phi(x) = ∫ from Origin to x of sqrt(K) (kinetic.New), and the model's
// potential is V(x(phi)) with x(phi) and its phi-derivatives from
// kinetic.Map.XJet, so that V(phi), V', V” and V”' are exact up to the
// numerical value of x. Native is filled with the field's name and domain,
// K, V, the numerical maps phi(x) (Native.ToCanonical, NaN outside the
// resolved range) and x(phi) (Native.FromCanonical, likewise) and the
// kinetic.Map itself (Native.Map), so that canonical.Verify checks the map
// against an independent quadrature.
//
// This is the constructor for user-written models: given expressions for
// V(x) and K(x) compiled to jet functions, a domain and a search range, it
// returns a Model that the slow-roll and later stages use like any other.
// Errors from the kinetic function (K <= 0, NaN, a pole inside the domain;
// kinetic.Error) and a search range outside the resolved part of the
// domain are returned with the family's name.
func NewNative(s NativeSpec) (*Model, error) {
	if s.V == nil || s.K == nil {
		return nil, fmt.Errorf("%s: native model needs both a potential V(x) and a kinetic function K(x)", s.Family)
	}
	field := s.Field
	if field == "" {
		field = "x"
	}
	if math.IsNaN(s.SearchLo) || math.IsNaN(s.SearchHi) || !(s.SearchLo < s.SearchHi) {
		return nil, fmt.Errorf("%s: search range (%g, %g) is empty", s.Family, s.SearchLo, s.SearchHi)
	}
	var ks kinetic.Settings
	if s.Kinetic != nil {
		ks = *s.Kinetic
	}
	if ks.PhiMax == 0 && !s.SearchInField {
		ks.PhiMax = float64(1.25*math.Max(math.Abs(s.SearchLo), math.Abs(s.SearchHi))) + 10
	}
	mp, err := kinetic.New(s.K, s.Origin, s.Lo, s.Hi, &ks)
	if err != nil {
		return nil, fmt.Errorf("%s: canonical normalisation of %s: %w", s.Family, field, err)
	}
	ext := mp.Resolved()
	lo, hi := s.SearchLo, s.SearchHi
	if s.SearchInField {
		// A search range reaching beyond what the map resolves (it stops
		// at |phi| = PhiMax, far onto any plateau, or where K's pole is
		// closer than rounding) is clipped to the resolved range: the
		// model is the same there, and a pivot that would need the rest
		// is reported by the e-fold count as lying beyond the range.
		if !(lo >= s.Lo && hi <= s.Hi) {
			return nil, fmt.Errorf("%s: search range %g < %s < %g leaves the resolved native range [%g, %g]: it is not inside the domain (%g, %g)", s.Family, lo, field, hi, ext.XLo, ext.XHi, s.Lo, s.Hi)
		}
		lo, hi = math.Max(lo, ext.XLo), math.Min(hi, ext.XHi)
		if !(lo < hi) {
			return nil, fmt.Errorf("%s: search range %g < %s < %g lies outside the resolved native range [%g, %g]", s.Family, s.SearchLo, field, s.SearchHi, ext.XLo, ext.XHi)
		}
		lo, hi = mp.Phi(lo), mp.Phi(hi)
	} else if !(lo >= ext.PhiLo && hi <= ext.PhiHi) {
		return nil, fmt.Errorf("%s: search range %g < phi < %g leaves the resolved canonical range [%g, %g] of %s", s.Family, lo, hi, ext.PhiLo, ext.PhiHi, field)
	}
	formula := s.MapFormula
	if formula == "" {
		formula = NumericalMapFormula
	}
	V, K := s.V, s.K
	return &Model{
		Family: s.Family,
		Params: maps.Clone(s.Params),
		V:      func(phi num.Jet) num.Jet { return V(mp.XJet(phi)) },
		Lo:     lo, Hi: hi,
		Native: &NativeField{
			Name: field, Lo: s.Lo, Hi: s.Hi, Origin: s.Origin,
			Kinetic:     func(x float64) float64 { return K(num.Var(x)).V },
			KineticJet:  K,
			V:           V,
			ToCanonical: mp.Phi,
			FromCanonical: func(phi float64) float64 {
				x, err := mp.X(phi)
				if err != nil {
					return math.NaN()
				}
				return x
			},
			MapFormula: formula,
			Map:        mp,
		},
	}, nil
}
