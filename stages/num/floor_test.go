package num

import (
	"errors"
	"math"
	"testing"
)

// TestAcceptAtFloor: a failed quadrature passes only with a finite value
// whose error estimate is within floor relative to it; a converged one
// always passes.
func TestAcceptAtFloor(t *testing.T) {
	fail := errors.New("did not converge")
	for _, c := range []struct {
		r    QuadResult
		err  error
		pass bool
	}{
		{QuadResult{Value: 10, ErrEst: 9e-9}, fail, true},
		{QuadResult{Value: 10, ErrEst: 1.1e-8}, fail, false},
		{QuadResult{Value: 0.5, ErrEst: 9e-10}, fail, true}, // relative to max(1, |value|)
		{QuadResult{Value: math.Inf(1), ErrEst: 0}, fail, false},
		{QuadResult{Value: math.NaN(), ErrEst: 0}, fail, false},
		{QuadResult{Value: 3, ErrEst: 1}, nil, true},
	} {
		_, err := AcceptAtFloor(c.r, c.err, 1e-9)
		if (err == nil) != c.pass {
			t.Errorf("%+v: error %v, want pass %v", c.r, err, c.pass)
		}
	}
}
