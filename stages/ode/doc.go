// Package ode integrates systems of ordinary differential equations
// y' = f(t, y), y in R^n, by the explicit embedded Runge–Kutta pair of
// Dormand and Prince of orders 5 and 4 (J. R. Dormand & P. J. Prince 1980,
// "A family of embedded Runge-Kutta formulae", J. Comp. Appl. Math. 6, 19,
// the pair RK5(4)7M), with
//
//   - local extrapolation: the step is advanced with the fifth-order
//     solution and the difference to the embedded fourth-order one is the
//     error estimate;
//   - mixed absolute/relative tolerances in a root-mean-square norm and the
//     automatic choice of the first step (E. Hairer, S. P. Nørsett &
//     G. Wanner, "Solving Ordinary Differential Equations I", 2nd ed. 1993,
//     Sect. II.4, including its algorithm for the starting step);
//   - proportional-integral step-size control (K. Gustafsson 1991, ACM TOMS
//     17, 533; E. Hairer & G. Wanner, "Solving Ordinary Differential
//     Equations II", 2nd ed. 1996, Sect. IV.2), which damps the step-size
//     oscillations an explicit method shows where stability, not accuracy,
//     limits the step;
//   - a continuous extension of order 4 (dense output) built from the
//     stages of each accepted step at no extra cost (Hairer, Nørsett &
//     Wanner I, Sect. II.6, the dense output of DOPRI5; it interpolates the
//     step's end values and end derivatives, so it is C¹ across steps);
//   - event location: the sign change of a scalar g(t, y) within an
//     accepted step is found by Brent's method on the dense output, so the
//     event time is as accurate as the solution itself; events can select
//     a direction and can stop the integration;
//   - a bound on the number of steps, statistics, and typed errors.
//
// Why this pair. The problems inflatrace integrates (the homogeneous
// inflaton background and the amplitude of a cosmological perturbation
// mode) are smooth and non-stiff and are solved at relative tolerances of
// 1e-10 to 1e-13. An eighth-order pair would take fewer steps at those
// tolerances, but part of each mode integration is limited by stability
// rather than accuracy (a fast, nearly undamped oscillation of frequency
// 2k/(aH) while the mode is inside the horizon), where a higher order buys
// nothing per function evaluation. Dormand–Prince 5(4) is the standard
// non-stiff workhorse, its coefficients are short rationals that a test
// checks against the order conditions exactly, it has a cheap dense output
// of order 4, and its first-same-as-last property makes a step cost six
// evaluations of f.
//
// The coefficients are those of Dormand & Prince 1980 (reprinted in
// Hairer, Nørsett & Wanner I, Sect. II.5); the dense-output weights are the
// ones given with DOPRI5 in Hairer, Nørsett & Wanner I, Sect. II.6. A test
// checks all of them against the order conditions in exact rational
// arithmetic.
//
// Allocation. Solve allocates its workspace once; the step loop allocates
// nothing, except that with Settings.Dense the stored interpolant grows by
// one record per accepted step (amortised appends) and each located event
// records a copy of the state.
package ode
