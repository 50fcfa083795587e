// Package slowroll solves single-field inflation in the slow-roll
// approximation for a model.Model: the end of inflation, the field value a
// given number of e-folds before it, the potential slow-roll parameters
// there and the first-order observables.
//
// Conventions (reduced Planck units, M_p = 1; Liddle, Parsons & Barrow
// 1994, PRD 50, 7222, astro-ph/9408015, eqs. 2.11–2.13; Liddle & Lyth
// 2000, "Cosmological Inflation and Large-Scale Structure"):
//
//	epsilon_V = (V'/V)^2 / 2,  eta_V = V''/V,  xi^2_V = V' V'''/V^2,
//	N(phi) = integral from phi_end to phi of V/V' dphi.
//
// The end of inflation is found by a scan of epsilon_V over the model's
// field range followed by Brent's method; N(phi) by adaptive Gauss–Kronrod
// quadrature; phi at a given N by bracketing and safeguarded Newton steps
// (dN/dphi = V/V' is known exactly), the bracket built once per solution
// and independent of the N asked for. Every step is deterministic, so the
// same inputs give the same bits.
package slowroll
