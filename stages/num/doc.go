// Package num holds the small numerical kernels the stages share: a
// third-order jet type for exact derivatives by forward-mode automatic
// differentiation, a bracketed Brent root finder and an adaptive
// Gauss–Kronrod quadrature.
//
// gonum has no exported one-dimensional root finder and only fixed-order
// quadrature (gonum.org/v1/gonum/integrate/quad.Fixed), so these are written
// here, in the gonum style: a problem, optional *Settings (nil means the
// documented defaults) and a Result with values, statistics and a status.
// Nothing here does I/O or keeps global state.
package num
