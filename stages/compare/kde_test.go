package compare

import (
	"math"
	"sync"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat"
)

// TestSilvermanFactor: h = (4/(d+2))^(1/(d+4)) n^(-1/(d+4)) (Silverman
// 1986, eq. 4.14 and Table 4.1). In one dimension it is the familiar
// 1.06 n^(-1/5) (Silverman 1986, eq. 3.28: (4/3)^(1/5) = 1.0592); in two
// it is Scott's n^(-1/6) (Scott 1992, chapter 6), so 64 samples give
// exactly 1/2.
func TestSilvermanFactor(t *testing.T) {
	for _, c := range []struct {
		d, n      int
		want, tol float64
	}{
		{1, 1, 1.06, 0.005},
		{1, 32, 1.0592 / 2, 1e-4},
		{2, 64, 0.5, 1e-15},
		{2, 1e6, 0.1, 1e-15},
		{3, 1, math.Pow(0.8, 1.0/7), 1e-15},
	} {
		if got := SilvermanFactor(c.d, c.n); math.Abs(got-c.want) > c.tol {
			t.Errorf("SilvermanFactor(%d, %d) = %.6f, want %.6f ± %g", c.d, c.n, got, c.want, c.tol)
		}
	}
}

// TestKDEBandwidth: the kernel covariance is h^2 times the sample
// covariance (Silverman 1986, section 4.2.1, data scaled by their
// covariance), here with n = 64 so h^2 = 1/4, against gonum's
// stat.Covariance (divisor n - 1) as an independent computation.
func TestKDEBandwidth(t *testing.T) {
	pts := gaussSamples(3, 64, 0.965, 0.004, 0.05, 0.01, -0.5)
	k, err := NewKDE("b", "synthetic", pts)
	if err != nil {
		t.Fatal(err)
	}
	ns := make([]float64, len(pts))
	r := make([]float64, len(pts))
	for i, p := range pts {
		ns[i], r[i] = p.Ns, p.R
	}
	hNN, hNR, hRR, h := k.Bandwidth()
	if math.Abs(h-0.5) > 1e-15 {
		t.Errorf("h = %v, want 1/2 for 64 samples", h)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"H_nn", hNN, stat.Covariance(ns, ns, nil) / 4},
		{"H_nr", hNR, stat.Covariance(ns, r, nil) / 4},
		{"H_rr", hRR, stat.Covariance(r, r, nil) / 4},
	} {
		if math.Abs(c.got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%s = %.15g, want %.15g", c.name, c.got, c.want)
		}
	}
}

// knownGaussian is the source of gaussKDE's samples.
var knownGaussian = Gaussian{Name: "g", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0.06, SigmaR: 0.01, Rho: 0.4}

var (
	gaussKDEOnce sync.Once
	gaussKDEVal  *KDE
	gaussKDEErr  error
)

// gaussKDE is the estimate from 5000 samples of knownGaussian (seed 7),
// built once for the tests that share it.
func gaussKDE(t *testing.T) *KDE {
	t.Helper()
	gaussKDEOnce.Do(func() {
		g := knownGaussian
		gaussKDEVal, gaussKDEErr = NewKDE("k", "synthetic", gaussSamples(7, 5000, g.MeanNs, g.SigmaNs, g.MeanR, g.SigmaR, g.Rho))
	})
	if gaussKDEErr != nil {
		t.Fatal(gaussKDEErr)
	}
	return gaussKDEVal
}

// kdeSD is the standard deviation of ln p̂ at a point where the density
// is p = exp(-d/2)/(2 pi) in coordinates scaled by the covariance: the
// asymptotic variance of a kernel estimate, Var p̂ ≈ R(K) p/(n det H^(1/2)),
// with R(K) = 1/(4 pi) for the bivariate normal kernel and det H^(1/2) = h^2
// in those coordinates (Wand & Jones 1995, "Kernel Smoothing", chapter 4),
// gives sd(ln p̂) = exp(d/4)/sqrt(2 n h^2).
func kdeSD(d float64, n int, h float64) float64 {
	return math.Exp(d/4) / math.Sqrt(2*float64(n)*h*h)
}

