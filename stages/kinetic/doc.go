// Package kinetic computes the canonical normalisation of a scalar field
// with a non-canonical kinetic term numerically.
//
// A native field x with Lagrangian L = ½ K(x) (∂x)² − V(x) is canonically
// normalised by phi(x) = ∫ from origin to x of sqrt(K(x')) dx', so that
// L = ½ (∂phi)² − V(x(phi)). For the alpha-attractors the map is analytic
// (Kallosh, Linde & Roest 2013, arXiv:1311.0472); for a general K, such as
// the Einstein-frame Higgs field of Bezrukov & Shaposhnikov 2008
// (arXiv:0710.3755), it is not, and this package supplies it.
//
// Design. New tabulates phi on nodes that partition the native domain into
// panels on each of which one Gauss–Kronrod 7-15 rule (num.Integrate with a
// single interval) meets the tolerance. The panels are found by bisecting
// "octaves": intervals whose distance from the origin doubles, and whose
// gap to a finite end of the domain (where K may have a pole) halves, so
// that features at any scale near the origin and the approach to a pole are
// resolved without being told where they are. Every sample of K is checked
// (positive, finite), so the tabulation is also the scan of the domain that
// refuses a bad kinetic function with the place and the value. The
// partial sums are compensated (Neumaier), and the tolerance is relative
// per panel, hence relative for phi.
//
// The inverse x(phi) is found by safeguarded Newton iteration inside the
// panel that brackets phi, started from a quintic Hermite interpolant built
// from the exact dx/dphi = K^(-1/2) and d²x/dphi² = -K'/(2K²) at the panel's
// nodes; each residual is the tabulated phi of the nearer node plus one
// quadrature of sqrt(K) from it, and the exact derivative sqrt(K) gives the
// Newton step. Its quadratic convergence usually needs a single step. XJet
// returns x with its first three derivatives with respect to phi from K's
// jet: only the value of x comes from the numerical inversion.
//
// Near a pole, x itself cannot resolve phi better than the phi-width of one
// unit in the last place of x, sqrt(K) ulp(x); the per-panel tolerance has
// that floor, and the table ends where the gap to the pole is a few
// thousand ulps (or where K over- or underflows, or where |phi| exceeds
// Settings.PhiMax). Resolved reports the range covered; PhiRange reports
// the canonical image of the whole domain, infinite where the integral
// diverges.
//
// Everything is deterministic: the same K and settings give the same bits.
// A Map is immutable and safe for concurrent use.
package kinetic
