package canonical

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Settings controls Verify. Nil means the defaults.
type Settings struct {
	// Tol is the largest accepted deviation, relative to max(1, |phi|) for
	// the map and to |V|, |V'| for the potential; default 1e-9.
	Tol float64
	// Quad controls the quadrature of sqrt(K); default relative 1e-13.
	Quad *num.QuadSettings
	// NumericalMapTol is the largest accepted deviation of a numerical
	// map from the independent quadrature, relative to max(1, |phi|);
	// default NumericalMapFactor times the map's own relative accuracy
	// (kinetic.Map.RelTol, 1e-13 by default, so 1e-10).
	NumericalMapTol float64
}

// NumericalMapFactor: a numerical map is accepted when it agrees with the
// independent quadrature to this many times its own relative accuracy.
// The two integrals are each accurate to about 1e-13; near a pole of K the
// rounding of x itself limits both (the phi-width of one ulp of x, about
// 1e-11 relative at the closest sampled distance, 1e-6 of the domain),
// and the factor covers that.
const NumericalMapFactor = 1000

// Report is what Verify measured.
type Report struct {
	Canonical  bool    // the model's kinetic term is already canonical
	Field      string  // the native field's name ("phi" when canonical)
	MapFormula string  // the analytic map, in words
	Points     int     // field values checked
	MapDev     float64 // max |phi_quad - phi_analytic| / max(1, |phi|)
	InverseDev float64 // max |x(phi(x)) - x| / max(1, |x|)
	PotDev     float64 // max relative deviation of V(x) from V(phi(x))
	SlopeDev   float64 // max relative deviation of V_x/sqrt(K) from dV/dphi
	// Numerical is set when the map is computed numerically
	// (model.NativeField.Map); then MapTol is the tolerance applied to
	// MapDev and CurvatureDev compares d2V/dphi2 with the chain rule
	// V_xx/K - V_x K_x/(2 K^2) from the kinetic function's jet.
	Numerical    bool
	MapTol       float64
	CurvatureDev float64
}

// sampleFractions are the positions, as fractions of the canonical range,
// at which the map is checked; numerical maps are also checked at
// numericalFractions, up to the top of the range, between and beyond the
// analytic sample.
var (
	sampleFractions    = [...]float64{0.01, 0.03, 0.07, 0.12, 0.2, 0.3, 0.4, 0.5}
	numericalFractions = [...]float64{1e-6, 1e-3, 0.045, 0.25, 0.6, 0.7, 0.8, 0.9, 0.97, 0.999}
)

