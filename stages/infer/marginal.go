package infer

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num"
	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// The marginal posterior of one coordinate of the cube is known at the
// rule's nodes along it: in each panel, at the 15 Kronrod abscissae, as
// the sum over the other coordinates' nodes. Between them it is the
// panel's interpolating polynomial (degree 14), whose integral gives the
// distribution function to the rule's own accuracy; the same through the
// 7 Gauss abscissae (degree 6) gives the error estimate.

// panelMarginal is a marginal density on one panel, at the rule's nodes.
type panelMarginal struct {
	a, b   float64
	x      []float64 // nodes, increasing, in [a, b]
	m      []float64 // density at the nodes
	bw     []float64 // barycentric weights of the nodes
	mass   float64   // the panel's integral of the density
	weight []float64 // the rule's weights on [a, b]
}

// marginal returns the marginal density of coordinate k, panel by panel,
// with the Kronrod nodes (gauss false) or the Gauss nodes only (true).
func (r *Result) marginal(k int, gauss bool) []panelMarginal {
	x, wk, wg := num.KronrodRule15()
	d := r.Dims
	top := math.Inf(-1)
	for _, l := range r.LnF {
		top = math.Max(top, l)
	}
	np := len(r.Panels[k]) - 1
	dens := make([][15]float64, np)
	for i, l := range r.LnF {
		if math.IsInf(l, -1) {
			continue
		}
		j := r.Local[i*d+k]
		p := r.Box[i*d+k]
		a, b := r.Panels[k][p], r.Panels[k][p+1]
		h := 0.5 * (b - a)
		// The node's weight without its factor along k.
		w := r.WK[i] / float64(h*wk[j])
		if gauss {
			if wg[j] == 0 {
				continue
			}
			w = r.WG[i] / float64(h*wg[j])
		}
		dens[p][j] += float64(w * detmath.Exp(l-top))
	}
	out := make([]panelMarginal, np)
	for p := range out {
		a, b := r.Panels[k][p], r.Panels[k][p+1]
		h, c := float64(0.5*(b-a)), float64(0.5*(a+b))
		pm := panelMarginal{a: a, b: b}
		for j := 0; j < 15; j++ {
			if gauss && wg[j] == 0 {
				continue
			}
			w := wk[j]
			if gauss {
				w = wg[j]
			}
			pm.x = append(pm.x, c+float64(h*x[j]))
			pm.m = append(pm.m, dens[p][j])
			pm.weight = append(pm.weight, h*w)
			pm.mass += float64(h * w * dens[p][j])
		}
		pm.bw = barycentric(pm.x)
		out[p] = pm
	}
	return out
}

// barycentric returns the barycentric weights of nodes x (Berrut &
// Trefethen 2004, SIAM Review 46, 501, eq. 3.2).
func barycentric(x []float64) []float64 {
	w := make([]float64, len(x))
	for j := range x {
		prod := 1.0
		for m := range x {
			if m != j {
				prod = float64(prod * (x[j] - x[m]))
			}
		}
		w[j] = 1 / prod
	}
	return w
}

// at is the interpolating polynomial at t (the second barycentric form).
func (pm *panelMarginal) at(t float64) float64 {
	var num, den float64
	for j, xj := range pm.x {
		if t == xj {
			return pm.m[j]
		}
		c := pm.bw[j] / (t - xj)
		num += float64(c * pm.m[j])
		den += c
	}
	return num / den
}

// cdf is the integral of the panel's polynomial from a to t, by the
// 15-point Kronrod rule on [a, t] (exact for the degree-14 polynomial up
// to rounding).
func (pm *panelMarginal) cdf(t float64) float64 {
	x, wk, _ := num.KronrodRule15()
	h, c := float64(0.5*(t-pm.a)), float64(0.5*(t+pm.a))
	var s float64
	for j := range x {
		s += float64(wk[j] * pm.at(c+float64(h*x[j])))
	}
	return float64(s * h)
}

// quantileOf finds the coordinate at which the marginal's distribution
// function reaches q.
func quantileOf(ms []panelMarginal, q float64) float64 {
	var total float64
	for _, pm := range ms {
		total += pm.mass
	}
	target := q * total
	cum := 0.0
	for i := range ms {
		pm := &ms[i]
		if cum+pm.mass < target && i < len(ms)-1 {
			cum += pm.mass
			continue
		}
		// Bisection on the panel's distribution function: monotone where
		// the density is positive, and 60 halvings reach the float64
		// resolution of the panel.
		lo, hi := pm.a, pm.b
		for range 60 {
			mid := 0.5 * (lo + hi)
			if cum+pm.cdf(mid) < target {
				lo = mid
			} else {
				hi = mid
			}
		}
		return 0.5 * (lo + hi)
	}
	return 1
}

// MarginalQuantiles are the quantiles at qs of coordinate k of the cube
// (the prior coordinate u_k, in [0, 1]) under the posterior, from the
// interpolated marginal density; each with the difference from the same
// taken through the Gauss nodes alone as its error estimate.
func (r *Result) MarginalQuantiles(k int, qs ...float64) ([]Estimate, error) {
	if k < 0 || k >= r.Dims {
		return nil, fmt.Errorf("infer: coordinate %d of a %d-dimensional cube", k, r.Dims)
	}
	mk, mg := r.marginal(k, false), r.marginal(k, true)
	out := make([]Estimate, len(qs))
	for j, q := range qs {
		if !(q > 0 && q < 1) {
			return nil, fmt.Errorf("infer: quantile %g: want 0 < q < 1", q)
		}
		a, b := quantileOf(mk, q), quantileOf(mg, q)
		out[j] = Estimate{a, math.Abs(a - b)}
	}
	return out, nil
}

// MarginalDensity is the posterior density of coordinate k at each of us
// (prior coordinates in [0, 1], per unit of u), from the interpolated
// marginal, normalised to integrate to 1 over [0, 1].
func (r *Result) MarginalDensity(k int, us []float64) ([]float64, error) {
	if k < 0 || k >= r.Dims {
		return nil, fmt.Errorf("infer: coordinate %d of a %d-dimensional cube", k, r.Dims)
	}
	ms := r.marginal(k, false)
	var total float64
	for _, pm := range ms {
		total += pm.mass
	}
	out := make([]float64, len(us))
	for j, u := range us {
		for i := range ms {
			pm := &ms[i]
			if u >= pm.a && (u < pm.b || (i == len(ms)-1 && u <= pm.b)) {
				out[j] = math.Max(0, pm.at(u)) / total
				break
			}
		}
	}
	return out, nil
}
