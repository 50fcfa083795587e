package kinetic

import (
	"errors"
	"fmt"
)

// Sentinel errors; every error New returns wraps one of them (test with
// errors.Is) inside an *Error that says where and what.
var (
	// ErrDomain: the domain (lo, hi) is empty or not a number.
	ErrDomain = errors.New("empty domain")
	// ErrOrigin: the origin does not lie strictly inside the domain.
	ErrOrigin = errors.New("origin outside the domain")
	// ErrNotPositive: K <= 0 somewhere inside the domain.
	ErrNotPositive = errors.New("kinetic function not positive")
	// ErrNotFinite: K, K' or K'' is NaN (or K' or K'' infinite) inside the
	// domain.
	ErrNotFinite = errors.New("kinetic function not finite")
	// ErrPole: K is infinite, or grows without bound, inside the domain.
	ErrPole = errors.New("kinetic function has a pole inside the domain")
	// ErrNotSmooth: the quadrature of sqrt(K) could not be resolved near a
	// point although K stays bounded there (a jump or a kink of K).
	ErrNotSmooth = errors.New("kinetic function too rough to integrate")
	// ErrTooLarge: the table needed more nodes than Settings.MaxNodes.
	ErrTooLarge = errors.New("too many nodes")
	// ErrRange: a field value outside the range the map resolves.
	ErrRange = errors.New("outside the resolved range")
)

// Error is a failure of the canonical map, with the place and the value.
type Error struct {
	Err error   // the sentinel (ErrDomain, ErrPole, ...)
	X   float64 // the native field value concerned (NaN if none)
	K   float64 // K there (NaN if not evaluated)
	Msg string  // the full description
}

func (e *Error) Error() string { return "kinetic: " + e.Msg }

// Unwrap returns the sentinel.
func (e *Error) Unwrap() error { return e.Err }

func newError(sentinel error, x, k float64, format string, args ...any) *Error {
	return &Error{Err: sentinel, X: x, K: k, Msg: fmt.Sprintf(format, args...)}
}