// TestKDEReproducesGaussian: the estimate from 5000 samples of a known
// Gaussian, far from r = 0 so the reflection is immaterial. The expected
// estimate is the Gaussian convolved with the kernel, a Gaussian with
// covariance (1 + h^2) C (covariances of convolved Gaussians add; common
// practice), so its Delta chi^2 is d/(1 + h^2) where the Gaussian's is d.
// Each point on the ellipses d = 0.25, 1, 2.3, 4 (eight directions) must
// agree within 3 sigma of the estimator's noise: Delta chi^2 = 2 (ln p_max
// - ln p̂), both terms noisy, sigma = 2 sqrt(sd(0)^2 + sd(d)^2) (kdeSD).
// The estimate's maximum must lie within 3 kernel widths of the mean.
func TestKDEReproducesGaussian(t *testing.T) {
	g := knownGaussian
	const n = 5000
	k := gaussKDE(t)
	_, _, _, h := k.Bandwidth()
	for _, d := range []float64{0.25, 1, 2.3, 4} {
		pts, closed, err := g.Contour(d, 8)
		if err != nil || !closed {
			t.Fatalf("Contour(%g): closed %v, %v", d, closed, err)
		}
		want := d / (1 + h*h)
		tol := 3 * 2 * math.Hypot(kdeSD(0, n, h), kdeSD(d, n, h))
		for _, p := range pts {
			if got := k.DeltaChi2(p.Ns, p.R); math.Abs(got-want) > tol {
				t.Errorf("Delta chi^2 at (%.5f, %.5f) = %.4f, smoothed Gaussian %.4f ± %.3f", p.Ns, p.R, got, want, tol)
			}
		}
	}
	mx, _ := k.Max()
	if x, y := (mx.Ns-g.MeanNs)/(h*g.SigmaNs), (mx.R-g.MeanR)/(h*g.SigmaR); math.Hypot(x, y) > 3 {
		t.Errorf("maximum at (%.5f, %.5f), %.1f kernel widths from the mean", mx.Ns, mx.R, math.Hypot(x, y))
	}
}

// TestKDERegions: the 68.27% and 95.45% highest-density regions of the
// same estimate. (1) The fractions of 4000 fresh draws from the Gaussian
// that fall inside are 68.27% and 95.45% within 3 percentage points
// (binomial noise of the fresh draws 0.7 points and of the sample quantile
// 0.7 points). (2) Their Delta chi^2 levels match the smoothed Gaussian's,
// 2.2958/(1 + h^2) and 6.1801/(1 + h^2) (Chi2Level; see
// TestKDEReproducesGaussian), within 5%. (3) Inside agrees with Levels (every 16th draw) and
// Enclosed runs from ~0 at the maximum to 1 far away.
func TestKDERegions(t *testing.T) {
	g := knownGaussian
	k := gaussKDE(t)
	fresh := gaussSamples(99, 4000, g.MeanNs, g.SigmaNs, g.MeanR, g.SigmaR, g.Rho)
	d68, d95 := k.Levels()
	var in68, in95 int
	for i, p := range fresh {
		a, b := k.Inside(p.Ns, p.R)
		if i%16 == 0 {
			if d := k.DeltaChi2(p.Ns, p.R); a != (d <= d68) || b != (d <= d95) {
				t.Fatalf("Inside(%v) = %v, %v but Delta chi^2 = %.6f, levels %.6f, %.6f", p, a, b, d, d68, d95)
			}
		}
		if a {
			in68++
		}
		if b {
			in95++
		}
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"fraction in 68%", float64(in68) / float64(len(fresh)), P68},
		{"fraction in 95%", float64(in95) / float64(len(fresh)), P95},
	} {
		if math.Abs(c.got-c.want) > 0.03 {
			t.Errorf("%s = %.4f, want %.4f ± 0.03", c.name, c.got, c.want)
		}
	}
	_, _, _, h := k.Bandwidth()
	g68, g95 := g.Levels()
	if w := g68 / (1 + h*h); math.Abs(d68-w) > 0.05*w {
		t.Errorf("68%% level Delta chi^2 = %.4f, want %.4f ± 5%%", d68, w)
	}
	if w := g95 / (1 + h*h); math.Abs(d95-w) > 0.05*w {
		t.Errorf("95%% level Delta chi^2 = %.4f, want %.4f ± 5%%", d95, w)
	}
	mx, _ := k.Max()
	if e := k.Enclosed(mx.Ns, mx.R); e > 1.0/5000 {
		t.Errorf("Enclosed at the maximum = %g, want 0", e)
	}
	if e := k.Enclosed(0.9, 0.2); e != 1 {
		t.Errorf("Enclosed far away = %g, want 1", e)
	}
	f68, f95 := k.DensityLevels()
	_, pmax := k.Max()
	if math.Abs(-2*math.Log(f68/pmax)-d68) > 1e-12 || math.Abs(-2*math.Log(f95/pmax)-d95) > 1e-12 {
		t.Errorf("DensityLevels %g, %g disagree with Levels %g, %g", f68, f95, d68, d95)
	}
}

