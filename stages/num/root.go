package num

import (
	"errors"
	"fmt"
	"math"
)

// RootSettings controls Brent. The zero value and nil mean the defaults.
type RootSettings struct {
	// XTol is the absolute tolerance on the root; default 4 machine epsilons
	// relative to |x| plus 1e-15.
	XTol float64
	// MaxIter bounds the iterations; default 200.
	MaxIter int
}

// RootResult is the outcome of a root search.
type RootResult struct {
	X, F  float64 // the root and the function value there
	Iter  int     // iterations used
	Evals int     // function evaluations
}

// ErrNoBracket is returned (wrapped) when f(a) and f(b) have the same sign.
var ErrNoBracket = errors.New("root not bracketed")

// Brent finds a root of f in [a, b], where f(a) and f(b) must differ in sign
// (or one of them be zero). It is Brent's method (inverse quadratic
// interpolation safeguarded by bisection): R. P. Brent, "Algorithms for
// Minimization without Derivatives" (1973), chapter 4, algorithm zero.
func Brent(f func(float64) float64, a, b float64, s *RootSettings) (RootResult, error) {
	fa, fb := f(a), f(b)
	return BrentF(f, a, b, fa, fb, s)
}

// BrentF is Brent with the end-point values already known.
func BrentF(f func(float64) float64, a, b, fa, fb float64, s *RootSettings) (RootResult, error) {
	xtol, maxIter := 0.0, 200
	if s != nil {
		if s.XTol > 0 {
			xtol = s.XTol
		}
		if s.MaxIter > 0 {
			maxIter = s.MaxIter
		}
	}
	res := RootResult{Evals: 2}
	if math.IsNaN(fa) || math.IsNaN(fb) {
		return res, fmt.Errorf("function is NaN at a bracket end (f(%g)=%g, f(%g)=%g)", a, fa, b, fb)
	}
	if fa == 0 {
		res.X, res.F = a, 0
		return res, nil
	}
	if fb == 0 {
		res.X, res.F = b, 0
		return res, nil
	}
	if (fa > 0) == (fb > 0) {
		return res, fmt.Errorf("%w: f(%g)=%g and f(%g)=%g", ErrNoBracket, a, fa, b, fb)
	}
	c, fc := a, fa
	d := b - a
	e := d
	for res.Iter = 1; res.Iter <= maxIter; res.Iter++ {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := float64(2*2.220446049250313e-16*math.Abs(b)) + float64(0.5*xtol)
		if xtol == 0 {
			tol = float64(4*2.220446049250313e-16*math.Abs(b)) + 1e-15
		}
		m := float64(0.5 * (c - b))
		if math.Abs(m) <= tol || fb == 0 {
			res.X, res.F = b, fb
			return res, nil
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			var p, q float64
			sr := fb / fa
			if a == c {
				p = float64(float64(2*m) * sr)
				q = 1 - sr
			} else {
				qq := fa / fc
				rr := fb / fc
				p = float64(sr * (float64(float64(float64(2*m)*qq)*(qq-rr)) - float64((b-a)*(rr-1))))
				q = (qq - 1) * (rr - 1) * (sr - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if float64(2*p) < math.Min(float64(float64(3*m)*q)-math.Abs(float64(tol*q)), math.Abs(float64(e*q))) {
				e = d
				d = p / q
			} else {
				d = m
				e = m
			}
		} else {
			d = m
			e = m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else if m > 0 {
			b += tol
		} else {
			b -= tol
		}
		fb = f(b)
		res.Evals++
		if math.IsNaN(fb) {
			return res, fmt.Errorf("function is NaN at x=%g during root search", b)
		}
	}
	res.X, res.F = b, fb
	return res, fmt.Errorf("root search did not converge in %d iterations (x=%g, f=%g)", maxIter, b, fb)
}

// Polish narrows a root x of f, found by a root finder inside the bracket
// [lo, hi], to the pair of adjacent float64 values between which f changes
// sign, and returns the member of the pair with f >= 0. It looks for the
// sign change nearest to x, on both sides, in steps that double in units
// in the last place, never leaving [lo, hi]; then it bisects on the
// float64 grid. The result no longer depends on the bracket the root
// finder started from, so the same function gives the same bits. When no
// sign change is found (f is noisy or has no root nearby), x is returned.
func Polish(f func(float64) float64, x, lo, hi float64) float64 {
	fx := f(x)
	if fx == 0 || math.IsNaN(fx) || math.IsInf(x, 0) || !(lo <= x && x <= hi) {
		return x
	}
	ox, olo, ohi := ordered(x), ordered(lo), ordered(hi)
	var a, b int64 // a holds fx's sign, b the other
	fa := fx
	found := false
	for step := int64(1); step <= 1<<52 && !found; step *= 2 {
		for _, dir := range []int64{1, -1} {
			o := ox + dir*step
			if o < olo || o > ohi {
				continue
			}
			fo := f(fromOrdered(o))
			if math.IsNaN(fo) {
				continue
			}
			if (fo >= 0) != (fx >= 0) {
				// The nearest change lies between the last step on this side
				// and this one.
				a, b, found = ox+dir*(step/2), o, true
				if step == 1 {
					a = ox
				}
				fa = f(fromOrdered(a))
				break
			}
		}
	}
	if !found {
		return x
	}
	for a-b > 1 || b-a > 1 {
		m := a + (b-a)/2
		if fm := f(fromOrdered(m)); (fm >= 0) == (fa >= 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	if fa >= 0 {
		return fromOrdered(a)
	}
	return fromOrdered(b)
}

// ordered maps float64 values to int64 so that adjacent floats map to
// adjacent integers and order is preserved (negative floats below zero).
func ordered(x float64) int64 {
	b := int64(math.Float64bits(x))
	if b < 0 {
		return math.MinInt64 - b
	}
	return b
}

func fromOrdered(o int64) float64 {
	if o < 0 {
		return math.Float64frombits(uint64(math.MinInt64 - o))
	}
	return math.Float64frombits(uint64(o))
}
