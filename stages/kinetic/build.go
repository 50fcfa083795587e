package kinetic

import (
	"errors"
	"math"
	"sort"

	"github.com/inflatrace/inflatrace/stages/num"
)

// Tabulation constants.
const (
	// innerOctaves: the octaves next to the origin start at 2^-innerOctaves
	// of the length scale, so that structure of K on small scales around
	// the origin sits in an octave of its own size.
	innerOctaves = 40
	// maxDepth bounds the bisections of one octave: a panel narrower than
	// 2^-maxDepth of its octave means sqrt(K) cannot be integrated there.
	maxDepth = 50
	// gapULPs: an approach to a finite end stops when the gap is fewer
	// than this many units in the last place of the end.
	gapULPs = 4096
	// farGap and farDist mark the "far zone" of an end, where K
	// overflowing, underflowing or becoming NaN ends the table instead of
	// being an error: within 1e-8 of the origin's distance to a finite
	// end, or beyond 1e8 length scales towards an infinite one.
	farGap  = 1e-8
	farDist = 1e8
	// divergentRatio: an end is divergent when the median ratio of
	// successive octave increments of phi is at least this.
	divergentRatio = 0.99
	// noiseULPs scales the per-panel floor of the quadrature tolerance:
	// the change of the integral when x moves by noiseULPs units in the
	// last place.
	noiseULPs = 16
	// poleGrowth: a bisection that fails where K has grown by this factor
	// over the start of its octave is reported as a pole.
	poleGrowth = 1e6
)

// builder holds the state of one tabulation.
type builder struct {
	K               func(num.Jet) num.Jet
	origin, lo, hi  float64
	relTol, phiMax  float64
	maxNodes, count int
	evals           int
	bad             *sample // the first bad value the integrand met
	f               func(float64) float64
	octaveK         float64 // K at the start of the current octave
}

type sample struct{ x, k float64 }

// errFar signals a bad value in the far zone of an end: the table stops.
var errFar = errors.New("far zone")

// sqrtK is the integrand while tabulating: it records the first value of
// K that is not positive and finite and returns NaN for it, which makes
// the quadrature fail.
func (b *builder) sqrtK(x float64) float64 {
	b.evals++
	k := b.K(num.Var(x)).V
	if !(k > 0) || math.IsInf(k, 1) {
		if b.bad == nil {
			b.bad = &sample{x, k}
		}
		return math.NaN()
	}
	return math.Sqrt(k)
}

// kJet is a node candidate with K's jet there.
type kJet struct {
	node
	k num.Jet
}

// jetAt evaluates K at x and returns the node data with K's jet, or the
// error for a bad value (errFar in the far zone).
func (b *builder) jetAt(x float64, far bool) (kJet, error) {
	b.evals++
	j := b.K(num.Var(x))
	k := j.V
	if !(k > 0) || math.IsInf(k, 1) {
		return kJet{}, b.valueError(x, k, far)
	}
	if far && !(normal(k) && normalOrZero(j.D1) && normalOrZero(j.D2)) {
		// K or its derivatives are leaving the float64 range near the end:
		// the table stops before they under- or overflow.
		return kJet{}, errFar
	}
	if !finite(j.D1) || !finite(j.D2) {
		return kJet{}, newError(ErrNotFinite, x, k, "K'(%.10g) = %g, K''(%.10g) = %g inside the domain (%g, %g): the derivatives of K must be finite", x, j.D1, x, j.D2, b.lo, b.hi)
	}
	d1 := 1 / math.Sqrt(k)
	return kJet{node: node{x: x, d1: d1, d2: -(j.D1 / k) / (2 * k)}, k: j}, nil
}

