package slowroll

import (
	"fmt"
	"math"
)

// InflationKind classifies why a model gives no exact prediction.
type InflationKind int

const (
	// NeverEnds: the end condition is never met (the field settles, runs
	// off its range, or the e-fold budget runs out first).
	NeverEnds InflationKind = iota + 1
	// NeverStarts: the field is not inflating where inflation would have
	// to begin (epsilon_H >= 1 at the initial point, or the end condition
	// holds everywhere behind the end).
	NeverStarts
	// Climbs: reaching the end would need the field to climb the
	// potential.
	Climbs
	// EndsEarly: epsilon_H reaches 1 before the requested end condition,
	// so inflation is over before that end.
	EndsEarly
	// TooFewEfolds: there are not enough e-folds before the end for the
	// pivot, its neighbouring modes, their depth inside the horizon and
	// the settling of the background; or the pivot is too close to the
	// end for the modes to freeze.
	TooFewEfolds
	// BadPotential: the potential is not positive and finite where it is
	// needed, or the end condition is ambiguous there.
	BadPotential
)

// String describes the kind in words.
func (k InflationKind) String() string {
	switch k {
	case NeverEnds:
		return "inflation never ends"
	case NeverStarts:
		return "inflation never starts"
	case Climbs:
		return "the field would climb the potential"
	case EndsEarly:
		return "inflation ends before the end condition"
	case TooFewEfolds:
		return "too few e-folds"
	case BadPotential:
		return "unusable potential"
	}
	return "unknown"
}

// InflationError reports a model for which the exact method gives no
// prediction, with the values where the problem was found.
type InflationError struct {
	Model string
	Kind  InflationKind
	End   EndCondition
	// Phi and Pi are the field and its velocity dphi/dN where the problem
	// was found (Pi is NaN when no trajectory exists yet); EpsilonH is
	// Pi^2/2 there.
	Phi, Pi, EpsilonH float64
	// N is the e-fold count the message refers to: e-folds since the
	// start of the background for trajectory events, e-folds before the
	// end for TooFewEfolds (the number available).
	N float64
	// Detail says what was seen, in words with numbers.
	Detail string
	// Err is the underlying error, if any.
	Err error
}

// Error gives the model, the kind, the end condition, the details and
// the values where the problem was found.
func (e *InflationError) Error() string {
	s := fmt.Sprintf("%s: %s (end at %s): %s", e.Model, e.Kind, e.End, e.Detail)
	if !math.IsNaN(e.Phi) {
		s += fmt.Sprintf(" [phi = %.6g", e.Phi)
		if !math.IsNaN(e.Pi) {
			s += fmt.Sprintf(", dphi/dN = %.6g, epsilon_H = %.6g", e.Pi, e.EpsilonH)
		}
		s += "]"
	}
	if e.Err != nil {
		s += ": " + e.Err.Error()
	}
	return s
}

// Unwrap returns the underlying error.
func (e *InflationError) Unwrap() error { return e.Err }
