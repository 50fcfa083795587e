package ode

import "fmt"

// SettingsError reports an invalid setting or argument.
type SettingsError struct {
	Field string // the offending Settings field or argument
	Msg   string
}

// Error describes the setting and what is wrong with it.
func (e *SettingsError) Error() string { return "ode: " + e.Field + ": " + e.Msg }

// MaxStepsError reports that the step budget ran out before the end of the
// interval. Result then holds the solution at T.
type MaxStepsError struct {
	T     float64 // last accepted time
	Steps int     // step attempts made
	H     float64 // step that would have been tried next
}

// Error says where the budget ran out.
func (e *MaxStepsError) Error() string {
	return fmt.Sprintf("ode: %d step attempts used up at t = %.17g (next step %g); raise MaxSteps or loosen the tolerances", e.Steps, e.T, e.H)
}

// StepSizeError reports that the step needed for the tolerance fell below
// the resolution of t (sixteen units in the last place), typically at a
// singularity of the solution.
type StepSizeError struct {
	T, H float64
}

// Error says where the step underflowed.
func (e *StepSizeError) Error() string {
	return fmt.Sprintf("ode: step size %g too small at t = %.17g (a singularity, or tolerances below rounding)", e.H, e.T)
}

// NotFiniteError reports that f kept returning NaN or infinite values
// until the step size underflowed.
type NotFiniteError struct {
	T, H float64
}

// Error says where f stopped being finite.
func (e *NotFiniteError) Error() string {
	return fmt.Sprintf("ode: the right-hand side is not finite near t = %.17g (steps down to %g rejected)", e.T, e.H)
}

// RangeError reports a dense-output evaluation outside the integrated
// interval.
type RangeError struct {
	T, T0, T1 float64
}

// Error gives the requested time and the interval.
func (e *RangeError) Error() string {
	return fmt.Sprintf("ode: dense output at t = %.17g outside the integrated interval [%.17g, %.17g]", e.T, e.T0, e.T1)
}