// Verify checks the canonical map of m numerically. For a canonical model
// it reports the identity. Otherwise, at field values spread over the
// canonical range, it compares
//   - phi(x) with the quadrature of sqrt(K) from the origin to x,
//   - the inverse map's round trip,
//   - V(x) with the canonical V(phi(x)), and V_x/sqrt(K) with dV/dphi,
//
// and fails when any deviation exceeds the tolerance. A numerical map
// (model.NativeField.Map, from model.NewNative) is checked the same way
// against this independent adaptive quadrature, at more points (up to the
// top of the canonical range), with the tolerance NumericalMapTol suited
// to the map's precision, and d2V/dphi2 is also compared with the chain
// rule from the kinetic function's jet (CurvatureDev, to Tol). On a native
// domain inside the positive half line the quadrature runs in ln x (see
// quadratureOfSqrtK).
func Verify(m *model.Model, s *Settings) (Report, error) {
	if m.Native == nil {
		return Report{Canonical: true, Field: "phi", MapFormula: "phi (canonical kinetic term)"}, nil
	}
	tol := 1e-9
	quad := num.QuadSettings{RelTol: 1e-13, AbsTol: 1e-14}
	numTol := 0.0
	if s != nil {
		if s.Tol > 0 {
			tol = s.Tol
		}
		if s.Quad != nil {
			quad = *s.Quad
		}
		numTol = s.NumericalMapTol
	}
	nf := m.Native
	rep := Report{Field: nf.Name, MapFormula: nf.MapFormula, Numerical: nf.Map != nil, MapTol: tol}
	if rep.Numerical {
		rep.MapTol = NumericalMapFactor * nf.Map.RelTol()
		if numTol > 0 {
			rep.MapTol = numTol
		}
	}
	sqrtK := newSqrtKQuadrature(nf, &quad, 1e-3*rep.MapTol)
	phi0 := nf.ToCanonical(nf.Origin)
	var buf [len(sampleFractions) + len(numericalFractions) + 2*len(edgeGaps)]float64
	for _, phi := range appendSamplePoints(buf[:0], m) {
		x := nf.FromCanonical(phi)
		if !(x >= nf.Lo && x <= nf.Hi) {
			return rep, fmt.Errorf("%s: the map sends phi = %g to %s = %g, outside its domain (%g, %g)", m.Describe(), phi, nf.Name, x, nf.Lo, nf.Hi)
		}
		// Close to a pole of K (or on it, by rounding), x itself carries too
		// few digits to test the map to the tolerance; such points are
		// skipped.
		if edgeGap(x, nf.Lo, nf.Hi) < 1e-6 {
			continue
		}
		k := nf.Kinetic(x)
		if !(k > 0) || math.IsInf(k, 0) {
			return rep, fmt.Errorf("%s: kinetic function K(%s = %g) = %g, want a positive finite value", m.Describe(), nf.Name, x, k)
		}
		q, err := sqrtK.integral(x)
		if err != nil {
			return rep, fmt.Errorf("%s: quadrature of sqrt(K) to %s = %g: %w", m.Describe(), nf.Name, x, err)
		}
		toC := nf.ToCanonical(x)
		pa := toC - phi0
		rep.MapDev = maxDev(rep.MapDev, math.Abs(q-pa)/max1(math.Abs(pa)))
		rep.InverseDev = maxDev(rep.InverseDev, math.Abs(nf.FromCanonical(toC)-x)/max1(math.Abs(x)))
		vn := nf.V(num.Var(x))
		vc := m.At(pa)
		rep.PotDev = maxDev(rep.PotDev, relDev(vn.V, vc.V))
		rep.SlopeDev = maxDev(rep.SlopeDev, relDev(vn.D1/math.Sqrt(k), vc.D1))
		if rep.Numerical && nf.KineticJet != nil {
			kj := nf.KineticJet(num.Var(x))
			rep.CurvatureDev = maxDev(rep.CurvatureDev, relDev(vn.D2/kj.V-vn.D1*kj.D1/(2*kj.V*kj.V), vc.D2))
		}
		rep.Points++
	}
	if rep.Points == 0 {
		return rep, fmt.Errorf("%s: no field value in the range could be checked", m.Describe())
	}
	for _, d := range []struct {
		what   string
		v, tol float64
	}{{"canonical map against the quadrature of sqrt(K)", rep.MapDev, rep.MapTol}, {"inverse map", rep.InverseDev, tol},
		{"potential in the two fields", rep.PotDev, tol}, {"potential slope in the two fields", rep.SlopeDev, tol},
		{"potential curvature in the two fields", rep.CurvatureDev, tol}} {
		if !(d.v <= d.tol) {
			return rep, fmt.Errorf("%s: %s deviates by %.3g (tolerance %g)", m.Describe(), d.what, d.v, d.tol)
		}
	}
	return rep, nil
}

