package reheat

import "math"

// GeV returns an energy given in units of M_p in GeV.
func GeV(x float64) float64 { return x * ReducedPlanckGeV }

// QuarterGeV returns rho^(1/4) in GeV for an energy density in M_p^4.
func QuarterGeV(rho float64) float64 { return math.Pow(rho, 0.25) * ReducedPlanckGeV }
