package slowroll

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// Solution is a model together with its end of inflation; it answers
// "where is the field N e-folds before the end" and what the observables
// are there.
type Solution struct {
	Model    *model.Model
	End      End
	Settings *Settings
}

// Solve finds the end of inflation of m and returns the solution.
func Solve(m *model.Model, s *Settings) (*Solution, error) {
	e, err := FindEnd(m, s)
	if err != nil {
		return nil, err
	}
	return &Solution{Model: m, End: e, Settings: s}, nil
}

// dNdphi is V/V'.
func (sol *Solution) dNdphi(phi float64) float64 {
	j := sol.Model.At(phi)
	return j.V / j.D1
}

// Efolds returns N(phi) = integral from phi_end to phi of V/V' dphi.
func (sol *Solution) Efolds(phi float64) (float64, error) {
	return sol.segment(sol.End.Phi, phi)
}

func (sol *Solution) segment(a, b float64) (float64, error) {
	r, err := num.Integrate(sol.dNdphi, a, b, sol.Settings.quad())
	if err != nil {
		return 0, fmt.Errorf("%s: e-fold integral from phi=%g to %g: %w", sol.Model.Describe(), a, b, err)
	}
	return r.Value, nil
}

// edge is the end of the field range that lies behind the end of
// inflation, where earlier times are.
func (sol *Solution) edge() float64 {
	if sol.End.Direction > 0 {
		return sol.Model.Lo
	}
	return sol.Model.Hi
}

// PhiAt returns the field value N e-folds before the end of inflation.
func (sol *Solution) PhiAt(N float64) (float64, error) {
	if !(N >= 0) || math.IsInf(N, 0) {
		return 0, fmt.Errorf("e-folds N = %g: want a finite N >= 0", N)
	}
	if N == 0 {
		return sol.End.Phi, nil
	}
	back := -sol.End.Direction // the direction of earlier times
	edge := sol.edge()
	// Bracket: steps growing geometrically from the end, each at most 90%
	// of the way to the edge of the range (the integrand may diverge there).
	a, Na := sol.End.Phi, 0.0
	h := math.Abs(sol.dNdphi(a)) // about one e-fold
	if !(h > 0) || !finite(h) {
		h = 1e-3
	}
	for iter := 0; ; iter++ {
		room := math.Abs(edge - a)
		step := math.Min(h, 0.9*room)
		b := a + back*step
		if iter > 400 || step <= 1e-15*math.Max(1, math.Abs(a)) || b == a {
			return 0, &RangeError{sol.Model.Describe(), sol.Model.Lo, sol.Model.Hi,
				fmt.Sprintf("only %.4g e-folds of inflation before the edge of the field range; %g requested", Na, N)}
		}
		dN, err := sol.segment(a, b)
		if err != nil {
			return 0, err
		}
		if Na+dN >= N {
			return sol.solveIn(a, Na, b, Na+dN, N)
		}
		a, Na = b, Na+dN
		h *= 2
	}
}

// solveIn finds phi in [a, b] (in field order of earlier times) with
// N(phi) = N, given N(a) = Na <= N <= Nb = N(b), by Newton steps on
// N(a) + integral_a^phi V/V' = N, falling back to bisection whenever a
// step leaves the bracket.
func (sol *Solution) solveIn(a, Na, b, Nb, N float64) (float64, error) {
	lo, hi := a, b // N(lo) <= N <= N(hi)
	Nlo, Nhi := Na, Nb
	// Start from linear interpolation in N.
	x := lo + (hi-lo)*(N-Nlo)/(Nhi-Nlo)
	for iter := 0; iter < 100; iter++ {
		Nx, err := sol.segment(a, x)
		if err != nil {
			return 0, err
		}
		Nx += Na
		F := Nx - N
		if math.Abs(F) <= 1e-12*math.Max(1, N) {
			return x, nil
		}
		if F < 0 {
			lo, Nlo = x, Nx
		} else {
			hi, Nhi = x, Nx
		}
		next := x - F/sol.dNdphi(x)
		if !finite(next) || (next-lo)*(next-hi) >= 0 {
			next = 0.5 * (lo + hi)
		}
		if next == x {
			return x, nil
		}
		x = next
	}
	return 0, fmt.Errorf("%s: e-fold root for N = %g did not converge", sol.Model.Describe(), N)
}

// Evaluate returns the slow-roll point and first-order observables N
// e-folds before the end of inflation.
func (sol *Solution) Evaluate(N float64) (Point, Observables, error) {
	phi, err := sol.PhiAt(N)
	if err != nil {
		return Point{}, Observables{}, err
	}
	p := At(sol.Model, phi)
	p.N = N
	return p, FirstOrder(p), nil
}