// quadratureOfSqrtK returns the function x -> integral of sqrt(K) from the
// origin to x, by adaptive quadrature.
//
// When the native domain lies on the positive half line (Lo >= 0, so
// every x in it is positive), the integral is taken in u = ln x, an exact
// change of variables:
//
//	integral from x0 to x of sqrt(K(x')) dx' = integral from ln x0 to ln x of sqrt(K(e^u)) e^u du.
//
// A kinetic function with a pole K ~ c/x^2 at x = 0 (the half-plane of
// the E-model, Kallosh, Linde & Roest 2013, arXiv:1311.0472) has a
// constant integrand in u, and a range of x spanning many decades is a
// short range of u: the quadrature in x needs thousands of subintervals
// there, the one in u a few. The integrand is still sqrt(K) evaluated
// from the kinetic function, so the check stays independent of the map.
//
// Only an edge at x = 0 is treated so: there x = e^u keeps its relative
// precision however close to the edge. Near an edge elsewhere (the
// Poincaré disk's chi = ±sqrt(6 alpha)) x cannot resolve its distance to
// the edge, and a variable that stretches that neighbourhood (x = h tanh v
// was tried) integrates the rounding noise of K over a long interval: the
// quadrature then fails to converge (two-plateau, alpha = 1), where the
// one in x, whose neighbourhood of the edge is short, converges.
//
// The returned function is cumulative: an x farther from the origin than
// the farthest one already integrated on its side is integrated from
// there, adding only the new stretch (the sample points come in order of
// distance on each side, so each stretch of the domain is integrated
// once); any other x is integrated from the origin. Each stretch is
// first tried on one subinterval with the midpoint rule embedded in the
// 3-point Gauss rule (num.GK3: accepts a constant integrand, the E-model's
// in u, in 3 evaluations), then with the Gauss–Kronrod 3-7 pair (a smooth
// one, in 7), each accepted only with its error estimate at the
// tolerance; a stretch neither accepts is integrated by the adaptive 7-15
// quadrature. The results
// depend only on the sequence of x asked for, which Verify fixes.
func quadratureOfSqrtK(nf *model.NativeField, quad *num.QuadSettings, floor float64) func(x float64) (float64, error) {
	q := newSqrtKQuadrature(nf, quad, floor)
	return q.integral
}

// sqrtKQuadrature is quadratureOfSqrtK's state: the integrand's variable
// (x, or u = ln x), the settings and the farthest point integrated on
// each side of the origin (index 0 below it, 1 above) with the integral
// there.
type sqrtKQuadrature struct {
	nf    *model.NativeField
	inLog bool
	v0    float64
	quad  num.QuadSettings
	floor float64
	far   [2]float64
	at    [2]float64
	have  [2]bool
}

func newSqrtKQuadrature(nf *model.NativeField, quad *num.QuadSettings, floor float64) sqrtKQuadrature {
	q := sqrtKQuadrature{nf: nf, v0: nf.Origin, quad: *quad, floor: floor}
	if nf.Lo >= 0 && nf.Origin > 0 {
		q.inLog, q.v0 = true, detmath.Log(nf.Origin)
	}
	return q
}

// integrand is sqrt(K) in the quadrature's variable.
func (q *sqrtKQuadrature) integrand(v float64) float64 {
	if q.inLog {
		x := detmath.Exp(v)
		return math.Sqrt(q.nf.Kinetic(x)) * x
	}
	return math.Sqrt(q.nf.Kinetic(v))
}

// stretch integrates from a to b, a stretch to be added to the integral
// base, to the tolerance of the whole: its absolute tolerance is at least
// RelTol |base| (each of the at most few dozen stretches then adds an
// error below the tolerance relative to the sum). settle accepts
// (num.AcceptAtFloor) a quadrature that stopped short of its own
// tolerance only when its error estimate is still far (floor, a
// thousandth of the check's tolerance, relative) below what the check
// resolves: near a pole of K the integrand is known only to the rounding
// of x relative to the pole, so no partition reaches 1e-13 there, while
// the comparison with the analytic map is still decisive.
func (q *sqrtKQuadrature) stretch(a, b, base float64) (float64, error) {
	s := q.quad
	if abs := q.quad.RelTol * math.Abs(base); abs > q.quad.AbsTol {
		s.AbsTol = abs
	}
	// One panel of the 1-3 pair (a constant integrand), then one of the
	// 3-7 pair (a smooth one), then the adaptive 7-15 quadrature.
	one := s
	one.MaxIntervals = 1
	for _, rule := range [...]num.QuadRule{num.GK3, num.GK7} {
		one.Rule = rule
		if r, err := num.Integrate(q.integrand, a, b, &one); err == nil {
			return r.Value, nil
		}
	}
	r, err := num.Integrate(q.integrand, a, b, &s)
	r, err = num.AcceptAtFloor(r, err, q.floor)
	return r.Value, err
}

