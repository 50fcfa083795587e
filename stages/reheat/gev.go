package reheat

import "math"

// GeV returns an energy given in units of M_p in GeV.
func GeV(x float64) float64 { return x * ReducedPlanckGeV }

// QuarterGeV returns rho^(1/4) in GeV for an energy density in M_p^4.
func QuarterGeV(rho float64) float64 { return fourthRoot(rho) * ReducedPlanckGeV }

// fourthRoot returns x^(1/4) as two square roots (each correctly rounded,
// so within an ulp of x^(1/4); math.Pow costs ten times as much): NaN for
// x < 0, as math.Pow(x, 0.25).
func fourthRoot(x float64) float64 { return math.Sqrt(math.Sqrt(x)) }
