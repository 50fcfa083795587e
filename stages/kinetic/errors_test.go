package kinetic

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/num"
)

// TestErrors: every class of bad input is refused with a typed error that
// names the place and the value (architecture habit 3). Each case is built
// by hand so that the fault and its location are known.
func TestErrors(t *testing.T) {
	inf := math.Inf(1)
	one := func(num.Jet) num.Jet { return num.Const(1) }
	shift := func(x num.Jet, c float64) num.Jet { return num.AddConst(x, -c) }
	z := 1 / math.Pi // a location no bisection lands on by construction
	cases := []struct {
		name           string
		K              func(num.Jet) num.Jet
		origin, lo, hi float64
		s              *Settings
		want           error
		near           float64 // where the error must point (NaN: no place)
		words          []string
	}{
		{"empty domain", one, 0, 1, -1, nil, ErrDomain, math.NaN(), []string{"domain (1, -1) is empty"}},
		{"NaN end", one, 0, math.NaN(), 1, nil, ErrDomain, math.NaN(), []string{"empty"}},
		{"origin outside", one, 5, 0, 1, nil, ErrOrigin, 5, []string{"origin 5", "(0, 1)"}},
		{"origin on the edge", one, 0, 0, 1, nil, ErrOrigin, 0, []string{"not inside"}},
		{"origin infinite", one, inf, 0, inf, nil, ErrOrigin, inf, []string{"not inside"}},
		{"K < 0 on part of the domain", func(x num.Jet) num.Jet { return x }, 0.5, -1, 1, nil, ErrNotPositive, -0.5, []string{"not positive", "(-1, 1)"}},
		{"K < 0 between two positive regions", func(x num.Jet) num.Jet { return num.AddConst(num.Mul(x, x), -0.25) }, 1, -2, 2, nil, ErrNotPositive, 0, []string{"not positive"}},
		{"K = 0 at an interior point", func(x num.Jet) num.Jet { d := shift(x, z); return num.Mul(d, d) }, 0.5, 0, 1, nil, ErrNotPositive, z, []string{"positive"}},
		{"K nearly vanishing at an interior point", func(x num.Jet) num.Jet { d := shift(x, z); return num.AddConst(num.Mul(d, d), 1e-300) }, 0.5, 0, 1, nil, ErrNotPositive, z, []string{"K vanishes near"}},
		{"K NaN on part of the domain", func(x num.Jet) num.Jet { return num.AddConst(num.Sqrt(shift(x, 0.3)), 1) }, 0.5, 0, 1, nil, ErrNotFinite, 0.15, []string{"NaN"}},
		{"K' NaN", func(x num.Jet) num.Jet { return num.Jet{V: 2, D1: math.NaN()} }, 0.5, 0, 1, nil, ErrNotFinite, 0.5, []string{"derivatives of K must be finite"}},
		{"interior double pole", func(x num.Jet) num.Jet { d := shift(x, z); return num.Recip(num.Mul(d, d)) }, 0.5, 0, 1, nil, ErrPole, z, []string{"pole inside the domain (0, 1)"}},
		{"interior integrable singularity", func(x num.Jet) num.Jet { return num.Recip(num.Abs(shift(x, 1+z))) }, 0, -1, 3, nil, ErrPole, 1 + z, []string{"pole"}},
		{"interior pole in an approach octave", func(x num.Jet) num.Jet { d := shift(x, 2.9+z/100); return num.Recip(num.Mul(d, d)) }, 0, -1, 3, nil, ErrPole, 2.9 + z/100, []string{"pole"}},
		{"jump of K", func(x num.Jet) num.Jet {
			if x.V < z {
				return num.Const(1)
			}
			return num.Const(4)
		}, 0.5, 0, 1, nil, ErrNotSmooth, z, []string{"jumps or has a kink"}},
		{"too many nodes", diskK(1), 0, -math.Sqrt(6), math.Sqrt(6), &Settings{MaxNodes: 20}, ErrTooLarge, math.NaN(), []string{"more than 20 nodes"}},
	}
	for _, c := range cases {
		m, err := New(c.K, c.origin, c.lo, c.hi, c.s)
		if err == nil {
			lo, hi := m.PhiRange()
			t.Errorf("%s: accepted (image (%g, %g))", c.name, lo, hi)
			continue
		}
		var ke *Error
		if !errors.Is(err, c.want) || !errors.As(err, &ke) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
			continue
		}
		for _, w := range c.words {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", c.name, err, w)
			}
		}
		switch {
		case math.IsNaN(c.near):
		case c.want == ErrNotPositive && c.near == -0.5:
			if !(ke.X < 0) {
				t.Errorf("%s: error at x = %g, want a point where K < 0", c.name, ke.X)
			}
		case c.want == ErrNotPositive && c.near == 0:
			if !(math.Abs(ke.X) < 0.5) {
				t.Errorf("%s: error at x = %g, want one in (-0.5, 0.5)", c.name, ke.X)
			}
		case c.want == ErrNotFinite && c.near == 0.15:
			if !(ke.X < 0.3) {
				t.Errorf("%s: error at x = %g, want one below 0.3", c.name, ke.X)
			}
		default:
			if math.Abs(ke.X-c.near) > 1e-6*math.Max(1, math.Abs(c.near)) && ke.X != c.near {
				t.Errorf("%s: error at x = %.17g, want near %.17g", c.name, ke.X, c.near)
			}
		}
	}
}

// TestOutsideResolvedRange: X refuses a phi beyond the table with
// ErrRange, XJet returns NaN there and Phi returns NaN for x beyond it.
func TestOutsideResolvedRange(t *testing.T) {
	s := math.Sqrt(6.0)
	m := mustMap(t, diskK(1), 0, -s, s, nil)
	e := m.Resolved()
	for _, phi := range []float64{e.PhiHi * 1.5, -1e9, math.NaN(), math.Inf(1)} {
		if _, err := m.X(phi); !errors.Is(err, ErrRange) || !strings.Contains(err.Error(), "resolved canonical range") {
			t.Errorf("X(%g): error %v, want ErrRange", phi, err)
		}
		if j := m.XJet(num.Var(phi)); !math.IsNaN(j.V) || !math.IsNaN(j.D1) || !math.IsNaN(j.D3) {
			t.Errorf("XJet(%g) = %v, want NaN", phi, j)
		}
	}
	for _, x := range []float64{s, -s, 3, math.NaN()} {
		if p := m.Phi(x); !math.IsNaN(p) {
			t.Errorf("Phi(%g) = %g, want NaN", x, p)
		}
	}
}