// TestKDEMaximum: the polished maximum is at least the density at every
// sample and is stationary: a central difference of ln p over a hundredth
// of a kernel width changes it by less than 1e-6 (at a maximum the change
// is second order, about 1e-4 of (step/width)^2 ~ 1e-8; property of a
// maximum).
func TestKDEMaximum(t *testing.T) {
	k, err := NewKDE("k", "synthetic", gaussSamples(11, 400, 0.965, 0.004, 0.03, 0.01, -0.3))
	if err != nil {
		t.Fatal(err)
	}
	mx, pmax := k.Max()
	for _, p := range k.Samples() {
		if k.Density(p.Ns, p.R) > pmax {
			t.Fatalf("density at sample %v exceeds the maximum %g", p, pmax)
		}
	}
	hNN, _, hRR, _ := k.Bandwidth()
	for _, d := range [][2]float64{{1, 0}, {0, 1}, {1, 1}, {1, -1}} {
		e := 0.01
		up := math.Log(k.Density(mx.Ns+e*d[0]*math.Sqrt(hNN), mx.R+e*d[1]*math.Sqrt(hRR)))
		dn := math.Log(k.Density(mx.Ns-e*d[0]*math.Sqrt(hNN), mx.R-e*d[1]*math.Sqrt(hRR)))
		if math.Abs(up-dn) > 1e-6 {
			t.Errorf("ln p not stationary at the maximum along %v: %.3g", d, up-dn)
		}
	}
	if d := k.DeltaChi2(mx.Ns, mx.R); d != 0 {
		t.Errorf("Delta chi^2 at the maximum = %g, want 0", d)
	}
}

// TestKDEReflection: samples with r half-normal (sigma_r = 0.02, the
// shape of an upper limit) and n_s normal, independent. Without
// reflection a kernel estimate at r = 0 is half the density there; with
// it, the expected estimate at (mean n_s, 0) is the reflected convolution
// 2 N(0; 0, sigma_r^2 + H_rr) N(0; 0, sigma_n^2 + H_nn) (the half-normal is
// 2 N(r; 0, sigma_r^2) for r >= 0; by symmetry the folded convolution at
// r = 0 is twice the half of it; common practice). The estimate must
// agree within 4 sigma of its noise: at the boundary both kernel halves
// coincide, sd(p̂)/p = sqrt(2 R(K)/(n det H^(1/2) p)), R(K) = 1/(4 pi)
// (Wand & Jones 1995, chapter 4), about 4% here. The estimate is zero for
// r < 0, has zero slope in r at r = 0 (the change over 1% of a kernel
// width is second order), and is largest at r = 0 along the mean n_s.
func TestKDEReflection(t *testing.T) {
	const n, sNs, sR, mNs = 4000, 0.004, 0.02, 0.965
	pts := gaussSamples(5, n, mNs, sNs, 0, sR, 0)
	for i := range pts {
		pts[i].R = math.Abs(pts[i].R)
	}
	k, err := NewKDE("half", "synthetic", pts)
	if err != nil {
		t.Fatal(err)
	}
	hNN, hNR, hRR, _ := k.Bandwidth()
	want := 2 / math.Sqrt(2*math.Pi*(sR*sR+hRR)) / math.Sqrt(2*math.Pi*(sNs*sNs+hNN))
	rel := math.Sqrt(2 / (4 * math.Pi) / (n * math.Sqrt(hNN*hRR-hNR*hNR) * want))
	got := k.Density(mNs, 0)
	if math.Abs(got/want-1) > 4*rel {
		t.Errorf("density at r = 0: %.4g, want %.4g ± %.1f%% (unreflected would give about %.4g)", got, want, 400*rel, want/2)
	}
	if d := k.Density(mNs, -1e-6); d != 0 {
		t.Errorf("density at r < 0 = %g, want 0", d)
	}
	if d := k.DeltaChi2(mNs, -1e-6); !math.IsInf(d, 1) {
		t.Errorf("Delta chi^2 at r < 0 = %g, want +Inf", d)
	}
	eps := 0.01 * math.Sqrt(hRR)
	if s := (k.Density(mNs, eps) - got) / got; math.Abs(s) > 1e-3 {
		t.Errorf("relative change of the density over 1%% of a kernel width from r = 0: %.3g, want second order", s)
	}
	mx, _ := k.Max()
	if mx.R > 0.1*sR {
		t.Errorf("maximum at r = %g, want near 0 for a half-normal", mx.R)
	}
}

