// Package canonical handles the map between a model's native field x, with
// Lagrangian L = ½ K(x) (∂x)² − V(x), and the canonical inflaton phi, with
// dphi/dx = sqrt(K(x)).
//
// For the built-in families the map is analytic; Verify checks it, and the
// potential's consistency between the two fields, against an independent
// numerical quadrature of sqrt(K), so that a wrong map or a wrong kinetic
// function is caught before any prediction is made.
package canonical
