package num

import (
	"fmt"
	"math"
)

// QuadSettings controls Integrate. Nil or zero fields mean the defaults.
type QuadSettings struct {
	// AbsTol and RelTol: the estimate is accepted when the error estimate is
	// below max(AbsTol, RelTol*|integral|). Defaults 1e-13 and 1e-12.
	AbsTol, RelTol float64
	// MaxIntervals bounds the number of subintervals; default 2000.
	MaxIntervals int
	// Rule is the pair of embedded rules applied to each subinterval:
	// GK15 (the default), GK7 or GK3.
	Rule QuadRule
}

// QuadRule selects the embedded Gauss–Kronrod pair of Integrate.
type QuadRule int

const (
	// GK15 is the 7-point Gauss rule and its 15-point Kronrod extension
	// (exact to degree 13 and 22): the default.
	GK15 QuadRule = iota
	// GK7 is the 3-point Gauss rule and its 7-point Kronrod extension
	// (exact to degree 5 and 11): half the evaluations per subinterval, for
	// integrands smooth on the scale of the interval (a constant, a low
	// polynomial), where one subinterval is already exact to rounding.
	GK7
	// GK3 is the midpoint rule and its Kronrod extension, which is the
	// 3-point Gauss rule (exact to degree 1 and 5; Kronrod 1965, from
	// memory): its error estimate is that of the midpoint rule, so it
	// accepts an interval on which the integrand is linear to rounding (a
	// constant), in 3 evaluations, and little else: a first try on one
	// subinterval (MaxIntervals 1), not an adaptive rule.
	GK3
)

// QuadResult is the outcome of an adaptive quadrature.
type QuadResult struct {
	Value     float64 // the integral
	ErrEst    float64 // estimated absolute error
	Evals     int     // integrand evaluations
	Intervals int     // subintervals in the final partition
}

// Gauss–Kronrod 7-15 nodes and weights on [-1, 1] (nodes in decreasing
// order; index 7 is the centre). Values as tabulated in R. Piessens et al.,
// "QUADPACK" (1983), routine QK15.
var (
	gk15x = [8]float64{
		0.991455371120812639206854697526329,
		0.949107912342758524526189684047851,
		0.864864423359769072789712788640926,
		0.741531185599394439863864773280788,
		0.586087235467691130294144845693013,
		0.405845151377397166906606412076961,
		0.207784955007898467600689403773245,
		0.000000000000000000000000000000000,
	}
	gk15w = [8]float64{
		0.022935322010529224963732008058970,
		0.063092092629978553290700663189204,
		0.104790010322250183839876322541518,
		0.140653259715525918745189590510238,
		0.169004726639267902826583426598550,
		0.190350578064785409913256402421014,
		0.204432940075298892414161999234649,
		0.209482141084727828012999174891714,
	}
	// Gauss 7-point weights for the nodes gk15x[1], [3], [5], [7].
	g7w = [4]float64{
		0.129484966168869693270611432679082,
		0.279705391489276667901467771423780,
		0.381830050505118944950369775488975,
		0.417959183673469387755102040816327,
	}
)

// Gauss–Kronrod 3-7 nodes and weights on [-1, 1] (nodes in decreasing
// order; index 3 is the centre; the Gauss nodes are gk7x[1] = sqrt(3/5)
// and the centre, with weights 5/9 and 8/9). Values from memory, checked
// by TestQuadRuleExactness: the Kronrod rule integrates x^k exactly for
// k <= 11 and the Gauss rule for k <= 5.
var (
	gk7x = [4]float64{
		0.960491268708020283423507092629080,
		0.774596669241483377035853079956480,
		0.434243749346802558002071502844628,
		0,
	}
	gk7w = [4]float64{
		0.104656226026467265193823857192073,
		0.268488089868333440728569280666710,
		0.401397414775962222905051818618432,
		0.450916538658474142345110087045571,
	}
	g3w = [2]float64{5.0 / 9, 8.0 / 9}
)

func gk7(f func(float64) float64, a, b float64) (val, errEst float64) {
	c := float64(0.5 * (a + b))
	h := 0.5 * (b - a)
	fc := f(c)
	k := fc * gk7w[3]
	g := fc * g3w[1]
	for i := 0; i < 3; i++ {
		dx := float64(h * gk7x[i])
		s := f(c-dx) + f(c+dx)
		k += float64(gk7w[i] * s)
		if i == 1 {
			g += float64(g3w[0] * s)
		}
	}
	return k * h, math.Abs((k - g) * h)
}

// apply is the rule on [a, b]: a direct call of each (a function value
// would let f escape to the heap, and every closure passed with it).
func (r QuadRule) apply(f func(float64) float64, a, b float64) (val, errEst float64) {
	switch r {
	case GK7:
		return gk7(f, a, b)
	case GK3:
		return gk3(f, a, b)
	}
	return gk15(f, a, b)
}

// gk3 is the 3-point Gauss rule (nodes 0 and ±sqrt(3/5), weights 8/9 and
// 5/9, as gk7x[1] and g3w) with the midpoint rule embedded.
func gk3(f func(float64) float64, a, b float64) (val, errEst float64) {
	c := float64(0.5 * (a + b))
	h := 0.5 * (b - a)
	fc := f(c)
	dx := float64(h * gk7x[1])
	g := float64(g3w[1]*fc) + float64(g3w[0]*(f(c-dx)+f(c+dx)))
	return g * h, math.Abs((g - 2*fc) * h)
}