// valueError classifies a bad value of K at x.
func (b *builder) valueError(x, k float64, far bool) error {
	switch {
	case k < 0 || math.IsInf(k, -1):
		return newError(ErrNotPositive, x, k, "K(%.10g) = %g is not positive inside the domain (%g, %g)", x, k, b.lo, b.hi)
	case far:
		return errFar
	case k == 0:
		return newError(ErrNotPositive, x, k, "K(%.10g) = 0 inside the domain (%g, %g): K must be positive", x, b.lo, b.hi)
	case math.IsNaN(k):
		return newError(ErrNotFinite, x, k, "K(%.10g) is NaN inside the domain (%g, %g)", x, b.lo, b.hi)
	default:
		return newError(ErrPole, x, k, "K(%.10g) = +Inf: a pole inside the domain (%g, %g); a pole must be an end of the domain", x, b.lo, b.hi)
	}
}

// boundary is one octave boundary of a side.
type boundary struct {
	x        float64
	approach bool // beyond the length scale (infinite end) or the midpoint (finite end)
	far      bool // in the far zone of the end
}

// boundaries lists the octave boundaries from the origin towards the end
// of the domain in direction d: distances L 2^-j (j = innerOctaves..1)
// from the origin, then, towards an infinite end, distances L 2^k
// (k = 0, 1, ...) with L = max(1, |origin|), and towards a finite end e at
// distance g, gaps g 2^-k (k = 2, 3, ...) until the gap is a few thousand
// ulps of e.
func (b *builder) boundaries(d float64) []boundary {
	end := b.hi
	if d < 0 {
		end = b.lo
	}
	var out []boundary
	last := b.origin
	push := func(x float64, approach, far bool) bool {
		if !(x > b.lo && x < b.hi) || (x-last)*d <= 0 {
			return false
		}
		out = append(out, boundary{x, approach, far})
		last = x
		return true
	}
	if math.IsInf(end, 0) {
		L := math.Max(1, math.Abs(b.origin))
		for j := innerOctaves; j >= 1; j-- {
			push(b.origin+float64(d*math.Ldexp(L, -j)), false, false)
		}
		for k := 0; ; k++ {
			dist := math.Ldexp(L, k)
			x := b.origin + float64(d*dist)
			if math.IsInf(x, 0) || math.Abs(x) > 1e300 {
				break
			}
			push(x, true, dist >= farDist*L)
		}
		return out
	}
	g := math.Abs(end - b.origin)
	for j := innerOctaves; j >= 1; j-- {
		push(b.origin+float64(d*math.Ldexp(g, -j)), false, false)
	}
	minGap := math.Max(gapULPs*ulp(end), 1e-290)
	for k := 2; ; k++ {
		gap := math.Ldexp(g, -k)
		if gap < minGap {
			break
		}
		if !push(end-float64(d*gap), true, gap <= float64(farGap*g)) && end-float64(d*gap) == end {
			break
		}
	}
	return out
}

// sideResult is the table on one side of the origin, outward.
type sideResult struct {
	nodes []node
	end   float64 // canonical image of the domain's end on this side
}

// neumaier is compensated summation (Neumaier 1974, ZAMM 54, 39).
type neumaier struct{ s, c float64 }

func (n *neumaier) add(x float64) {
	t := n.s + x
	if math.Abs(n.s) >= math.Abs(x) {
		n.c += (n.s - t) + x
	} else {
		n.c += (x - t) + n.s
	}
	n.s = t
}

func (n *neumaier) value() float64 { return n.s + n.c }

// side tabulates from the origin towards the end in direction d.
func (b *builder) side(d float64, origin kJet) (sideResult, error) {
	var res sideResult
	var sum neumaier
	prev := origin
	var incs []float64
	stop := "resolution"
	for _, bd := range b.boundaries(d) {
		start := len(res.nodes)
		b.octaveK = prev.k.V
		last, err := b.octave(prev, bd, &sum, &res.nodes)
		if err == errFar {
			res.nodes = res.nodes[:start]
			stop = "far"
			break
		}
		if err != nil {
			return res, err
		}
		inc := math.Abs(last.phi - prev.phi)
		prev = last
		if bd.approach {
			incs = append(incs, inc)
		}
		if math.Abs(prev.phi) >= b.phiMax {
			stop = "phimax"
			break
		}
		if bd.approach && inc <= 1e-17*math.Max(1, math.Abs(prev.phi)) {
			stop = "converged"
			break
		}
	}
	res.end = d * math.Inf(1)
	if stop == "phimax" {
		return res, nil
	}
	rho, ok := medianRatio(incs)
	switch {
	case stop == "converged":
		if ok && rho < 1 {
			res.end = prev.phi + d*incs[len(incs)-1]*rho/(1-rho)
		} else {
			res.end = prev.phi
		}
	case ok && rho < divergentRatio:
		res.end = prev.phi + d*incs[len(incs)-1]*rho/(1-rho)
	}
	return res, nil
}

