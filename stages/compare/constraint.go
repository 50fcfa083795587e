package compare

import (
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Point is a location in the (n_s, r) plane.
type Point struct {
	Ns, R float64 // scalar spectral index and tensor-to-scalar ratio
}

// Constraint is a published (n_s, r) constraint in any representation: a
// Gaussian approximation or a kernel density estimate from samples.
//
// DeltaChi2 is -2 ln of the likelihood (or posterior density) relative to
// its maximum over r >= 0 (the two-parameter reading); R95 is the
// one-dimensional 95% bound on r (the one-dimensional reading, see
// Comparison). Levels gives the Delta chi^2 of the boundaries
// of the 68.27% and 95.45% regions, and Inside answers whether a point lies
// within them, so that Inside(x) is DeltaChi2(x) <= Levels() for every
// representation.
type Constraint interface {
	// Label names the constraint set (the name in its file).
	Label() string
	// DeltaChi2 returns -2 ln(p(n_s, r)/p_max).
	DeltaChi2(ns, r float64) float64
	// Inside reports whether (n_s, r) lies in the 68.27% and 95.45% regions.
	Inside(ns, r float64) (in68, in95 bool)
	// Levels returns the Delta chi^2 on the 68.27% and 95.45% boundaries.
	Levels() (d68, d95 float64)
	// R95 returns the one-dimensional 95% upper bound on r (marginalised
	// over n_s) against which Comparison.ExceedsR95 is judged.
	R95() float64
}

// Probabilities enclosed by the one- and two-sigma regions: erf(k/sqrt 2)
// for k = 1, 2, that is 68.27% and 95.45% (the mass of a one-dimensional
// Gaussian within k standard deviations; common practice).
var (
	P68 = detmath.Erf(1 / math.Sqrt2)
	P95 = detmath.Erf(2 / math.Sqrt2)
)

var (
	_ Constraint = Gaussian{}
	_ Constraint = (*KDE)(nil)
)

// Label returns g.Name.
func (g Gaussian) Label() string { return g.Name }

// Levels returns the two-parameter Delta chi^2 levels 2.2958 and 6.1801
// (Chi2Level of 68.27% and 95.45%).
func (g Gaussian) Levels() (d68, d95 float64) { return Chi2Level(P68), Chi2Level(P95) }

// Inside reports the Inside68 and Inside95 flags of g.Compare(ns, r).
func (g Gaussian) Inside(ns, r float64) (in68, in95 bool) {
	c := g.Compare(ns, r)
	return c.Inside68, c.Inside95
}