type quadPiece struct {
	a, b, val, err float64
}

func gk15(f func(float64) float64, a, b float64) (val, errEst float64) {
	c := float64(0.5 * (a + b))
	h := 0.5 * (b - a)
	fc := f(c)
	k := fc * gk15w[7]
	g := fc * g7w[3]
	for i := 0; i < 7; i++ {
		dx := float64(h * gk15x[i])
		s := f(c-dx) + f(c+dx)
		k += float64(gk15w[i] * s)
		if i%2 == 1 {
			g += float64(g7w[i/2] * s)
		}
	}
	return k * h, math.Abs((k - g) * h)
}

// Integrate computes the integral of f over [a, b] (a > b gives the
// negative) by globally adaptive Gauss–Kronrod 7-15 quadrature (3-7 with
// Rule GK7, 1-3 with GK3): the subinterval with the largest error estimate is bisected
// until the total estimate meets the tolerance. The integrand must be finite on the open
// interval; a NaN or Inf value is an error.
func Integrate(f func(float64) float64, a, b float64, s *QuadSettings) (QuadResult, error) {
	absTol, relTol, maxInt := 1e-13, 1e-12, 2000
	rule, evals := GK15, 15
	if s != nil {
		switch s.Rule {
		case GK7:
			rule, evals = GK7, 7
		case GK3:
			rule, evals = GK3, 3
		}
		if s.AbsTol > 0 {
			absTol = s.AbsTol
		}
		if s.RelTol > 0 {
			relTol = s.RelTol
		}
		if s.MaxIntervals > 0 {
			maxInt = s.MaxIntervals
		}
	}
	if a == b {
		return QuadResult{}, nil
	}
	sign := 1.0
	if a > b {
		a, b, sign = b, a, -1
	}
	v, e := rule.apply(f, a, b)
	// Most integrals need a few pieces: those live on the stack.
	var buf [16]quadPiece
	pieces := append(buf[:0], quadPiece{a, b, v, e})
	res := QuadResult{Evals: evals}
	total, totalErr := v, e
	for {
		if math.IsNaN(total) || math.IsInf(total, 0) {
			return res, fmt.Errorf("integrand is not finite on [%g, %g]", a, b)
		}
		// max(absTol, relTol |total|), written out: math.Max is not
		// inlined on amd64, and total is finite here.
		tol := relTol * math.Abs(total)
		if tol < absTol {
			tol = absTol
		}
		if totalErr <= tol {
			break
		}
		if len(pieces) >= maxInt {
			res.Value, res.ErrEst, res.Intervals = sign*total, totalErr, len(pieces)
			return res, fmt.Errorf("quadrature on [%g, %g] did not converge in %d intervals (error estimate %g)", a, b, maxInt, totalErr)
		}
		// Bisect the piece with the largest error estimate.
		worst := 0
		for i := range pieces {
			if pieces[i].err > pieces[worst].err {
				worst = i
			}
		}
		p := pieces[worst]
		m := 0.5 * (p.a + p.b)
		if m <= p.a || m >= p.b {
			res.Value, res.ErrEst, res.Intervals = sign*total, totalErr, len(pieces)
			return res, fmt.Errorf("quadrature on [%g, %g]: interval near %g cannot be split further at float64 resolution (error estimate %g)", a, b, p.a, totalErr)
		}
		v1, e1 := rule.apply(f, p.a, m)
		v2, e2 := rule.apply(f, m, p.b)
		res.Evals += 2 * evals
		pieces[worst] = quadPiece{p.a, m, v1, e1}
		pieces = append(pieces, quadPiece{m, p.b, v2, e2})
		total, totalErr = 0, 0
		for _, q := range pieces {
			total += q.val
			totalErr += q.err
		}
	}
	res.Value, res.ErrEst, res.Intervals = sign*total, totalErr, len(pieces)
	return res, nil
}

// AcceptAtFloor passes a converged quadrature, and one that stopped short
// of its own tolerance whose finite value has an error estimate at most
// floor relative to it (max(1, |value|)): for an integrand known only to
// its rounding (near a pole, say), where no partition reaches the
// requested tolerance but the caller needs far less. Other failures stay
// errors.
func AcceptAtFloor(r QuadResult, err error, floor float64) (QuadResult, error) {
	if err != nil && !math.IsNaN(r.Value) && !math.IsInf(r.Value, 0) && r.ErrEst <= floor*math.Max(1, math.Abs(r.Value)) {
		return r, nil
	}
	return r, err
}

// KronrodRule15 returns the 15 nodes of the Gauss–Kronrod 7-15 rule on
// [-1, 1] in increasing order, with the Kronrod weights and the embedded
// 7-point Gauss weights (zero at the 8 nodes the Gauss rule lacks), the
// QUADPACK QK15 values above: for product rules built outside this
// package (the inference cubature), which need the nodes, not a 1-D
// integral.
func KronrodRule15() (x, wk, wg [15]float64) {
	for i := 0; i < 7; i++ {
		x[i], x[14-i] = -gk15x[i], gk15x[i]
		wk[i], wk[14-i] = gk15w[i], gk15w[i]
		if i%2 == 1 {
			wg[i], wg[14-i] = g7w[i/2], g7w[i/2]
		}
	}
	x[7], wk[7], wg[7] = 0, gk15w[7], g7w[3]
	return x, wk, wg
}
