// Package model defines inflation models: each built-in family's potential
// as a function of the canonical inflaton phi (reduced Planck units,
// M_p = 1), written with num.Jet so that V, V', V” and V”' are exact, and,
// for models that live on a field with a non-canonical kinetic term, that
// native field, its kinetic function and the map to phi.
//
// The map is analytic for the alpha-attractors (and kept so). For any
// other kinetic term NewNative computes it numerically (package kinetic):
// given V(x) and K(x) as jet functions of the native field, a domain and a
// search range, it returns a Model whose V(phi) = V(x(phi)) keeps exact
// phi-derivatives. The Higgs family is built that way, and so can models
// written by users.
//
// The catalogue (Names) holds fifteen families; each declares its
// formula, a published reference, its parameters with units, ranges and
// defaults, a Kind and Tags for listing and, where the field ends on a
// runaway tail, the asymptotic equation of state (AsymptoticW). Each
// family's canonical range contains exactly one end of inflation
// (epsilon_V = 1) and, for typical parameters, several hundred e-folds of
// slow roll before it; outside its field domain a new family's potential is
// NaN, so that no search strays onto another branch of its formula.
//
// The overall scale V0 is left at 1: observables in slow roll do not depend
// on it, and the reheating stage fixes it from the scalar amplitude A_s.
package model
