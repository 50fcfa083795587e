package kinetic

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num"
)

// Settings controls New. Nil or zero fields mean the defaults.
type Settings struct {
	// RelTol is the relative accuracy asked of the quadrature of sqrt(K) on
	// every panel, and hence of phi(x); default 1e-13. Near a pole it is
	// floored by the phi-width of a few units in the last place of x.
	RelTol float64
	// PhiMax ends the table, on each side, at the first octave boundary
	// where |phi| exceeds it; default 1e3 (reduced Planck units).
	PhiMax float64
	// MaxNodes bounds the size of the table; default 50000.
	MaxNodes int
}

// Defaults of Settings.
const (
	DefaultRelTol   = 1e-13
	DefaultPhiMax   = 1e3
	DefaultMaxNodes = 50000
)

func (s *Settings) relTol() float64 {
	if s == nil || !(s.RelTol > 0) {
		return DefaultRelTol
	}
	return s.RelTol
}

func (s *Settings) phiMax() float64 {
	if s == nil || !(s.PhiMax > 0) {
		return DefaultPhiMax
	}
	return s.PhiMax
}

func (s *Settings) maxNodes() int {
	if s == nil || s.MaxNodes <= 0 {
		return DefaultMaxNodes
	}
	return s.MaxNodes
}

// node is one tabulated point: the native field, its canonical image and
// the exact first two derivatives of x(phi) there.
type node struct {
	x, phi float64
	d1, d2 float64 // dx/dphi = K^(-1/2), d2x/dphi2 = -K'/(2 K^2)
}

// Extent is the part of the domain a Map resolves: the native interval
// [XLo, XHi] covered by the table and its canonical image [PhiLo, PhiHi].
type Extent struct {
	XLo, XHi     float64
	PhiLo, PhiHi float64
}

// Stats describes the table New built.
type Stats struct {
	Nodes int // table nodes, the origin included
	Evals int // evaluations of K while building
}

// Map is the canonical normalisation of one kinetic function on one
// domain: phi(x) = ∫ from origin to x of sqrt(K) and its inverse.
type Map struct {
	k              func(num.Jet) num.Jet
	origin, lo, hi float64
	nodes          []node
	imgLo, imgHi   float64 // canonical image of the domain (may be ±Inf)
	relTol         float64
	stats          Stats
}

// New builds the canonical map of the native field x with kinetic function
// K on the open domain (lo, hi), with phi(origin) = 0. K is written with
// num.Jet operations, so that K, K' and K” are exact; either end of the
// domain may be infinite or a pole of K. The domain is scanned while the
// map is tabulated: K <= 0, NaN or +Inf, a pole or a point where sqrt(K)
// cannot be integrated inside the domain are errors (*Error, wrapping
// ErrNotPositive, ErrNotFinite, ErrPole or ErrNotSmooth) naming the place;
// so are an empty domain (ErrDomain) and an origin not strictly inside it
// (ErrOrigin). s may be nil for the defaults.
func New(K func(x num.Jet) num.Jet, origin, lo, hi float64, s *Settings) (*Map, error) {
	if K == nil {
		panic("kinetic.New: nil kinetic function")
	}
	if math.IsNaN(lo) || math.IsNaN(hi) || !(lo < hi) {
		return nil, newError(ErrDomain, math.NaN(), math.NaN(), "domain (%g, %g) is empty", lo, hi)
	}
	if !(origin > lo && origin < hi) || math.IsInf(origin, 0) {
		return nil, newError(ErrOrigin, origin, math.NaN(), "origin %g is not inside the domain (%g, %g)", origin, lo, hi)
	}
	b := &builder{
		K: K, origin: origin, lo: lo, hi: hi,
		relTol: s.relTol(), phiMax: s.phiMax(), maxNodes: s.maxNodes(),
	}
	b.f = b.sqrtK
	o, err := b.jetAt(origin, false)
	if err != nil {
		return nil, err
	}
	neg, err := b.side(-1, o)
	if err != nil {
		return nil, err
	}
	pos, err := b.side(+1, o)
	if err != nil {
		return nil, err
	}
	nodes := make([]node, 0, len(neg.nodes)+1+len(pos.nodes))
	for i := len(neg.nodes) - 1; i >= 0; i-- {
		nodes = append(nodes, neg.nodes[i])
	}
	nodes = append(nodes, o.node)
	nodes = append(nodes, pos.nodes...)
	m := &Map{
		k: K, origin: origin, lo: lo, hi: hi, nodes: nodes,
		imgLo: neg.end, imgHi: pos.end, relTol: b.relTol,
		stats: Stats{Nodes: len(nodes), Evals: b.evals},
	}
	return m, nil
}

// tinyAbs makes the quadrature's acceptance test purely relative.
const tinyAbs = 1e-300

// Origin returns the native field value where phi = 0.
func (m *Map) Origin() float64 { return m.origin }

// Domain returns the native domain (lo, hi) the map was built for.
func (m *Map) Domain() (lo, hi float64) { return m.lo, m.hi }

// PhiRange returns the canonical image of the whole domain: an end is ±Inf
// where the integral of sqrt(K) diverges there (or exceeds
// Settings.PhiMax), otherwise its finite value, extrapolated from the
// table's last octaves.
func (m *Map) PhiRange() (lo, hi float64) { return m.imgLo, m.imgHi }

// Resolved returns the part of the domain the table covers; Phi, X and
// XJet answer inside it.
func (m *Map) Resolved() Extent {
	a, b := m.nodes[0], m.nodes[len(m.nodes)-1]
	return Extent{XLo: a.x, XHi: b.x, PhiLo: a.phi, PhiHi: b.phi}
}

// RelTol returns the relative accuracy the map was built to.
func (m *Map) RelTol() float64 { return m.relTol }

// Stats returns the size of the table and the work spent building it.
func (m *Map) Stats() Stats { return m.stats }

// Kinetic returns K and its first three derivatives at x.
func (m *Map) Kinetic(x float64) num.Jet { return m.k(num.Var(x)) }

// sqrtK is the integrand for evaluations after the table is built (K has
// been checked on the table; a bad value shows up as a quadrature error).
func (m *Map) sqrtK(x float64) float64 { return math.Sqrt(m.k(num.Var(x)).V) }
