package infer

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// linearGaussian is a model whose n_s is linear in one parameter theta,
// n_s = c0 + c1 theta, with theta uniform on [a, b] and a Gaussian
// likelihood for n_s of mean mu and deviation sigma. Then (closed form,
// the Gaussian integral; common practice):
//
//	Z = sigma sqrt(pi/2) / (|c1| (b - a)) [erf(z_b) - erf(z_a)],
//	z = (c0 + c1 theta - mu) / (sqrt(2) sigma),
//
// and the posterior of theta is a normal of mean (mu - c0)/c1 and
// deviation sigma/|c1| truncated to [a, b].
type linearGaussian struct{ a, b, c0, c1, mu, sigma float64 }

func (m linearGaussian) theta(u float64) float64 { return m.a + u*(m.b-m.a) }

func (m linearGaussian) lnL(theta float64) float64 {
	d := (m.c0 + m.c1*theta - m.mu) / m.sigma
	return -0.5 * d * d
}

func (m linearGaussian) lnZ() float64 {
	z := func(t float64) float64 { return (m.c0 + m.c1*t - m.mu) / (math.Sqrt2 * m.sigma) }
	return math.Log(m.sigma * math.Sqrt(math.Pi/2) / (math.Abs(m.c1) * (m.b - m.a)) * math.Abs(math.Erf(z(m.b))-math.Erf(z(m.a))))
}

// quantile of the truncated normal posterior of theta.
func (m linearGaussian) quantile(q float64) float64 {
	mean, sd := (m.mu-m.c0)/m.c1, m.sigma/math.Abs(m.c1)
	cdf := func(t float64) float64 { return 0.5 * math.Erfc(-(t-mean)/(math.Sqrt2*sd)) }
	pa, pb := cdf(m.a), cdf(m.b)
	return mean + math.Sqrt2*sd*math.Erfinv(2*(pa+q*(pb-pa))-1)
}

func (m linearGaussian) integrand() Integrand {
	return func(u []float64) (float64, []float64, error) {
		t := m.theta(u[0])
		return m.lnL(t), []float64{t}, nil
	}
}

// TestEvidenceLinearGaussian: ln Z of a linear model with a Gaussian
// likelihood against its closed form, at the default tolerance and at a
// tight one, for a broad likelihood and for one a hundred times narrower
// than the prior (the adaptive partition must find it).
func TestEvidenceLinearGaussian(t *testing.T) {
	for _, tc := range []struct {
		name string
		m    linearGaussian
	}{
		{"broad", linearGaussian{a: 0, b: 2, c0: 0.95, c1: 0.01, mu: 0.965, sigma: 0.004}},
		{"narrow", linearGaussian{a: 0, b: 100, c0: 0.90, c1: 0.001, mu: 0.9682, sigma: 0.0005}},
		{"edge", linearGaussian{a: 1, b: 3, c0: 0.99, c1: -0.01, mu: 0.9742, sigma: 0.003}},
	} {
		for _, tol := range []float64{0.01, 1e-7} {
			res, err := Integrate(tc.m.integrand(), 1, &Settings{Tol: tol})
			if err != nil {
				t.Fatalf("%s tol %g: %v", tc.name, tol, err)
			}
			want := tc.m.lnZ()
			if d := math.Abs(res.LnZ - want); d > tol || d > 10*res.LnZErr+1e-12 {
				t.Errorf("%s tol %g: ln Z = %.10f ± %.2g, closed form %.10f (off by %.2g)", tc.name, tol, res.LnZ, res.LnZErr, want, d)
			}
			if res.LnZErr > tol {
				t.Errorf("%s tol %g: error estimate %.2g above the tolerance", tc.name, tol, res.LnZErr)
			}
		}
	}
}

