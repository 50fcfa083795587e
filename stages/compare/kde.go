package compare

import (
	"fmt"
	"math"
	"sort"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// KDE is a constraint given as samples of (n_s, r), smoothed into a
// density by a two-dimensional Gaussian kernel density estimate with
// reflection at the boundary r = 0.
//
// Bandwidth. The kernel covariance is H = h^2 S, with S the sample
// covariance (divisor n - 1) and h = A n^(-1/(d+4)), A = (4/(d+2))^(1/(d+4))
// for a Gaussian kernel: Silverman (1986), "Density Estimation for
// Statistics and Data Analysis", eq. (4.14) with Table 4.1, applied to
// data scaled by their covariance (ibid., section 4.2.1). In d = 2
// dimensions A = 1 and h = n^(-1/6), which is also Scott's rule (Scott
// 1992, "Multivariate Density Estimation", chapter 6), so the two rules
// coincide here.
//
// Reflection. Samples of r pile up against r = 0 when the data prefer
// small r; a plain kernel estimate leaks half of the mass near the edge
// into r < 0 and halves the density at r = 0. Each kernel is therefore
// mirrored in r = 0:
//
//	p(n_s, r) = 1/n sum_i [K_H(x - x_i) + K_H(R x - x_i)],  r >= 0,
//
// with R x = (n_s, -r) (Schuster 1985, Communications in Statistics -
// Theory and Methods 14, 1123; Jones 1993, Statistics and Computing 3, 135).
// The estimate integrates to one over r >= 0, has zero slope in r at r = 0,
// and is zero for r < 0.
//
// Regions. The 68.27% and 95.45% highest-density regions are
// {p >= f_P}, with f_P the (1 - P) quantile of the estimated density at
// the samples themselves (Hyndman 1996, The American Statistician 50,
// 120), interpolated linearly between order statistics.
//
// Cost. Each density evaluation sums over all n samples; construction
// evaluates the density at every sample, O(n^2) kernel evaluations
// (BenchmarkNewKDE). NewKDE refuses more than MaxKDESamples points.
type KDE struct {
	name, citation string
	pts            []Point
	cov            [3]float64 // S: var n_s, cov, var r
	h              float64
	prec           [3]float64 // H^-1: (0,0), (0,1), (1,1)
	lnNorm         float64    // ln of 1/(n 2 pi sqrt(det H))
	argmax         Point
	lnMax          float64
	lnLevel        [2]float64 // ln f_P for P68, P95
	lnAtSamples    []float64  // ln p(x_i), ascending
	r95            float64    // 95% quantile of the samples' r
}

// MaxKDESamples is the most samples NewKDE accepts: construction costs
// O(n^2) kernel evaluations, 2-4 s at this size on one core (0.55-0.9 s
// for 5000 samples, BenchmarkNewKDE); thin a longer chain first.
const MaxKDESamples = 10000

// NewKDE builds the reflected kernel density estimate of samples. It
// refuses fewer than MinSamples or more than MaxKDESamples points,
// non-finite values, r < 0, and samples whose covariance is singular (all
// on one line). name and citation identify the constraint set.
func NewKDE(name, citation string, samples []Point) (*KDE, error) {
	n := len(samples)
	if n < MinSamples {
		return nil, fmt.Errorf("constraint %s: %d samples, want at least %d", name, n, MinSamples)
	}
	if n > MaxKDESamples {
		return nil, fmt.Errorf("constraint %s: %d samples, more than %d: thin the chain (construction costs n^2 kernel evaluations)", name, n, MaxKDESamples)
	}
	var mNs, mR float64
	for i, p := range samples {
		if math.IsNaN(p.Ns) || math.IsInf(p.Ns, 0) || math.IsNaN(p.R) || math.IsInf(p.R, 0) {
			return nil, fmt.Errorf("constraint %s: sample %d (%g, %g) is not finite", name, i+1, p.Ns, p.R)
		}
		if p.R < 0 {
			return nil, fmt.Errorf("constraint %s: sample %d has r = %g < 0", name, i+1, p.R)
		}
		mNs += p.Ns
		mR += p.R
	}
	mNs /= float64(n)
	mR /= float64(n)
	var sNN, sNR, sRR float64
	for _, p := range samples {
		a, b := p.Ns-mNs, p.R-mR
		sNN += float64(a * a)
		sNR += float64(a * b)
		sRR += float64(b * b)
	}
	d := float64(n - 1)
	k := &KDE{name: name, citation: citation, pts: append([]Point(nil), samples...)}
	k.cov = [3]float64{sNN / d, sNR / d, sRR / d}
	det := float64(k.cov[0]*k.cov[2]) - float64(k.cov[1]*k.cov[1])
	if !(det > 1e-12*k.cov[0]*k.cov[2]) {
		return nil, fmt.Errorf("constraint %s: the samples' covariance is singular (var n_s = %g, var r = %g, cov = %g)", name, k.cov[0], k.cov[2], k.cov[1])
	}
	k.h = SilvermanFactor(2, n)
	h2 := k.h * k.h
	k.prec = [3]float64{k.cov[2] / (det * h2), -k.cov[1] / (det * h2), k.cov[0] / (det * h2)}
	detH := det * h2 * h2
	k.lnNorm = -detmath.Log(float64(n) * 2 * math.Pi * math.Sqrt(detH))

	k.lnAtSamples = make([]float64, n)
	best := 0
	for i, p := range k.pts {
		k.lnAtSamples[i] = k.lnRaw(p.Ns, p.R)
		if k.lnAtSamples[i] > k.lnAtSamples[best] {
			best = i
		}
	}
	k.argmax, k.lnMax = k.polish(k.pts[best], k.lnAtSamples[best])
	sort.Float64s(k.lnAtSamples)
	k.r95 = SampleR95(k.pts)
	for j, P := range []float64{P68, P95} {
		k.lnLevel[j] = linInterpQuantile(1-P, k.lnAtSamples)
	}
	return k, nil
}

// SilvermanFactor is the bandwidth factor h = A n^(-1/(d+4)) of a Gaussian
// kernel in d dimensions, A = (4/(d+2))^(1/(d+4)) (Silverman 1986, eq. 4.14
// and Table 4.1); the kernel covariance is h^2 times the sample covariance.
func SilvermanFactor(d, n int) float64 {
	e := 1 / float64(d+4)
	return detmath.Pow(4/float64(d+2), e) * detmath.Pow(float64(n), -e)
}

// lnRaw is ln of the reflected sum at (ns, r) for any sign of r (it is
// even in r). When every term underflows it is recomputed relative to the
// nearest kernel, so that it stays finite far from the samples.
func (k *KDE) lnRaw(ns, r float64) float64 {
	a, b, c := k.prec[0], k.prec[1], k.prec[2]
	sum := 0.0
	qmin := math.Inf(1)
	for _, p := range k.pts {
		dx := ns - p.Ns
		ax := float64(float64(a*dx) * dx)
		bx := float64(float64(2*b) * dx)
		d1 := r - p.R
		d2 := -r - p.R
		q1 := ax + float64(d1*(bx+float64(c*d1)))
		q2 := ax + float64(d2*(bx+float64(c*d2)))
		sum += detmath.Exp(float64(-0.5*q1)) + detmath.Exp(float64(-0.5*q2))
		qmin = math.Min(qmin, math.Min(q1, q2))
	}
	if sum > 1e-280 {
		return k.lnNorm + detmath.Log(sum)
	}
	sum = 0
	for _, p := range k.pts {
		dx := ns - p.Ns
		ax := float64(float64(a*dx) * dx)
		bx := float64(float64(2*b) * dx)
		d1 := r - p.R
		d2 := -r - p.R
		sum += detmath.Exp(float64(-0.5*(ax+float64(d1*(bx+float64(c*d1)))-qmin))) + detmath.Exp(float64(-0.5*(ax+float64(d2*(bx+float64(c*d2)))-qmin)))
	}
	return k.lnNorm - float64(0.5*qmin) + detmath.Log(sum)
}

// polish refines the density maximum from the best sample by compass
// search on ln p (Kolda, Lewis & Torczon 2003, SIAM Review 45, 385):
// steps along the two axes in units of the kernel widths, starting at
// half a width and halved after every unsuccessful sweep, down to 1e-6
// widths (at most 2000 evaluations). The raw sum is even in r, so the
// search runs unconstrained and the result is folded to r >= 0.
func (k *KDE) polish(start Point, lnStart float64) (Point, float64) {
	sNs := k.h * math.Sqrt(k.cov[0])
	sR := k.h * math.Sqrt(k.cov[2])
	best, lnBest := start, lnStart
	dirs := [4][2]float64{{1, 0}, {-1, 0}, {0, 1}, {0, -1}}
	for step, evals := 0.5, 0; step > 1e-6 && evals < 2000; {
		moved := false
		for _, d := range dirs {
			p := Point{Ns: best.Ns + float64(float64(step*d[0])*sNs), R: best.R + float64(float64(step*d[1])*sR)}
			evals++
			if l := k.lnRaw(p.Ns, p.R); l > lnBest {
				best, lnBest, moved = p, l, true
				break
			}
		}
		if !moved {
			step /= 2
		}
	}
	best.R = math.Abs(best.R)
	return best, lnBest
}

// Label returns the constraint's name.
func (k *KDE) Label() string { return k.name }

// Citation returns the constraint's source as given to NewKDE.
func (k *KDE) Citation() string { return k.citation }

// N returns the number of samples.
func (k *KDE) N() int { return len(k.pts) }

// Samples returns a copy of the samples.
func (k *KDE) Samples() []Point { return append([]Point(nil), k.pts...) }

// Bandwidth returns the kernel covariance H = h^2 S as (H_nn, H_nr, H_rr)
// and the factor h.
func (k *KDE) Bandwidth() (hNN, hNR, hRR, h float64) {
	h2 := k.h * k.h
	return h2 * k.cov[0], h2 * k.cov[1], h2 * k.cov[2], k.h
}

// Density returns the estimated density at (n_s, r); zero for r < 0.
func (k *KDE) Density(ns, r float64) float64 {
	if r < 0 {
		return 0
	}
	return detmath.Exp(k.lnRaw(ns, r))
}

// Max returns the location and value of the density maximum.
func (k *KDE) Max() (Point, float64) { return k.argmax, detmath.Exp(k.lnMax) }

// DeltaChi2 returns -2 ln(p(n_s, r)/p_max); +Inf for r < 0, where the
// density is zero.
func (k *KDE) DeltaChi2(ns, r float64) float64 {
	if r < 0 {
		return math.Inf(1)
	}
	return 2 * (k.lnMax - k.lnRaw(ns, r))
}

// Levels returns the Delta chi^2 of the 68.27% and 95.45% highest-density
// boundaries, -2 ln(f_P/p_max).
func (k *KDE) Levels() (d68, d95 float64) {
	return 2 * (k.lnMax - k.lnLevel[0]), 2 * (k.lnMax - k.lnLevel[1])
}

// DensityLevels returns the densities f_68 and f_95 on the boundaries of
// the 68.27% and 95.45% highest-density regions.
func (k *KDE) DensityLevels() (f68, f95 float64) {
	return detmath.Exp(k.lnLevel[0]), detmath.Exp(k.lnLevel[1])
}

// Inside reports whether p(n_s, r) >= f_68 and >= f_95.
func (k *KDE) Inside(ns, r float64) (in68, in95 bool) {
	if r < 0 {
		return false, false
	}
	l := k.lnRaw(ns, r)
	return l >= k.lnLevel[0], l >= k.lnLevel[1]
}

// Enclosed returns the estimated probability mass of the highest-density
// region whose boundary passes through (n_s, r): the fraction of samples
// at which the density exceeds p(n_s, r) (Hyndman 1996). It is 1 beyond
// the outermost sample and resolves masses to 1/n.
func (k *KDE) Enclosed(ns, r float64) float64 {
	if r < 0 {
		return 1
	}
	l := k.lnRaw(ns, r)
	below := sort.SearchFloat64s(k.lnAtSamples, l)
	return float64(len(k.lnAtSamples)-below) / float64(len(k.lnAtSamples))
}

// R95 returns the one-dimensional 95% upper bound on r, SampleR95 of the
// samples.
func (k *KDE) R95() float64 { return k.r95 }

// SampleR95 returns the 95% quantile of the samples' r (their marginal
// over n_s), interpolated linearly between order statistics (gonum's
// stat.LinInterp). It is read from the samples themselves, not from the
// smoothed density, as a chain's published limit is (common practice).
func SampleR95(pts []Point) float64 {
	rs := make([]float64, len(pts))
	for i, p := range pts {
		rs[i] = p.R
	}
	sort.Float64s(rs)
	return linInterpQuantile(0.95, rs)
}

// linInterpQuantile returns the p quantile of the sorted, NaN-free x,
// interpolated linearly between order statistics: the definition of
// gonum's stat.Quantile with stat.LinInterp and no weights (checked
// against it in kde_test.go), with its products rounded so that no build
// fuses them (see stages/num/detmath).
func linInterpQuantile(p float64, x []float64) float64 {
	fidx := float64(p * float64(len(x)))
	for i := range x {
		cumsum := float64(i + 1)
		if cumsum >= fidx {
			if i == 0 {
				return x[0]
			}
			t := cumsum - fidx
			return float64(t*x[i-1]) + float64((1-t)*x[i])
		}
	}
	return x[len(x)-1]
}

// Compare evaluates (n_s, r) against the estimate. Sigmas is the
// two-parameter Gaussian equivalent of Delta chi^2 (Sigmas); the Inside
// flags come from the highest-density levels, whose Delta chi^2 need not
// be 2.30 and 6.18 when the constraint is not Gaussian; ExceedsR95 is
// r > R95.
func (k *KDE) Compare(ns, r float64) Comparison {
	d := k.DeltaChi2(ns, r)
	in68, in95 := k.Inside(ns, r)
	return Comparison{DeltaChi2: d, Sigmas: Sigmas(d), Inside68: in68, Inside95: in95, R95: k.r95, ExceedsR95: r > k.r95}
}

// Extent returns a box holding the samples widened by four kernel
// standard deviations on each side (r from zero at the least), outside
// which the density is negligible next to its value inside.
func (k *KDE) Extent() (lo, hi Point) {
	lo = Point{Ns: math.Inf(1), R: math.Inf(1)}
	hi = Point{Ns: math.Inf(-1), R: math.Inf(-1)}
	for _, p := range k.pts {
		lo.Ns, hi.Ns = math.Min(lo.Ns, p.Ns), math.Max(hi.Ns, p.Ns)
		lo.R, hi.R = math.Min(lo.R, p.R), math.Max(hi.R, p.R)
	}
	wNs := float64(float64(4*k.h) * math.Sqrt(k.cov[0]))
	wR := float64(float64(4*k.h) * math.Sqrt(k.cov[2]))
	lo.Ns -= wNs
	hi.Ns += wNs
	lo.R = math.Max(0, lo.R-wR)
	hi.R += wR
	return lo, hi
}
