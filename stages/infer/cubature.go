// Package infer answers the inverse questions of a study: given priors
// on a model's parameters and on its reheating history, and a likelihood
// from constraint sets, what the data allow (posteriors, credible and
// profile-likelihood intervals, the predictive distribution of r and n_s,
// detection odds of forecasts) and how much they prefer one model over
// another (evidences and Bayes factors).
//
// Every integral is taken by a deterministic rule, never by random
// sampling, so that an inference is a function of its inputs: it has a
// key, is cached, and is recomputed to the bit. The rule is an adaptive
// product Gauss–Kronrod cubature over the unit cube of prior coordinates
// (Integrate), which reports its own error estimate and refines until it
// meets the stated tolerance.
//
// The package is pure numerics: no I/O, no ledger, no global state.
package infer

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/stages/num"
	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Integrand is a function on the unit cube [0, 1]^d: the logarithm of a
// non-negative density (math.Inf(-1) where it vanishes) and the derived
// quantities the summaries need at that point (the same number at every
// point; nil when none).
type Integrand func(u []float64) (lnf float64, derived []float64, err error)

// Settings controls Integrate. Zero fields mean the defaults.
type Settings struct {
	// Tol is the target of the error estimate of ln Z (default 0.01).
	Tol float64
	// MaxEvals bounds the number of integrand evaluations (default 4e6).
	MaxEvals int
	// Panels is the number of panels each dimension starts with
	// (default 2).
	Panels int
	// Progress, when set, is told the number of evaluations so far after
	// each round of refinement; Cancel, when set, stops the integration
	// with its error when it returns one (checked between boxes).
	Progress func(evals int)
	Cancel   func() error
}

func (s *Settings) withDefaults() Settings {
	out := Settings{Tol: 0.01, MaxEvals: 4_000_000, Panels: 2}
	if s != nil {
		out.Progress, out.Cancel = s.Progress, s.Cancel
		if s.Tol > 0 {
			out.Tol = s.Tol
		}
		if s.MaxEvals > 0 {
			out.MaxEvals = s.MaxEvals
		}
		if s.Panels > 0 {
			out.Panels = s.Panels
		}
	}
	return out
}

// Result is an integral over the unit cube and the points it was taken at.
type Result struct {
	// LnZ is the logarithm of the integral, LnZErr its error estimate
	// (the relative error estimate of the integral).
	LnZ, LnZErr float64
	Evals       int
	Converged   bool
	// Dims is the cube's dimension; Panels the final partition of each
	// dimension (panel bounds, increasing from 0 to 1).
	Dims   int
	Panels [][]float64
	// The nodes of the final rule: coordinates (Dims per node), Kronrod
	// and embedded Gauss product weights (the volume included), the
	// integrand's logarithm and derived quantities.
	U       []float64
	WK, WG  []float64
	LnF     []float64
	Derived [][]float64
	// Local is each node's place in its box's rule along each dimension
	// (0 to 14, Dims per node), Box its box's panel indices (Dims per node).
	Local []uint8
	Box   []int32
}

// ErrNoMass reports an integrand that vanishes at every node.
var ErrNoMass = errors.New("the integrand vanishes at every node (no prior volume is allowed by the data or the physics)")

// cell is the rule on one box of the partition.
type cell struct {
	u       []float64 // 15^d nodes x d
	local   []uint8   // the nodes' rule indices, d per node
	wk, wg  []float64 // product weights per node, the box's volume included
	lnf     []float64
	derived [][]float64
	// For each dimension, the Kronrod weights with that dimension's
	// factor replaced by its Gauss weight: the box's error along it.
	wgk [][]float64
}

// Integrate integrates exp(f) over [0, 1]^d (1 <= d <= 4) by adaptive
// product Gauss–Kronrod (7-15) cubature. The cube is an axis-aligned
// product of panels; each box takes the 15^d-point product Kronrod rule.
// The error of the rule along one dimension on one slab of panels is
// estimated as QUADPACK does in one dimension, by the difference between
// the Kronrod and the embedded 7-point Gauss rule along that dimension
// (Piessens et al. 1983, QUADPACK, routine QK15); the panels whose
// estimate is largest are bisected until the sum of all estimates, over
// the integral, is below Tol (then also ln Z is within about Tol). The
// result depends only on f and the settings: a re-run gives it bit for
// bit.
func Integrate(f Integrand, d int, s *Settings) (*Result, error) {
	if d < 1 || d > 4 {
		return nil, fmt.Errorf("infer: %d dimensions: the cubature takes 1 to 4", d)
	}
	set := s.withDefaults()
	parts := make([][]float64, d)
	for k := range parts {
		parts[k] = make([]float64, set.Panels+1)
		for i := range parts[k] {
			parts[k][i] = float64(i) / float64(set.Panels)
		}
	}
	x, wk, wg := num.KronrodRule15()
	cache := map[string]*cell{}
	evals := 0
	box := func(lo, hi []float64) (*cell, error) {
		key := boxKey(lo, hi)
		if c, ok := cache[key]; ok {
			return c, nil
		}
		if set.Cancel != nil {
			if err := set.Cancel(); err != nil {
				return nil, err
			}
		}
		c, err := evalBox(f, lo, hi, &x, &wk, &wg)
		if err != nil {
			return nil, err
		}
		evals += len(c.lnf)
		cache[key] = c
		return c, nil
	}
	for {
		cells, idx, err := boxes(parts, box)
		if err != nil {
			return nil, err
		}
		ref := math.Inf(-1)
		for _, c := range cells {
			for _, l := range c.lnf {
				ref = math.Max(ref, l)
			}
		}
		if math.IsInf(ref, -1) {
			return nil, ErrNoMass
		}
		// The integral, and the error estimate of each panel of each
		// dimension (over its slab of boxes).
		var z float64
		errs := make([][]float64, d)
		for k := range errs {
			errs[k] = make([]float64, len(parts[k])-1)
		}
		for ci, c := range cells {
			var zc float64
			dk := make([]float64, d)
			for n, l := range c.lnf {
				e := detmath.Exp(l - ref)
				zc += float64(c.wk[n] * e)
				for k := range dk {
					dk[k] += float64(c.wgk[k][n] * e)
				}
			}
			z += zc
			for k := range dk {
				errs[k][idx[ci][k]] += math.Abs(zc - dk[k])
			}
		}
		var total, worst float64
		for k := range errs {
			for _, e := range errs[k] {
				total += e
				worst = math.Max(worst, e)
			}
		}
		if set.Progress != nil {
			set.Progress(evals)
		}
		res := &Result{LnZ: detmath.Log(z) + ref, LnZErr: total / z, Evals: evals, Dims: d, Panels: parts}
		if total <= set.Tol*z || evals >= set.MaxEvals {
			res.Converged = total <= set.Tol*z
			res.collect(cells, idx)
			if !res.Converged {
				return res, fmt.Errorf("infer: ln Z error estimate %.3g after %d evaluations, above the tolerance %.3g: raise the evaluation limit or the tolerance", res.LnZErr, evals, set.Tol)
			}
			return res, nil
		}
		// Bisect every panel within a factor 4 of the worst: a few at a
		// time, so that a sharp peak is found in few rounds.
		next := make([][]float64, d)
		for k := range parts {
			next[k] = []float64{parts[k][0]}
			for p := 0; p+1 < len(parts[k]); p++ {
				a, b := parts[k][p], parts[k][p+1]
				if errs[k][p] >= worst/4 {
					next[k] = append(next[k], float64(0.5*(a+b)))
				}
				next[k] = append(next[k], b)
			}
		}
		parts = next
	}
}

