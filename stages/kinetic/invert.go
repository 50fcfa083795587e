package kinetic

import (
	"math"
	"sort"

	"github.com/inflatrace/inflatrace/stages/num"
)

// newtonIters bounds the safeguarded Newton iteration of the inverse.
const newtonIters = 200

// Phi returns the canonical field phi(x) = ∫ from the origin to x of
// sqrt(K), or NaN for x outside the resolved native range (Resolved). It is
// the tabulated value at the nearer node of x's panel plus one quadrature
// from that node.
func (m *Map) Phi(x float64) float64 {
	n := m.nodes
	if !(x >= n[0].x && x <= n[len(n)-1].x) {
		return math.NaN()
	}
	i := sort.Search(len(n), func(j int) bool { return n[j].x > x }) - 1
	if i >= len(n)-1 {
		i = len(n) - 2
	}
	if x == n[i].x {
		return n[i].phi
	}
	phi, err := m.phiIn(i, x)
	if err != nil {
		return math.NaN()
	}
	return phi
}

// phiIn returns phi(x) for x in panel i.
func (m *Map) phiIn(i int, x float64) (float64, error) {
	a, c := m.nodes[i], m.nodes[i+1]
	q := num.QuadSettings{RelTol: m.relTol, AbsTol: math.Max(tinyAbs, nodeFloor(a, c))}
	if x-a.x <= c.x-x {
		r, err := num.Integrate(m.sqrtK, a.x, x, &q)
		return a.phi + r.Value, err
	}
	r, err := num.Integrate(m.sqrtK, x, c.x, &q)
	return c.phi - r.Value, err
}

// nodeFloor is noiseFloor for a panel of the table, from the node data:
// |(sqrt K)'| = K^(3/2) |K'|/(2K^2) = |d2|/d1^3.
func nodeFloor(a, c node) float64 {
	s := func(n node) float64 { return math.Abs(n.d2) / (n.d1 * n.d1 * n.d1) }
	u := ulp(math.Max(math.Abs(a.x), math.Abs(c.x)))
	return noiseULPs * math.Abs(c.x-a.x) * math.Max(s(a), s(c)) * u
}

// X returns the native field value x(phi). A phi outside the resolved
// canonical range (Resolved) is an error wrapping ErrRange.
func (m *Map) X(phi float64) (float64, error) {
	x, _, err := m.invert(phi)
	return x, err
}

// XJet returns x(phi) and its first three derivatives with respect to the
// independent variable of the jet phi. Only the value of x comes from the
// numerical inversion; its derivatives with respect to the canonical field
// follow exactly from K's jet at x,
//
//	dx/dphi = K^(-1/2),  d²x/dphi² = -K'/(2K²),
//	d³x/dphi³ = K^(-1/2) (-K''/(2K²) + K'²/K³),
//
// and are composed with phi's own derivatives (Faà di Bruno, num.Compose).
// Outside the resolved range every component is NaN.
func (m *Map) XJet(phi num.Jet) num.Jet {
	x, kj, err := m.invert(phi.V)
	if err != nil {
		nan := math.NaN()
		return num.Jet{V: nan, D1: nan, D2: nan, D3: nan}
	}
	// Written with the ratios K'/K and K''/K so that no power of K under-
	// or overflows.
	k := kj.V
	g1, g2 := kj.D1/k, kj.D2/k
	d1 := 1 / math.Sqrt(k)
	d2 := -0.5 * g1 / k
	d3 := float64(d1*(float64(-0.5*g2)+float64(g1*g1))) / k
	return num.Compose(phi, x, d1, d2, d3)
}

