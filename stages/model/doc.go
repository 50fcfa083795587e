// Package model defines inflation models: each built-in family's potential
// as a function of the canonical inflaton phi (reduced Planck units,
// M_p = 1), written with num.Jet so that V, V', V” and V”' are exact, and,
// for models that live on a field with a non-canonical kinetic term, that
// native field, its kinetic function and the analytic map to phi.
//
// The overall scale V0 is left at 1: observables in slow roll do not depend
// on it, and the reheating stage fixes it from the scalar amplitude A_s.
package model