// medianRatio returns the median of the ratios of successive increments
// over the last (up to) eight, and whether at least three were available.
func medianRatio(incs []float64) (float64, bool) {
	var r []float64
	for i := len(incs) - 1; i >= 1 && len(r) < 8; i-- {
		if incs[i-1] > 0 {
			r = append(r, incs[i]/incs[i-1])
		}
	}
	if len(r) < 3 {
		return 0, false
	}
	sort.Float64s(r)
	n := len(r)
	if n%2 == 1 {
		return r[n/2], true
	}
	return 0.5 * (r[n/2-1] + r[n/2]), true
}

// octave partitions [prev.x, bd.x] into accepted panels, appending their
// far nodes in outward order, and returns the last.
func (b *builder) octave(prev kJet, bd boundary, sum *neumaier, out *[]node) (kJet, error) {
	c, err := b.jetAt(bd.x, bd.far)
	if err != nil {
		return kJet{}, err
	}
	return b.panel(prev, c, 0, bd.far, sum, out)
}

// panel integrates sqrt(K) over [a.x, c.x] with one Gauss–Kronrod rule,
// accepting it when the error estimate meets the tolerance and bisecting
// it otherwise. It returns c with its phi.
func (b *builder) panel(a, c kJet, depth int, far bool, sum *neumaier, out *[]node) (kJet, error) {
	floor := tinyAbs
	if noPoleInside(a, c) {
		floor = math.Max(floor, noiseFloor(a, c))
	}
	q := num.QuadSettings{RelTol: b.relTol, AbsTol: floor, MaxIntervals: 1}
	r, qerr := num.Integrate(b.f, a.x, c.x, &q)
	if b.bad != nil {
		s := *b.bad
		b.bad = nil
		return kJet{}, b.valueError(s.x, s.k, far)
	}
	if qerr == nil {
		if err := b.checkMinimum(a, c); err != nil {
			return kJet{}, err
		}
		sum.add(r.Value)
		c.phi = sum.value()
		if b.count++; b.count > b.maxNodes {
			return kJet{}, newError(ErrTooLarge, c.x, c.k.V, "more than %d nodes needed to tabulate the domain (%g, %g) (reached x = %.10g)", b.maxNodes, b.lo, b.hi, c.x)
		}
		*out = append(*out, c.node)
		return c, nil
	}
	m := a.x + float64(0.5*(c.x-a.x))
	if m == a.x || m == c.x || depth >= maxDepth {
		if far {
			return kJet{}, errFar
		}
		return kJet{}, b.roughError(a, c)
	}
	mid, err := b.jetAt(m, far)
	if err != nil {
		return kJet{}, err
	}
	if mid, err = b.panel(a, mid, depth+1, far, sum, out); err != nil {
		return kJet{}, err
	}
	return b.panel(mid, c, depth+1, far, sum, out)
}

