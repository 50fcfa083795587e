package ode

import (
	"fmt"
	"math"
)

// Func evaluates the right-hand side of y' = f(t, y), writing f(t, y) into
// dydt. It must not keep y or dydt, which the solver reuses. A NaN or an
// infinity in dydt makes the solver reject the step and retry with a
// smaller one (so a trial point slightly outside the domain of f is
// survivable); see NotFiniteError.
type Func func(t float64, y, dydt []float64)

// Event is a scalar event function whose sign changes along the solution
// are located.
type Event struct {
	// G is the event function. It must not keep y.
	G func(t float64, y []float64) float64
	// Direction selects the crossings reported: +1 only where G rises
	// through zero (from negative to zero or positive), -1 only where it
	// falls, 0 both.
	Direction int
	// Terminal stops the integration at the first reported crossing.
	Terminal bool
}

// Settings controls Solve. A nil *Settings, and any zero field, means the
// documented default.
type Settings struct {
	// RTol and ATol are the relative and absolute tolerances: a step is
	// accepted when the root mean square over components of
	// err_i / (ATol_i + RTol max(|y0_i|, |y1_i|)) is at most 1 (Hairer,
	// Nørsett & Wanner I, Sect. II.4). Defaults 1e-6 and 1e-9.
	RTol, ATol float64
	// ATolVec, when not nil, gives a per-component absolute tolerance and
	// overrides ATol. Its length must be that of y0.
	ATolVec []float64
	// InitialStep is the magnitude of the first trial step; default
	// automatic (the starting-step algorithm of Hairer, Nørsett & Wanner I,
	// Sect. II.4, one extra evaluation of f).
	InitialStep float64
	// MaxStep bounds the step magnitude; default |t1 - t0|.
	MaxStep float64
	// MaxSteps bounds the number of step attempts (accepted plus
	// rejected); default 100000. Exceeding it is a MaxStepsError.
	MaxSteps int
	// Dense keeps the continuous extension of every accepted step in
	// Result.Dense.
	Dense bool
	// Events are located on the dense output of each accepted step.
	Events []Event
	// EventTol is the absolute tolerance on event times; default four
	// units in the last place of t plus 1e-15 (Brent's method's default in
	// package num).
	EventTol float64
	// Safety is the factor applied to the optimal step; default 0.9.
	Safety float64
	// MinFactor and MaxFactor bound the ratio of consecutive steps;
	// defaults 0.2 and 10.
	MinFactor, MaxFactor float64
	// Beta is the exponent of the previous error in the proportional–
	// integral controller h_new = h Safety err^-(1/5 - 0.75 Beta)
	// errPrev^Beta (Gustafsson 1991; Hairer & Wanner II, Sect. IV.2).
	// Default 0.04; a negative value selects the elementary controller
	// h_new = h Safety err^-(1/5).
	Beta float64
}

type config struct {
	rtol, atol         float64
	atolVec            []float64
	h0, hmax           float64
	maxSteps           int
	dense              bool
	events             []Event
	eventTol           float64
	safety, fmin, fmax float64
	alpha, beta        float64
}

func (s *Settings) config(n int, span float64) (config, error) {
	c := config{rtol: 1e-6, atol: 1e-9, hmax: span, maxSteps: 100000,
		safety: 0.9, fmin: 0.2, fmax: 10, beta: 0.04}
	if s != nil {
		bad := func(name string, v float64) error {
			return &SettingsError{Field: name, Msg: fmt.Sprintf("%g is not a finite value >= 0", v)}
		}
		for _, f := range []struct {
			name string
			v    float64
			dst  *float64
		}{
			{"RTol", s.RTol, &c.rtol}, {"ATol", s.ATol, &c.atol},
			{"InitialStep", s.InitialStep, &c.h0}, {"MaxStep", s.MaxStep, &c.hmax},
			{"EventTol", s.EventTol, &c.eventTol},
			{"Safety", s.Safety, &c.safety}, {"MinFactor", s.MinFactor, &c.fmin},
			{"MaxFactor", s.MaxFactor, &c.fmax},
		} {
			if f.v < 0 || math.IsNaN(f.v) || math.IsInf(f.v, 0) {
				return c, bad(f.name, f.v)
			}
			if f.v > 0 {
				*f.dst = f.v
			}
		}
		if s.Beta < 0 {
			c.beta = 0
		} else if s.Beta > 0 {
			c.beta = s.Beta
		}
		if s.MaxSteps < 0 {
			return c, &SettingsError{Field: "MaxSteps", Msg: fmt.Sprintf("%d is negative", s.MaxSteps)}
		}
		if s.MaxSteps > 0 {
			c.maxSteps = s.MaxSteps
		}
		if s.ATolVec != nil {
			if len(s.ATolVec) != n {
				return c, &SettingsError{Field: "ATolVec", Msg: fmt.Sprintf("length %d, want %d (the length of y0)", len(s.ATolVec), n)}
			}
			for i, v := range s.ATolVec {
				if v < 0 || math.IsNaN(v) || math.IsInf(v, 0) {
					return c, &SettingsError{Field: "ATolVec", Msg: fmt.Sprintf("component %d is %g", i, v)}
				}
			}
			c.atolVec = s.ATolVec
		}
		for i, e := range s.Events {
			if e.G == nil {
				return c, &SettingsError{Field: "Events", Msg: fmt.Sprintf("event %d has no function G", i)}
			}
			if e.Direction < -1 || e.Direction > 1 {
				return c, &SettingsError{Field: "Events", Msg: fmt.Sprintf("event %d has direction %d (want -1, 0 or +1)", i, e.Direction)}
			}
		}
		c.dense = s.Dense
		c.events = s.Events
	}
	if c.rtol == 0 && c.atol == 0 && c.atolVec == nil {
		return c, &SettingsError{Field: "RTol", Msg: "both tolerances are zero"}
	}
	if c.safety >= 1 || c.fmin >= 1 || c.fmax <= 1 {
		return c, &SettingsError{Field: "Safety", Msg: fmt.Sprintf("want Safety < 1, MinFactor < 1 < MaxFactor (have %g, %g, %g)", c.safety, c.fmin, c.fmax)}
	}
	if c.hmax > span {
		c.hmax = span
	}
	c.alpha = 1.0/order - float64(0.75*c.beta)
	return c, nil
}