// TestCredibleIntervalLinearGaussian: the 68% and 95% equal-tailed
// intervals of theta against the truncated normal's quantiles, to a
// hundredth of the posterior's width.
func TestCredibleIntervalLinearGaussian(t *testing.T) {
	m := linearGaussian{a: 0, b: 2, c0: 0.95, c1: 0.01, mu: 0.965, sigma: 0.004}
	res, err := Integrate(m.integrand(), 1, &Settings{Tol: 1e-4})
	if err != nil {
		t.Fatal(err)
	}
	sd := m.sigma / m.c1
	theta := func(i int) float64 { return res.Derived[i][0] }
	for _, p := range []float64{0.6827, 0.9545} {
		lo, hi := m.quantile((1-p)/2), m.quantile((1+p)/2)
		// From the interpolated marginal: to a thousandth of the width.
		q, err := res.MarginalQuantiles(0, (1-p)/2, (1+p)/2)
		if err != nil {
			t.Fatal(err)
		}
		mlo, mhi := m.theta(q[0].Value), m.theta(q[1].Value)
		if math.Abs(mlo-lo) > 1e-3*sd || math.Abs(mhi-hi) > 1e-3*sd {
			t.Errorf("%g interval from the marginal [%.6f, %.6f], closed form [%.6f, %.6f] (posterior sd %.3g)", p, mlo, mhi, lo, hi, sd)
		}
		// From the weighted nodes (any derived quantity): within the
		// error estimate it reports.
		iv := res.Credible(theta, p)
		if math.Abs(iv.Lo.Value-lo) > iv.Lo.Err || math.Abs(iv.Hi.Value-hi) > iv.Hi.Err {
			t.Errorf("%g interval from the nodes [%.5f ± %.2g, %.5f ± %.2g], closed form [%.5f, %.5f]", p, iv.Lo.Value, iv.Lo.Err, iv.Hi.Value, iv.Hi.Err, lo, hi)
		}
	}
	mean := res.Mean(theta)
	// The truncation at 2 (1.25 sd above the mean 1.5) pulls the mean
	// down: E = mu - sd (phi(beta) - phi(alpha)) / (Phi(beta) - Phi(alpha)).
	mu0 := (m.mu - m.c0) / m.c1
	al, be := (m.a-mu0)/sd, (m.b-mu0)/sd
	phi := func(x float64) float64 { return math.Exp(-x*x/2) / math.Sqrt(2*math.Pi) }
	Phi := func(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }
	want := mu0 - sd*(phi(be)-phi(al))/(Phi(be)-Phi(al))
	if math.Abs(mean.Value-want) > 1e-6 {
		t.Errorf("posterior mean %.8f, truncated normal %.8f", mean.Value, want)
	}
	prof, err := res.Profile(theta, 1)
	if err != nil {
		t.Fatal(err)
	}
	// The profile likelihood is the likelihood: within 1 sd of mu0
	// (clipped at b).
	if math.Abs(prof.Lo.Value-(mu0-sd)) > prof.Lo.Err+1e-9 || math.Abs(prof.Hi.Value-math.Min(m.b, mu0+sd)) > prof.Hi.Err+1e-9 {
		t.Errorf("profile interval [%.4f ± %.2g, %.4f ± %.2g], want [%.4f, %.4f]", prof.Lo.Value, prof.Lo.Err, prof.Hi.Value, prof.Hi.Err, mu0-sd, math.Min(m.b, mu0+sd))
	}
}

