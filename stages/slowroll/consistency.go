package slowroll

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num"
)

// ConsistencyError reports a pivot that fails the self-consistency checks
// every result must pass before it is reported (CheckPivot). It is never a
// result: the node that meets it fails with this reason.
type ConsistencyError struct {
	Model string
	Phi   float64 // the pivot field [M_p]
	N     float64 // the e-folds asked for
	Msg   string
}

func (e *ConsistencyError) Error() string {
	return fmt.Sprintf("%s: the pivot N = %g e-folds before the end fails the self-consistency check: %s", e.Model, e.N, e.Msg)
}

// PivotCheck is what CheckPivot verifies of a pivot field: the e-folds the
// method's count must give there by an independent first-order quadrature
// (Target, with Shift added when the method's count is not first order)
// and the relative tolerance of that comparison.
type PivotCheck struct {
	// Target is the first-order slow-roll e-fold count the method solved
	// for at the pivot: N* itself, or N* minus an end correction.
	Target float64
	// Shift, when not nil, is added to the first-order count at phi
	// before the comparison (EfoldShift for the second-order count).
	Shift func(phi float64) float64
	// RelTol is the tolerance of |N(phi) - Target| / max(1, Target);
	// 0 means 1e-8. A negative RelTol skips the e-fold comparison (the
	// exact method counts e-folds on the exact background, which the
	// slow-roll count matches only to O(1)).
	RelTol float64
}

// CheckPivot verifies a pivot field phi before it is reported: phi lies
// strictly between the end of inflation and the edge of the searched
// range, epsilon_V < 1 there (the pivot is inflating), the potential and
// its slope are finite and positive, and the first-order e-fold count from
// the end to phi, integrated afresh by adaptive quadrature (not the
// e-fold bracket PhiAt solves on), equals the count the method solved for.
//
// The checks are the ones a careful user would make by hand on any
// published number; a failure is a *ConsistencyError naming what failed.
func (sol *Solution) CheckPivot(phi float64, c PivotCheck) error {
	m := sol.Model
	fail := func(format string, a ...any) error {
		return &ConsistencyError{Model: m.Describe(), Phi: phi, N: c.Target, Msg: fmt.Sprintf(format, a...)}
	}
	if !finite(phi) {
		return fail("phi* = %g is not a number", phi)
	}
	end, edge := sol.End.Phi, sol.edge()
	if !((phi-end)*(edge-phi) > 0) {
		return fail("phi* = %.10g is not strictly between the end of inflation (%.10g) and the edge of the field range (%.10g)", phi, end, edge)
	}
	p := At(m, phi)
	if !(p.V > 0) || !finite(p.V) {
		return fail("V(phi* = %.10g) = %g", phi, p.V)
	}
	if p.Epsilon == 0 {
		return &RangeError{m.Describe(), m.Lo, m.Hi, fmt.Sprintf("the potential is flat to double precision at the pivot phi* = %.6g (epsilon_V = 0): the pivot lies too close to the top of the hill for r and A_s to be computed", phi)}
	}
	if !(p.Epsilon < 1) {
		return fail("epsilon_V(phi* = %.10g) = %g: the pivot is not inflating", phi, p.Epsilon)
	}
	if !finite(p.Eta) || !finite(p.Xi2) {
		return fail("eta_V = %g, xi^2_V = %g at phi* = %.10g", p.Eta, p.Xi2, phi)
	}
	if c.RelTol < 0 {
		return nil
	}
	tol := c.RelTol
	if tol == 0 {
		tol = 1e-8
	}
	// An independent count: one adaptive quadrature of V/V' over the
	// whole stretch, with its own partition (not the bracket's segments,
	// nor a closed form), to 1e-11: a thousandth of the comparison's
	// tolerance at the default (a tolerance of 1e-13 costs a third more
	// evaluations and resolves nothing more there).
	q, err := settleQuad(num.Integrate(sol.dNdphi, end, phi, &num.QuadSettings{RelTol: 1e-11, AbsTol: 1e-12, MaxIntervals: 4000}))
	if err != nil {
		return fail("the e-fold integral from the end to phi* = %.10g: %v", phi, err)
	}
	n := q.Value
	if c.Shift != nil {
		n += c.Shift(phi)
	}
	if !(math.Abs(n-c.Target) <= tol*math.Max(1, math.Abs(c.Target))) {
		return fail("the e-folds from the end to phi* = %.10g, integrated afresh, are %.12g, not %.12g (relative tolerance %g)", phi, n, c.Target, tol)
	}
	return nil
}

// CheckObservables refuses observables that are not finite numbers.
func CheckObservables(model string, N float64, o Observables) error {
	return checkObservables(func() string { return model }, N, o)
}

// CheckObservables is the package's CheckObservables for the solution's
// model, whose description is written only when the check fails.
func (sol *Solution) CheckObservables(N float64, o Observables) error {
	return checkObservables(sol.Model.Describe, N, o)
}

func checkObservables(model func() string, N float64, o Observables) error {
	for _, v := range [...]struct {
		name string
		x    float64
	}{{"n_s", o.Ns}, {"r", o.R}, {"alpha_s", o.AlphaS}, {"n_t", o.Nt}} {
		if !finite(v.x) {
			return &ConsistencyError{Model: model(), N: N, Msg: fmt.Sprintf("%s = %g is not a finite number", v.name, v.x)}
		}
	}
	if !(o.R >= 0) {
		return &ConsistencyError{Model: model(), N: N, Msg: fmt.Sprintf("r = %g is negative", o.R)}
	}
	return nil
}
