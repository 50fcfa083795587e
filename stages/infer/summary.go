package infer

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Summaries of the posterior: the nodes of the final rule weighted by the
// integrand (prior coordinates are uniform, so the integrand is the
// likelihood and its weighted nodes are the posterior). Each summary is
// taken with the Kronrod weights and again with the embedded Gauss ones;
// the difference is its numerical error estimate.

// weights returns the posterior weights of the nodes under w (WK or WG),
// normalised to 1.
func (r *Result) weights(w []float64) []float64 {
	top := math.Inf(-1)
	for _, l := range r.LnF {
		top = math.Max(top, l)
	}
	p := make([]float64, len(w))
	var s float64
	for i, l := range r.LnF {
		if w[i] == 0 || math.IsInf(l, -1) {
			continue
		}
		p[i] = float64(w[i] * detmath.Exp(l-top))
		s += p[i]
	}
	for i := range p {
		p[i] /= s
	}
	return p
}

// Estimate is a number with its numerical error estimate.
type Estimate struct {
	Value, Err float64
}

// Mean is the posterior mean of g (a function of the node index).
func (r *Result) Mean(g func(i int) float64) Estimate {
	mean := func(p []float64) float64 {
		var m float64
		for i, pi := range p {
			if pi > 0 {
				m += float64(pi * g(i))
			}
		}
		return m
	}
	k, gs := mean(r.weights(r.WK)), mean(r.weights(r.WG))
	return Estimate{k, math.Abs(k - gs)}
}