// integral returns the integral of sqrt(K) from the origin to x.
func (q *sqrtKQuadrature) integral(x float64) (float64, error) {
	v := x
	if q.inLog {
		v = detmath.Log(x)
	}
	side := 0
	if v > q.v0 {
		side = 1
	}
	beyond := !q.have[side] || math.Abs(v-q.v0) >= math.Abs(q.far[side]-q.v0)
	from, base := q.v0, 0.0
	if q.have[side] && beyond {
		from, base = q.far[side], q.at[side]
	}
	d, err := q.stretch(from, v, base)
	if err != nil {
		return 0, err
	}
	in := base + d
	if beyond {
		q.far[side], q.at[side], q.have[side] = v, in, true
	}
	return in, nil
}

// samplePoints returns the canonical field values to check: fractions of
// the canonical range, and the images of points spread over the native
// domain towards a finite edge (where a pole of K compresses the whole
// plateau into a sliver of the native field), all inside (Lo, Hi).
func samplePoints(m *model.Model) []float64 { return appendSamplePoints(nil, m) }

// edgeGaps are the fractions of the distance from the origin to a finite
// edge of the native domain left between the sampled x and the edge.
var edgeGaps = [...]float64{0.7, 0.4, 0.2, 0.1, 1e-2, 1e-3, 1e-4, 1e-5}

// appendSamplePoints appends samplePoints to out.
func appendSamplePoints(out []float64, m *model.Model) []float64 {
	nf := m.Native
	for _, t := range sampleFractions {
		out = append(out, m.Lo+float64((m.Hi-m.Lo)*t))
	}
	if nf.Map != nil {
		for _, t := range numericalFractions {
			out = append(out, m.Lo+float64((m.Hi-m.Lo)*t))
		}
	}
	for _, edge := range [...]float64{nf.Lo, nf.Hi} {
		if math.IsInf(edge, 0) {
			continue
		}
		for _, gap := range edgeGaps {
			x := nf.Origin + float64((edge-nf.Origin)*(1-gap))
			if phi := nf.ToCanonical(x); phi > m.Lo && phi < m.Hi {
				out = append(out, phi)
			}
		}
	}
	return out
}

func edgeGap(x, lo, hi float64) float64 {
	// x lies in [lo, hi] (Verify checks it first): no NaN to carry, so
	// the minimum is written out (math.Min is not inlined on amd64).
	g := math.Inf(1)
	if !math.IsInf(lo, 0) {
		g = (x - lo) / max1(math.Abs(lo)+math.Abs(x))
	}
	if !math.IsInf(hi, 0) {
		if v := (hi - x) / max1(math.Abs(hi)+math.Abs(x)); v < g {
			g = v
		}
	}
	return g
}

func relDev(a, b float64) float64 {
	if a == b {
		return 0
	}
	m := math.Abs(a)
	if mb := math.Abs(b); mb > m || mb != mb {
		m = mb
	}
	return math.Abs(a-b) / m
}

// maxDev is math.Max for deviations (never -0 or -Inf), written out to be
// inlined (math.Max is not, on amd64): a NaN deviation stays NaN, so that
// the check fails on it.
func maxDev(a, b float64) float64 {
	if a != a || b != b {
		return math.NaN()
	}
	if b > a {
		return b
	}
	return a
}

// max1 is max(1, x) for x >= 0 or NaN (NaN stays NaN, as with math.Max).
func max1(x float64) float64 {
	if x < 1 {
		return 1
	}
	return x
}