// boxKey names a box by its bounds' bits.
func boxKey(lo, hi []float64) string {
	var b strings.Builder
	for k := range lo {
		b.WriteString(strconv.FormatUint(math.Float64bits(lo[k]), 36))
		b.WriteByte(':')
		b.WriteString(strconv.FormatUint(math.Float64bits(hi[k]), 36))
		b.WriteByte(';')
	}
	return b.String()
}

// boxes returns the boxes of the partition in a fixed order (the last
// dimension fastest) with each box's panel indices.
func boxes(parts [][]float64, box func(lo, hi []float64) (*cell, error)) ([]*cell, [][]int, error) {
	d := len(parts)
	var cells []*cell
	var idx [][]int
	cur := make([]int, d)
	for {
		lo, hi := make([]float64, d), make([]float64, d)
		for k, p := range cur {
			lo[k], hi[k] = parts[k][p], parts[k][p+1]
		}
		c, err := box(lo, hi)
		if err != nil {
			return nil, nil, err
		}
		cells = append(cells, c)
		idx = append(idx, slices.Clone(cur))
		k := d - 1
		for k >= 0 {
			cur[k]++
			if cur[k] < len(parts[k])-1 {
				break
			}
			cur[k] = 0
			k--
		}
		if k < 0 {
			return cells, idx, nil
		}
	}
}

// evalBox evaluates the product rule on the box [lo, hi].
func evalBox(f Integrand, lo, hi []float64, x, wk, wg *[15]float64) (*cell, error) {
	d := len(lo)
	n := 1
	for range d {
		n *= 15
	}
	c := &cell{u: make([]float64, 0, n*d), local: make([]uint8, 0, n*d), wk: make([]float64, n), wg: make([]float64, n), lnf: make([]float64, n), derived: make([][]float64, n), wgk: make([][]float64, d)}
	for k := range c.wgk {
		c.wgk[k] = make([]float64, n)
	}
	digits := make([]int, d)
	u := make([]float64, d)
	for i := 0; i < n; i++ {
		r := i
		for k := d - 1; k >= 0; k-- {
			digits[k] = r % 15
			r /= 15
		}
		w, g := 1.0, 1.0
		for k := 0; k < d; k++ {
			h := float64(0.5 * (hi[k] - lo[k]))
			u[k] = float64(0.5*(lo[k]+hi[k])) + float64(h*x[digits[k]])
			w = float64(w * float64(h*wk[digits[k]]))
			g = float64(g * float64(h*wg[digits[k]]))
		}
		c.wk[i], c.wg[i] = w, g
		for k := 0; k < d; k++ {
			h := float64(0.5 * (hi[k] - lo[k]))
			c.wgk[k][i] = float64(w / float64(h*wk[digits[k]]) * float64(h*wg[digits[k]]))
		}
		c.u = append(c.u, u...)
		for k := 0; k < d; k++ {
			c.local = append(c.local, uint8(digits[k]))
		}
		l, der, err := f(u)
		if err != nil {
			return nil, err
		}
		if math.IsNaN(l) || math.IsInf(l, 1) {
			return nil, fmt.Errorf("infer: the integrand's logarithm is %g at u = %v", l, u)
		}
		c.lnf[i], c.derived[i] = l, der
	}
	return c, nil
}

// collect keeps the final rule's nodes in the result.
func (r *Result) collect(cells []*cell, idx [][]int) {
	for ci, c := range cells {
		r.Local = append(r.Local, c.local...)
		for range c.lnf {
			for _, p := range idx[ci] {
				r.Box = append(r.Box, int32(p))
			}
		}
		r.U = append(r.U, c.u...)
		r.WK = append(r.WK, c.wk...)
		r.WG = append(r.WG, c.wg...)
		r.LnF = append(r.LnF, c.lnf...)
		r.Derived = append(r.Derived, c.derived...)
	}
}
