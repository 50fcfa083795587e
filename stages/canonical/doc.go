// Package canonical handles the map between a model's native field x, with
// Lagrangian L = ½ K(x) (∂x)² − V(x), and the canonical inflaton phi, with
// dphi/dx = sqrt(K(x)).
//
// For most built-in families the map is analytic; Verify checks it, and
// the potential's consistency between the two fields, against an
// independent numerical quadrature of sqrt(K), so that a wrong map or a
// wrong kinetic function is caught before any prediction is made. Models
// built with model.NewNative (the Higgs family, user-written models) carry
// a numerical map (package kinetic); Verify checks it against the same
// independent quadrature, with a tolerance set by the map's own precision,
// and checks the potential's slope and curvature in the two fields.
package canonical