// invert solves phi(x) = phi for x by safeguarded Newton steps inside the
// panel that brackets phi, started from a quintic Hermite interpolant of
// x(phi) on that panel. It returns x and K's jet at x.
func (m *Map) invert(phi float64) (float64, num.Jet, error) {
	n := m.nodes
	if !(phi >= n[0].phi && phi <= n[len(n)-1].phi) {
		return math.NaN(), num.Jet{}, newError(ErrRange, math.NaN(), math.NaN(), "phi = %g is outside the resolved canonical range [%g, %g]", phi, n[0].phi, n[len(n)-1].phi)
	}
	i := sort.Search(len(n), func(j int) bool { return n[j].phi > phi }) - 1
	if i >= len(n)-1 {
		i = len(n) - 2
	}
	a, c := n[i], n[i+1]
	if phi == a.phi {
		return a.x, m.k(num.Var(a.x)), nil
	}
	if phi == c.phi {
		return c.x, m.k(num.Var(c.x)), nil
	}
	// The residual is asked to be a tenth of the map's relative accuracy,
	// relative to phi itself: the table resolves phi relatively down to the
	// origin (its inner octaves), and a potential like h^4 near it needs x
	// to relative accuracy. The step test below ends the iteration where
	// that is below the rounding of x.
	tol := 0.1 * m.relTol * math.Abs(phi)
	lo, hi := a.x, c.x // phi(lo) <= phi <= phi(hi)
	x := hermite(a, c, phi)
	if !(x > lo && x < hi) {
		x = lo + float64(0.5*(hi-lo))
	}
	for iter := 0; iter < newtonIters; iter++ {
		p, err := m.phiIn(i, x)
		if err != nil {
			return math.NaN(), num.Jet{}, newError(ErrRange, x, math.NaN(), "phi = %g: quadrature of sqrt(K) near x = %.10g failed: %v", phi, x, err)
		}
		F := p - phi
		kj := m.k(num.Var(x))
		if math.Abs(F) <= tol {
			return x, kj, nil
		}
		if F < 0 {
			lo = x
		} else {
			hi = x
		}
		s := math.Sqrt(kj.V)
		step := -F / s
		next := x + step
		if next > lo && next < hi {
			// After the step the residual is about sqrt(K) |K'/(4K)| step^2
			// (Newton's quadratic convergence with f = phi(x) - phi,
			// f' = sqrt(K), f'' = K'/(2 sqrt(K))). The estimate is trusted
			// only for a step that is short against the panel and over
			// which sqrt(K) changes little.
			g := math.Abs(kj.D1 / kj.V)
			short := math.Abs(step) <= 1e-4*(c.x-a.x) && g*math.Abs(step) <= 1e-4
			if (short && s*g/4*step*step <= tol) || math.Abs(step) <= 2*ulp(x) {
				return next, m.k(num.Var(next)), nil
			}
		} else {
			next = lo + float64(0.5*(hi-lo))
		}
		if next == x {
			return x, kj, nil
		}
		x = next
	}
	return math.NaN(), num.Jet{}, newError(ErrRange, x, math.NaN(), "phi = %g: the inversion did not converge in %d steps (x = %.17g)", phi, newtonIters, x)
}

// hermite is the quintic Hermite interpolant of x(phi) on the panel
// [a, c] from x, dx/dphi and d2x/dphi2 at both nodes.
func hermite(a, c node, phi float64) float64 {
	h := c.phi - a.phi
	t := (phi - a.phi) / h
	t2 := float64(t * t)
	t3 := float64(t2 * t)
	t4 := float64(t3 * t)
	t5 := float64(t4 * t)
	h1 := t - float64(6*t3) + float64(8*t4) - float64(3*t5)
	h2 := float64(0.5 * (t2 - float64(3*t3) + float64(3*t4) - t5))
	h3 := float64(0.5 * (t3 - float64(2*t4) + t5))
	h4 := float64(-4*t3) + float64(7*t4) - float64(3*t5)
	h5 := float64(10*t3) - float64(15*t4) + float64(6*t5)
	return a.x + float64(h*(float64(h1*a.d1)+float64(h4*c.d1))) + float64(float64(h*h)*(float64(h2*a.d2)+float64(h3*c.d2))) + float64(h5*(c.x-a.x))
}
