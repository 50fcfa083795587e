package slowroll

import (
	"fmt"
	"math"
	"sync"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Solution is a model together with its end of inflation; it answers
// "where is the field N e-folds before the end" and what the observables
// are there. It keeps PhiAt's bracket between calls (safe for concurrent
// use), so it must not be copied after first use; a solution whose Model,
// End or Settings are changed builds a new bracket.
type Solution struct {
	Model    *model.Model
	End      End
	Settings *Settings

	mu   sync.Mutex
	grid *efoldGrid // PhiAt's bracket, built on first use
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

// Efolds returns N(phi) = integral from phi_end to phi of V/V' dphi (in
// closed form where the model has one, model.Model.Efolds).
func (sol *Solution) Efolds(phi float64) (float64, error) {
	return sol.segment(sol.End.Phi, phi)
}

// segment returns the first-order e-folds from a to b: the model's closed
// form (model.Model.Efolds) where it has one and it is finite, else the
// adaptive quadrature of V/V'.
func (sol *Solution) segment(a, b float64) (float64, error) {
	if f := sol.Model.Efolds; f != nil {
		if n := f(a, b); finite(n) {
			return n, nil
		}
	}
	r, err := settleQuad(num.Integrate(sol.dNdphi, a, b, sol.Settings.quad()))
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
//
// The root of N(phi) = N is bracketed on the solution's e-fold grid
// (efoldGrid: field values behind the end, N accumulated segment by
// segment, built once and shared by every call) and then solved by
// safeguarded Newton steps (solveIn). The grid does not depend on the N
// asked for, so the result is the same function of N whatever was asked
// before.
func (sol *Solution) PhiAt(N float64) (float64, error) {
	if !(N >= 0) || math.IsInf(N, 0) {
		return 0, fmt.Errorf("e-folds N = %g: want a finite N >= 0", N)
	}
	if N == 0 {
		return sol.End.Phi, nil
	}
	c, err := sol.bracket(N)
	if err != nil {
		return 0, err
	}
	return sol.solveIn(c, N)
}

// EfoldsBetween returns the first-order e-folds from a to b, the integral
// of V/V' from a to b (positive when b lies behind a, towards earlier
// times), computed as Efolds computes it.
func (sol *Solution) EfoldsBetween(a, b float64) (float64, error) {
	return sol.segment(a, b)
}

// Near returns a field value about N e-folds before the end of inflation
// and its e-fold count n = N(phi), for a search that needs a point of
// known count near N rather than N itself (reheat's matching, which
// solves for N* and the pivot together). phi is the inverse Hermite
// interpolant of PhiAt's bracket cell for N, and n is integrated from the
// nearer end of the cell: one quadrature, where PhiAt would go on to solve
// N(phi) = N. Like PhiAt, the result is a function of N alone, and a
// count beyond the field range is a *RangeError.
func (sol *Solution) Near(N float64) (phi, n float64, err error) {
	if !(N >= 0) || math.IsInf(N, 0) {
		return 0, 0, fmt.Errorf("e-folds N = %g: want a finite N >= 0", N)
	}
	if N == 0 {
		return sol.End.Phi, 0, nil
	}
	c, err := sol.bracket(N)
	if err != nil {
		return 0, 0, err
	}
	x := hermiteInverse(c, N)
	if !finite(x) || (x-c.a)*(x-c.b) >= 0 {
		x = c.a + (c.b-c.a)*(N-c.Na)/(c.Nb-c.Na)
	}
	from, Nfrom := c.a, c.Na
	if math.Abs(c.b-x) < math.Abs(x-c.a) {
		from, Nfrom = c.b, c.Nb
	}
	dN, err := sol.segment(from, x)
	if err != nil {
		return 0, 0, err
	}
	return x, Nfrom + dN, nil
}

// efoldGrid is PhiAt's bracket: field values behind the end of inflation
// (the first is End.Phi), at steps that start at about one e-fold (|V/V'|
// at the end) and double while N less than quintuples across one, each
// shortened where N would grow more than 16-fold, and each at most 90% of
// the way to the edge of the range (the integrand may diverge there),
// with N accumulated segment by segment. It is extended on demand; its
// points depend only on the solution.
type efoldGrid struct {
	model    *model.Model
	end      End
	settings *Settings
	pts      []gridPoint
	first    [8]gridPoint // pts' first backing array: a grid of a closed-form count has about six points
	h        float64      // the next step
	edge     bool         // the edge of the range is reached: no further point
	err      error        // a quadrature failure while extending
}

// gridPoint is one point of the e-fold grid: the field, N there and the
// slope dN/dphi = V/V'.
type gridPoint struct {
	phi, n, slope float64
}

// cell is one grid interval [a, b] (in field order of earlier times) with
// N(a) = Na < N <= Nb = N(b) and the slopes dN/dphi at its ends.
type cell struct {
	a, b, Na, Nb, sa, sb float64
}

// bracket returns the first grid cell whose far end holds at least N
// e-folds, extending the grid as needed.
func (sol *Solution) bracket(N float64) (cell, error) {
	sol.mu.Lock()
	defer sol.mu.Unlock()
	g := sol.grid
	if g == nil || g.model != sol.Model || g.end != sol.End || g.settings != sol.Settings {
		j := sol.Model.At(sol.End.Phi)
		s0 := j.V / j.D1
		h := math.Abs(s0) // about one e-fold where the slope changes slowly
		if c := math.Abs(j.D1 / j.D2); c < h {
			// The slope changes over |V'/V''|: for a steep plateau (an
			// alpha-attractor at small alpha) far less than V/V', and a
			// first step of V/V' would leap over every e-fold at once.
			h = c
		}
		if !(h > 0) || !finite(h) {
			h = 1e-3
		}
		g = &efoldGrid{model: sol.Model, end: sol.End, settings: sol.Settings, h: h}
		g.pts = append(g.first[:0], gridPoint{phi: sol.End.Phi, slope: s0})
		sol.grid = g
	}
	back := -sol.End.Direction // the direction of earlier times
	edge := sol.edge()
	for g.pts[len(g.pts)-1].n < N {
		if g.err != nil {
			return cell{}, g.err
		}
		last := len(g.pts) - 1
		a, Na := g.pts[last].phi, g.pts[last].n
		room := math.Abs(edge - a)
		step := math.Min(g.h, 0.9*room)
		b := a + float64(back*step)
		// The bracket stops at the edge of the range, or within 1e-280 M_p
		// of it (short of denormal numbers, where V' loses its digits): a
		// pivot closer to a hilltop than that is beyond double precision.
		if g.edge || last > 4000 || step <= 1e-15*math.Abs(a) || b == a || room < 1e-280 {
			g.edge = true
			return cell{}, &RangeError{sol.Model.Describe(), sol.Model.Lo, sol.Model.Hi,
				fmt.Sprintf("only %.4g e-folds of inflation before the edge of the field range; %g requested", Na, N)}
		}
		dN, err := sol.segment(a, b)
		if err != nil {
			g.err = err
			return cell{}, err
		}
		grow := math.Max(Na, 1)
		if !(dN <= 15*grow) && step > 1e-12*math.Max(1, math.Abs(a)) {
			// N would grow more than 16-fold across the step (or the
			// integral is not finite): take a shorter one, so that a cell
			// spans a modest range of N and its interpolant (in ln N) is a
			// good start for Newton's method. (Cells of up to 16x, with
			// steps doubled while N less than quintuples, cost a third fewer
			// quadratures than cells of 4x, for at most one more Newton
			// step.)
			g.h = step / 4
			continue
		}
		if !finite(dN) {
			g.edge = true
			return cell{}, &RangeError{sol.Model.Describe(), sol.Model.Lo, sol.Model.Hi,
				fmt.Sprintf("the e-fold integral diverges at phi = %.6g (V' = 0 there: the field would stop before %g e-folds)", b, N)}
		}
		g.pts = append(g.pts, gridPoint{phi: b, n: Na + dN, slope: sol.dNdphi(b)})
		if dN < 4*grow {
			g.h *= 2
		}
	}
	k := 1
	for g.pts[k].n < N {
		k++
	}
	p, q := g.pts[k-1], g.pts[k]
	return cell{a: p.phi, b: q.phi, Na: p.n, Nb: q.n, sa: p.slope, sb: q.slope}, nil
}

// solveIn finds phi in the cell c with N(phi) = N by Newton steps on
// N(phi) - N (dN/dphi = V/V' exact), each step's e-folds integrated from
// the previous iterate, falling back to bisection whenever a step leaves
// the bracket. It starts from the inverse cubic Hermite interpolant of
// the cell (its ends and slopes), and once |N(phi) - N| <= 1e-12 max(1, N)
// applies one last Newton correction, which needs no quadrature.
func (sol *Solution) solveIn(c cell, N float64) (float64, error) {
	lo, hi := c.a, c.b // N(lo) <= N <= N(hi)
	Nlo, Nhi := c.Na, c.Nb
	x := hermiteInverse(c, N)
	if !finite(x) || (x-lo)*(x-hi) >= 0 {
		x = lo + (hi-lo)*(N-Nlo)/(Nhi-Nlo)
	}
	// N(x) from the nearer end of the cell.
	from, Nfrom := lo, Nlo
	if math.Abs(hi-x) < math.Abs(x-lo) {
		from, Nfrom = hi, Nhi
	}
	for iter := 0; iter < 100; iter++ {
		dN, err := sol.segment(from, x)
		if err != nil {
			return 0, err
		}
		Nx := Nfrom + dN
		F := Nx - N
		slope := sol.dNdphi(x)
		if math.Abs(F) <= 1e-12*math.Max(1, N) {
			if next := x - F/slope; finite(next) && (next-lo)*(next-hi) <= 0 {
				return next, nil
			}
			return x, nil
		}
		if F < 0 {
			lo, Nlo = x, Nx
		} else {
			hi, Nhi = x, Nx
		}
		next := x - F/slope
		if Nx > 0 {
			next = x - detmath.Log(Nx/N)*Nx/slope
		}
		if !finite(next) || (next-lo)*(next-hi) >= 0 {
			next = 0.5 * (lo + hi)
		}
		if next == x {
			return x, nil
		}
		from, Nfrom, x = x, Nx, next
	}
	return 0, fmt.Errorf("%s: e-fold root for N = %g did not converge", sol.Model.Describe(), N)
}

// hermiteInverse returns phi(N) from the cubic Hermite interpolant of
// phi as a function of N on the cell: phi = a, b at N = Na, Nb with
// dphi/dN = 1/slope at both ends (standard cubic Hermite basis, e.g.
// Press et al., Numerical Recipes, 3rd ed. (2007), sect. 3.5, from
// memory).
func hermiteInverse(c cell, N float64) float64 {
	if c.Na > 0 {
		w := detmath.Log(c.Nb / c.Na)
		u := detmath.Log(N/c.Na) / w
		u2, u3 := float64(u*u), float64(float64(u*u)*u)
		return float64((float64(2*u3)-float64(3*u2)+1)*c.a) + float64(float64((u3-float64(2*u2)+u)*w)*c.Na)/c.sa + float64((float64(-2*u3)+float64(3*u2))*c.b) + float64(float64((u3-u2)*w)*c.Nb)/c.sb
	}
	w := c.Nb - c.Na
	u := (N - c.Na) / w
	u2, u3 := float64(u*u), float64(float64(u*u)*u)
	return float64((float64(2*u3)-float64(3*u2)+1)*c.a) + float64((u3-float64(2*u2)+u)*w)/c.sa + float64((float64(-2*u3)+float64(3*u2))*c.b) + float64((u3-u2)*w)/c.sb
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

// quadFloor is the relative error estimate below which an e-fold
// quadrature that stopped short of its own tolerance is still accepted.
// A potential written in a native field near a pole of its kinetic
// function (a user's T-model on the Poincaré disk at small alpha) has a
// slope V_x/sqrt(K) known only to the rounding of 1 - x^2/(6 alpha), a
// relative 1e-11 or so, which no partition integrates to 1e-12; an e-fold
// count good to 1e-9 moves n_s by less than 1e-11.
const quadFloor = 1e-9

// settleQuad is num.AcceptAtFloor at quadFloor.
func settleQuad(r num.QuadResult, err error) (num.QuadResult, error) {
	return num.AcceptAtFloor(r, err, quadFloor)
}