// TestEvidenceTwoParameters: a model with n_s = c0 + c1 theta + c2 phi
// (both uniform on [0, 1]) and a Gaussian likelihood: the inner integral
// over theta is the closed form above, the outer one over phi is taken by
// gonum's fixed 200-point Gauss–Legendre rule, independently of this
// package; and a separable model whose r depends on phi alone, where Z
// is the product of two closed forms.
func TestEvidenceTwoParameters(t *testing.T) {
	const c0, c1, c2, mu, sigma = 0.94, 0.02, 0.015, 0.965, 0.003
	f := func(u []float64) (float64, []float64, error) {
		d := (c0 + c1*u[0] + c2*u[1] - mu) / sigma
		return -0.5 * d * d, nil, nil
	}
	res, err := Integrate(f, 2, &Settings{Tol: 1e-5})
	if err != nil {
		t.Fatal(err)
	}
	inner := func(phi float64) float64 {
		m := linearGaussian{a: 0, b: 1, c0: c0 + c2*phi, c1: c1, mu: mu, sigma: sigma}
		return math.Exp(m.lnZ())
	}
	want := math.Log(quad.Fixed(inner, 0, 1, 200, quad.Legendre{}, 0))
	if d := math.Abs(res.LnZ - want); d > 1e-5 {
		t.Errorf("ln Z = %.9f ± %.2g, reference %.9f (off by %.2g)", res.LnZ, res.LnZErr, want, d)
	}

	mA := linearGaussian{a: 0, b: 1, c0: 0.95, c1: 0.03, mu: 0.9682, sigma: 0.0032}
	mB := linearGaussian{a: 0, b: 1, c0: 0, c1: 0.05, mu: 0, sigma: 0.017}
	sep := func(u []float64) (float64, []float64, error) {
		return mA.lnL(mA.theta(u[0])) + mB.lnL(mB.theta(u[1])), nil, nil
	}
	res, err = Integrate(sep, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(res.LnZ - (mA.lnZ() + mB.lnZ())); d > 0.01 {
		t.Errorf("separable ln Z = %.6f ± %.2g, product of closed forms %.6f", res.LnZ, res.LnZErr, mA.lnZ()+mB.lnZ())
	}
}

// TestIntegrateIsDeterministic: the same problem gives the same bits, and
// an integrand that vanishes everywhere is an error, not a zero.
func TestIntegrateIsDeterministic(t *testing.T) {
	m := linearGaussian{a: 0, b: 100, c0: 0.90, c1: 0.001, mu: 0.9682, sigma: 0.0005}
	a, err := Integrate(m.integrand(), 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Integrate(m.integrand(), 1, nil)
	if math.Float64bits(a.LnZ) != math.Float64bits(b.LnZ) || a.Evals != b.Evals {
		t.Errorf("two runs: ln Z %v and %v, %d and %d evaluations", a.LnZ, b.LnZ, a.Evals, b.Evals)
	}
	none := func(u []float64) (float64, []float64, error) { return math.Inf(-1), nil, nil }
	if _, err := Integrate(none, 2, nil); err != ErrNoMass {
		t.Errorf("vanishing integrand: %v, want ErrNoMass", err)
	}
	if _, err := Integrate(none, 5, nil); err == nil {
		t.Error("5 dimensions accepted")
	}
}

// TestDetectionAndGrade: the detection probability is 1/2 at r = 3 sigma
// (the measured value is as likely above as below), and the grades follow
// Jeffreys' thresholds in log10 B.
func TestDetectionAndGrade(t *testing.T) {
	p, err := DetectionProbability(0.009, 0.003, 3)
	if err != nil || math.Abs(p-0.5) > 1e-15 {
		t.Errorf("P(3 sigma | r = 3 sigma) = %v, %v", p, err)
	}
	p, _ = DetectionProbability(0, 0.003, 3)
	if want := 0.5 * math.Erfc(3/math.Sqrt2); math.Abs(p-want) > 1e-18 {
		t.Errorf("P(3 sigma | r = 0) = %v, want the one-sided tail %v", p, want)
	}
	if _, err := DetectionProbability(0.01, 0, 3); err == nil {
		t.Error("sigma 0 accepted")
	}
	for _, c := range []struct {
		log10B float64
		want   string
	}{{0.3, "barely worth mentioning"}, {0.7, "substantial"}, {1.2, "strong"}, {1.7, "very strong"}, {2.5, "decisive"}, {-1.2, "strong"}} {
		if g := Grade(c.log10B * math.Ln10); g != c.want {
			t.Errorf("log10 B = %g: %q, want %q", c.log10B, g, c.want)
		}
	}
	if e, _ := ExclusionProbability(0.006, 0.003, 0.95); e != 1 {
		t.Errorf("r = 2 sigma not excluded by a null result at 95%%: %v", e)
	}
	if e, _ := ExclusionProbability(0.004, 0.003, 0.95); e != 0 {
		t.Errorf("r = 1.33 sigma excluded at 95%%: %v", e)
	}
}

// TestMarginalTwoParameters: in a separable two-parameter model each
// coordinate's marginal is its own truncated normal.
func TestMarginalTwoParameters(t *testing.T) {
	mA := linearGaussian{a: 0, b: 1, c0: 0.95, c1: 0.03, mu: 0.9682, sigma: 0.0032}
	mB := linearGaussian{a: 0, b: 1, c0: 0, c1: 0.05, mu: 0.01, sigma: 0.017}
	sep := func(u []float64) (float64, []float64, error) {
		return mA.lnL(mA.theta(u[0])) + mB.lnL(mB.theta(u[1])), nil, nil
	}
	res, err := Integrate(sep, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, m := range []linearGaussian{mA, mB} {
		q, err := res.MarginalQuantiles(k, 0.16, 0.5, 0.84)
		if err != nil {
			t.Fatal(err)
		}
		sd := m.sigma / math.Abs(m.c1)
		for j, p := range []float64{0.16, 0.5, 0.84} {
			if got, want := m.theta(q[j].Value), m.quantile(p); math.Abs(got-want) > 1e-3*sd {
				t.Errorf("coordinate %d quantile %g: %.6f, closed form %.6f (sd %.3g)", k, p, got, want, sd)
			}
		}
	}
}

// TestMarginalDensity: the interpolated marginal density of theta is the
// truncated normal's, and the smooth density of the nodes integrates to
// one and peaks near it (a kernel estimate is broadened by its bandwidth).
func TestMarginalDensity(t *testing.T) {
	m := linearGaussian{a: 0, b: 2, c0: 0.95, c1: 0.01, mu: 0.965, sigma: 0.004}
	res, err := Integrate(m.integrand(), 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	mean, sd := (m.mu-m.c0)/m.c1, m.sigma/m.c1
	Phi := func(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }
	norm := Phi((m.b-mean)/sd) - Phi((m.a-mean)/sd)
	us := []float64{0.25, 0.5, 0.75, 0.9}
	got, err := res.MarginalDensity(0, us)
	if err != nil {
		t.Fatal(err)
	}
	for j, u := range us {
		th := m.theta(u)
		want := math.Exp(-0.5*math.Pow((th-mean)/sd, 2)) / (sd * math.Sqrt(2*math.Pi) * norm) * (m.b - m.a) // per unit u
		if math.Abs(got[j]-want) > 1e-3*want {
			t.Errorf("density at u = %g: %.6g, truncated normal %.6g", u, got[j], want)
		}
	}
	xs := make([]float64, 401)
	for i := range xs {
		xs[i] = -1 + float64(i)/100 // wider than the prior: the kernels' tails
	}
	d := res.Density(func(i int) float64 { return res.Derived[i][0] }, xs)
	var total float64
	for i := range d {
		total += d[i] * 0.01
	}
	if math.Abs(total-1) > 1e-3 {
		t.Errorf("the smooth density integrates to %.4f", total)
	}
}

// TestDensity2: the joint density of a separable two-parameter model
// integrates to one on a grid wider than its posterior, and its mean
// along each axis is the product's (the truncated normals' means, to a
// fiftieth of their deviations: the kernel is symmetric).
func TestDensity2(t *testing.T) {
	mA := linearGaussian{a: 0, b: 1, c0: 0.95, c1: 0.03, mu: 0.9632, sigma: 0.0032}
	mB := linearGaussian{a: 0, b: 1, c0: 0, c1: 0.05, mu: 0.02, sigma: 0.005}
	sep := func(u []float64) (float64, []float64, error) {
		return mA.lnL(mA.theta(u[0])) + mB.lnL(mB.theta(u[1])), nil, nil
	}
	res, err := Integrate(sep, 2, &Settings{Tol: 1e-4})
	if err != nil {
		t.Fatal(err)
	}
	xs, ys := make([]float64, 61), make([]float64, 61)
	for i := range xs {
		xs[i], ys[i] = -0.5+2*float64(i)/60, -0.5+2*float64(i)/60
	}
	z, err := res.Density2(func(i int) float64 { return res.U[2*i] }, func(i int) float64 { return res.U[2*i+1] }, xs, ys)
	if err != nil {
		t.Fatal(err)
	}
	var total, mx, my float64
	d := (2.0 / 60) * (2.0 / 60)
	for i := range xs {
		for j := range ys {
			total += z[i][j] * d
			mx += z[i][j] * d * xs[i]
			my += z[i][j] * d * ys[j]
		}
	}
	if math.Abs(total-1) > 1e-9 {
		t.Errorf("the joint density integrates to %.6f", total)
	}
	wantX := res.Mean(func(i int) float64 { return res.U[2*i] }).Value
	wantY := res.Mean(func(i int) float64 { return res.U[2*i+1] }).Value
	if math.Abs(mx-wantX) > 0.02*mA.sigma/mA.c1 || math.Abs(my-wantY) > 0.02*mB.sigma/mB.c1 {
		t.Errorf("means on the grid (%.4f, %.4f), posterior means (%.4f, %.4f)", mx, my, wantX, wantY)
	}
}