// Quantiles are the posterior quantiles of g at probabilities qs (each in
// (0, 1)): the weighted nodes sorted by g, each node's mass centred on its
// value, the distribution function interpolated linearly between nodes.
func (r *Result) Quantiles(g func(i int) float64, qs ...float64) []Estimate {
	vals := make([]float64, len(r.LnF))
	for i := range vals {
		vals[i] = g(i)
	}
	pk, pg := r.weights(r.WK), r.weights(r.WG)
	// One order for both rules: by value, ties by index (a total order,
	// so the result does not depend on the sorting algorithm).
	order := make([]int32, 0, len(vals))
	for i, v := range vals {
		if (pk[i] > 0 || pg[i] > 0) && !math.IsNaN(v) { // a quantity undefined at a node has no quantile there
			order = append(order, int32(i))
		}
	}
	slices.SortFunc(order, func(a, b int32) int {
		if c := cmp.Compare(vals[a], vals[b]); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	k := quantiles(vals, pk, order, qs)
	gs := quantiles(vals, pg, order, qs)
	out := make([]Estimate, len(qs))
	for j := range qs {
		out[j] = Estimate{k[j], math.Abs(k[j] - gs[j])}
	}
	return out
}

func quantiles(vals, p []float64, order []int32, qs []float64) []float64 {
	// Merge nodes of equal value (a coordinate shared by a slab of nodes).
	var xs, cs []float64 // values and the distribution function at them
	cum := 0.0
	for j := 0; j < len(order); {
		v, m := vals[order[j]], 0.0
		for ; j < len(order) && vals[order[j]] == v; j++ {
			m += p[order[j]]
		}
		if m == 0 {
			continue
		}
		xs = append(xs, v)
		cs = append(cs, cum+float64(0.5*m))
		cum += m
	}
	out := make([]float64, len(qs))
	for j, q := range qs {
		i := sort.SearchFloat64s(cs, q)
		switch {
		case len(xs) == 0:
			out[j] = math.NaN()
		case i == 0:
			out[j] = xs[0]
		case i == len(xs):
			out[j] = xs[len(xs)-1]
		default:
			t := (q - cs[i-1]) / (cs[i] - cs[i-1])
			out[j] = xs[i-1] + float64(t*(xs[i]-xs[i-1]))
		}
	}
	return out
}

// Interval is a two-sided interval [Lo, Hi] with the error estimates of
// its ends.
type Interval struct {
	Lo, Hi Estimate
}

// Credible is the equal-tailed credible interval of g of probability p
// (0.6827 for "68%", 0.9545 for "95%", or as the caller states).
func (r *Result) Credible(g func(i int) float64, p float64) Interval {
	q := r.Quantiles(g, (1-p)/2, (1+p)/2)
	return Interval{q[0], q[1]}
}

// Profile is the profile-likelihood interval of g at the level where
// -2 Delta ln L reaches delta (1 for 68.3%, 3.841 for 95% in one
// parameter: the chi-squared quantiles of one degree of freedom): the
// range of g over the nodes whose likelihood is within delta/2 of the
// largest at any node. Its ends are as fine as the nodes near them; the
// error estimate is the spacing of g between the outermost node inside
// and the nearest outside.
func (r *Result) Profile(g func(i int) float64, delta float64) (Interval, error) {
	top := math.Inf(-1)
	for _, l := range r.LnF {
		top = math.Max(top, l)
	}
	if math.IsInf(top, -1) {
		return Interval{}, ErrNoMass
	}
	in := math.Inf(1)
	inHi := math.Inf(-1)
	for i, l := range r.LnF {
		if l >= top-float64(delta/2) {
			v := g(i)
			in, inHi = math.Min(in, v), math.Max(inHi, v)
		}
	}
	// The nearest values outside, for the resolution.
	below, above := math.Inf(-1), math.Inf(1)
	for i, l := range r.LnF {
		if l < top-float64(delta/2) {
			v := g(i)
			if v < in {
				below = math.Max(below, v)
			}
			if v > inHi {
				above = math.Min(above, v)
			}
		}
	}
	lo := Estimate{in, 0}
	if !math.IsInf(below, -1) {
		lo.Err = in - below
	}
	hi := Estimate{inHi, 0}
	if !math.IsInf(above, 1) {
		hi.Err = above - inHi
	}
	return Interval{lo, hi}, nil
}

// Probability is the posterior probability of the event that h (a
// probability at each node, in [0, 1]) describes: the posterior average
// of h.
func (r *Result) Probability(h func(i int) float64) (Estimate, error) {
	vals := make([]float64, len(r.LnF))
	for i := range vals {
		if math.IsInf(r.LnF[i], -1) {
			continue // no posterior mass: h need not be defined there
		}
		v := h(i)
		if !(v >= 0 && v <= 1) {
			return Estimate{}, fmt.Errorf("infer: probability %g at node %d (want 0 to 1)", v, i)
		}
		vals[i] = v
	}
	return r.Mean(func(i int) float64 { return vals[i] }), nil
}

// Density is a smooth estimate of the posterior density of g on the grid
// xs (increasing, evenly spaced): the weighted nodes assigned to the grid
// by distance (cloud in cell), then smoothed by a Gaussian kernel of
// bandwidth 1.06 sigma n^(-1/5) (Silverman 1986, Density Estimation, eq.
// 3.28), with sigma the posterior deviation of g and n the nodes'
// effective number 1/sum p^2; normalised to the mass that falls on the
// grid. Deterministic, like every summary here; for a figure, not for a
// number with an error.
func (r *Result) Density(g func(i int) float64, xs []float64) []float64 {
	n := len(xs)
	out := make([]float64, n)
	if n < 3 {
		return out
	}
	dx := (xs[n-1] - xs[0]) / float64(n-1)
	if !(dx > 0) {
		return out
	}
	p := r.weights(r.WK)
	var m, m2, s2 float64
	for i, pi := range p {
		if pi <= 0 {
			continue
		}
		v := g(i)
		m += float64(pi * v)
		m2 += float64(float64(pi*v) * v)
		s2 += float64(pi * pi)
		f := (v - xs[0]) / dx
		k := int(math.Floor(f))
		t := f - float64(k)
		if k >= 0 && k < n {
			out[k] += float64(pi * (1 - t))
		}
		if k+1 >= 0 && k+1 < n {
			out[k+1] += float64(pi * t)
		}
	}
	sd := math.Sqrt(math.Max(0, m2-float64(m*m)))
	if !(sd > 0) || !(s2 > 0) {
		return out
	}
	h := 1.06 * sd * math.Pow(1/s2, -0.2) / dx // in grid steps
	sm := make([]float64, n)
	reach := int(math.Ceil(8 * h))
	norm := 1 / (h * math.Sqrt(2*math.Pi) * dx)
	for i, w := range out {
		if w == 0 {
			continue
		}
		for k := max(0, i-reach); k <= min(n-1, i+reach); k++ {
			z := float64(k-i) / h
			sm[k] += float64(float64(w*norm) * detmath.Exp(-0.5*float64(z*z)))
		}
	}
	return sm
}

// Density2 is a smooth estimate of the joint posterior density of (g1, g2)
// on the grid xs x ys (each increasing and evenly spaced): the weighted
// nodes assigned to the grid by area (cloud in cell), then smoothed by a
// Gaussian kernel along each axis of bandwidth sigma_i n^(-1/6)
// (Silverman 1986, Density Estimation, eq. 4.14, for two dimensions; n the
// nodes' effective number). z[i][j] is the density at (xs[i], ys[j]),
// normalised to integrate to one over the grid. Deterministic; for a
// figure.
func (r *Result) Density2(g1, g2 func(i int) float64, xs, ys []float64) ([][]float64, error) {
	nx, ny := len(xs), len(ys)
	if nx < 3 || ny < 3 {
		return nil, fmt.Errorf("infer: a %d x %d grid", nx, ny)
	}
	dx, dy := (xs[nx-1]-xs[0])/float64(nx-1), (ys[ny-1]-ys[0])/float64(ny-1)
	if !(dx > 0) || !(dy > 0) {
		return nil, fmt.Errorf("infer: grid spacing %g x %g", dx, dy)
	}
	p := r.weights(r.WK)
	bins := make([][]float64, nx)
	for i := range bins {
		bins[i] = make([]float64, ny)
	}
	var m1, m1s, m2, m2s, s2 float64
	for i, pi := range p {
		if pi <= 0 {
			continue
		}
		a, b := g1(i), g2(i)
		m1 += float64(pi * a)
		m1s += float64(float64(pi*a) * a)
		m2 += float64(pi * b)
		m2s += float64(float64(pi*b) * b)
		s2 += float64(pi * pi)
		fx, fy := (a-xs[0])/dx, (b-ys[0])/dy
		ix, iy := int(math.Floor(fx)), int(math.Floor(fy))
		tx, ty := fx-float64(ix), fy-float64(iy)
		for _, c := range [4]struct {
			i, j int
			w    float64
		}{{ix, iy, float64((1 - tx) * (1 - ty))}, {ix + 1, iy, float64(tx * (1 - ty))}, {ix, iy + 1, float64((1 - tx) * ty)}, {ix + 1, iy + 1, float64(tx * ty)}} {
			if c.i >= 0 && c.i < nx && c.j >= 0 && c.j < ny {
				bins[c.i][c.j] += float64(pi * c.w)
			}
		}
	}
	if !(s2 > 0) {
		return bins, nil
	}
	neff := math.Pow(1/s2, -1.0/6)
	h1 := math.Sqrt(math.Max(0, m1s-float64(m1*m1))) * neff / dx
	h2 := math.Sqrt(math.Max(0, m2s-float64(m2*m2))) * neff / dy
	smooth := func(line []float64, h float64) []float64 {
		if !(h > 0) {
			return line
		}
		out := make([]float64, len(line))
		reach := int(math.Ceil(4 * h))
		for i := range line {
			if line[i] == 0 {
				continue
			}
			for k := max(0, i-reach); k <= min(len(line)-1, i+reach); k++ {
				z := float64(k-i) / h
				out[k] += float64(line[i] * detmath.Exp(-0.5*float64(z*z)))
			}
		}
		return out
	}
	for i := range bins {
		bins[i] = smooth(bins[i], h2)
	}
	col := make([]float64, nx)
	for j := 0; j < ny; j++ {
		for i := range col {
			col[i] = bins[i][j]
		}
		sm := smooth(col, h1)
		for i := range col {
			bins[i][j] = sm[i]
		}
	}
	var total float64
	for i := range bins {
		for j := range bins[i] {
			total += bins[i][j]
		}
	}
	if total > 0 {
		for i := range bins {
			for j := range bins[i] {
				bins[i][j] /= float64(total * dx * dy)
			}
		}
	}
	return bins, nil
}