// TestKDENormalised: with reflection the estimate integrates to one over
// r >= 0 (each mirrored kernel returns the mass its original leaks below
// r = 0; Jones 1993), here for samples crowding r = 0. Composite
// Gauss-Legendre (gonum quad.Fixed, 24 panels of 12 nodes, each about one kernel width, a side over
// Extent, whose margins of four kernel widths leave out less than 1e-4).
func TestKDENormalised(t *testing.T) {
	pts := gaussSamples(13, 200, 0.965, 0.004, 0.005, 0.01, 0.5)
	for i := range pts {
		pts[i].R = math.Abs(pts[i].R)
	}
	k, err := NewKDE("n", "synthetic", pts)
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := k.Extent()
	if lo.R != 0 {
		t.Fatalf("Extent starts at r = %g, want 0 for samples near r = 0", lo.R)
	}
	composite := func(f func(float64) float64, a, b float64) float64 {
		const panels = 24
		s := 0.0
		w := (b - a) / panels
		for i := 0; i < panels; i++ {
			s += quad.Fixed(f, a+float64(i)*w, a+float64(i+1)*w, 12, nil, 0)
		}
		return s
	}
	mass := composite(func(ns float64) float64 {
		return composite(func(r float64) float64 { return k.Density(ns, r) }, lo.R, hi.R)
	}, lo.Ns, hi.Ns)
	if math.Abs(mass-1) > 1e-4 {
		t.Errorf("integral of the estimate over r >= 0 = %.6f, want 1", mass)
	}
}

// TestNewKDERefuses: too few samples, r < 0, non-finite values, too many,
// and collinear samples are refused with the constraint's name.
func TestNewKDERefuses(t *testing.T) {
	good := gaussSamples(1, MinSamples, 0.965, 0.004, 0.05, 0.01, 0)
	line := make([]Point, 60)
	for i := range line {
		line[i] = Point{Ns: 0.96 + 0.001*float64(i), R: 0.01 + 0.002*float64(i)}
	}
	mod := func(i int, p Point) []Point {
		s := append([]Point(nil), good...)
		s[i] = p
		return s
	}
	for _, c := range []struct {
		name string
		pts  []Point
	}{
		{"too few", good[:MinSamples-1]},
		{"negative r", mod(3, Point{0.96, -0.01})},
		{"NaN", mod(5, Point{math.NaN(), 0.01})},
		{"Inf", mod(5, Point{0.96, math.Inf(1)})},
		{"collinear", line},
		{"too many", make([]Point, MaxKDESamples+1)},
	} {
		if _, err := NewKDE("set-x", "c", c.pts); err == nil {
			t.Errorf("%s: accepted", c.name)
		} else if !contains(err.Error(), "set-x") {
			t.Errorf("%s: error %q does not name the constraint", c.name, err)
		}
	}
	if _, err := NewKDE("ok", "c", good); err != nil {
		t.Errorf("%d samples refused: %v", MinSamples, err)
	}
}