// noPoleInside reports whether, seen from both ends of the panel [a, c]
// (a nearer the origin), K shows no pole inside the panel; only then may
// the quadrature tolerance be floored by the rounding noise of x
// (noiseFloor), which near a pole at an end of the domain limits what the
// quadrature can resolve. In the outward coordinate u, a power law
// K ∝ (u_p - u)^(-m) has K_u/K = m/(u_p - u) and K_uu/K_u = (m+1)/(u_p - u),
// so u_p - u = 1/(K_uu/K_u - K_u/K); a difference <= 0 means growth slower
// than any pole, and an end where K does not grow outward sees no pole
// ahead. K growing outward at a but falling at c means a maximum, perhaps
// a pole, inside. A pole inside the panel fails the test, and the panel is
// then bisected down to the pole (ErrPole).
func noPoleInside(a, c kJet) bool {
	d := 1.0
	if c.x < a.x {
		d = -1
	}
	if d*a.k.D1 > 0 && d*c.k.D1 < 0 {
		return false
	}
	margin := 0.01 * math.Abs(c.x-a.x)
	for _, e := range [2]kJet{a, c} {
		ku := d * e.k.D1
		if !(ku > 0) {
			continue
		}
		inv := e.k.D2/ku - ku/e.k.V // 1/(u_p - u)
		if inv > 0 && float64(d*(e.x-c.x))+1/inv < -margin {
			return false
		}
	}
	return true
}

// checkMinimum refuses a panel across which K has a minimum whose
// quadratic model (from the node with the smaller K) reaches zero: a zero
// of K inside the domain that the samples straddle.
func (b *builder) checkMinimum(a, c kJet) error {
	l, r := a, c
	if r.x < l.x {
		l, r = r, l
	}
	if !(l.k.D1 < 0 && r.k.D1 > 0) {
		return nil
	}
	e := l
	if r.k.V < l.k.V {
		e = r
	}
	if !(e.k.D2 > 0) {
		return nil
	}
	kmin := e.k.V - e.k.D1*e.k.D1/(2*e.k.D2)
	if kmin > 1e-12*math.Max(l.k.V, r.k.V) {
		return nil
	}
	z := e.x - e.k.D1/e.k.D2
	return newError(ErrNotPositive, z, kmin, "K vanishes near x = %.10g inside the domain (%g, %g) (K = %g at %.10g, %g at %.10g): K must be positive", z, b.lo, b.hi, l.k.V, l.x, r.k.V, r.x)
}

// noiseFloor is the change of the integral of sqrt(K) over [a, c] when x
// moves by noiseULPs units in the last place: |c - a| max |(sqrt K)'| ulp.
func noiseFloor(a, c kJet) float64 {
	s := func(j kJet) float64 { return math.Abs(j.k.D1) / (2 * math.Sqrt(j.k.V)) }
	u := ulp(math.Max(math.Abs(a.x), math.Abs(c.x)))
	return noiseULPs * math.Abs(c.x-a.x) * math.Max(s(a), s(c)) * u
}

// roughError reports a panel that cannot be resolved: a pole when K has
// grown far above its value at the start of the octave, otherwise a point
// where K is too rough to integrate.
func (b *builder) roughError(a, c kJet) error {
	x := 0.5 * (a.x + c.x)
	k := b.K(num.Var(x)).V
	big := math.Max(k, math.Max(a.k.V, c.k.V))
	if big > poleGrowth*b.octaveK {
		return newError(ErrPole, x, k, "the integral of sqrt(K) does not converge near x = %.10g (K grows to %g there from %g): a pole inside the domain (%g, %g); a pole must be an end of the domain", x, big, b.octaveK, b.lo, b.hi)
	}
	return newError(ErrNotSmooth, x, k, "the integral of sqrt(K) cannot be resolved near x = %.10g (panel [%.10g, %.10g], K from %g to %g): K jumps or has a kink there", x, a.x, c.x, a.k.V, c.k.V)
}

// ulp returns the spacing of float64 values at |x| (the smallest subnormal
// for x = 0).
func ulp(x float64) float64 {
	x = math.Abs(x)
	return math.Nextafter(x, math.Inf(1)) - x
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// normal reports whether |x| lies in [1e-290, 1e290], far enough from the
// ends of the float64 range that ratios and squares of it are safe.
func normal(x float64) bool { x = math.Abs(x); return x >= 1e-290 && x <= 1e290 }

func normalOrZero(x float64) bool { return x == 0 || normal(x) }
