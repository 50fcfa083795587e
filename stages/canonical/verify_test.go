package canonical

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

func mustNew(t testing.TB, family string, p map[string]float64) *model.Model {
	t.Helper()
	f, err := model.Lookup(family)
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestVerifyAlphaAttractors: the analytic canonical maps of the two
// alpha-attractor families pass the numerical check for the discrete
// set 3 alpha = 1..7 (Ferrara & Kallosh 2016, arXiv:1610.04163) and for
// extreme alpha = 1e-2 and 1e2, with n = 1 and n = 2. Maps:
// chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha)) on the disk and
// y = exp(sqrt(2/(3 alpha)) phi) on the half-plane (Kallosh, Linde & Roest
// 2013, arXiv:1311.0472). Default tolerance 1e-9 on every deviation.
func TestVerifyAlphaAttractors(t *testing.T) {
	alphas := []float64{1e-2, 1e2}
	for k := 1; k <= 7; k++ {
		alphas = append(alphas, float64(k)/3)
	}
	for _, family := range []string{"t-model", "e-model"} {
		for _, n := range []float64{1, 2} {
			for _, alpha := range alphas {
				m := mustNew(t, family, map[string]float64{"alpha": alpha, "n": n})
				rep, err := Verify(m, nil)
				if err != nil {
					t.Errorf("%s: %v", m.Describe(), err)
					continue
				}
				if rep.Canonical || rep.Points == 0 || rep.Field != m.Native.Name || rep.MapFormula != m.Native.MapFormula {
					t.Errorf("%s: report %+v", m.Describe(), rep)
				}
				// The demo set must be checked at several field values, not
				// one (at alpha = 1e-2 the t-model's range, at least 60 M_p,
				// is mostly plateau where chi sits on the disk's edge and
				// points are skipped; one point is all that is left there).
				if alpha > 0.3 && alpha < 2.4 && rep.Points < 3 {
					t.Errorf("%s: only %d field values checked", m.Describe(), rep.Points)
				}
				for what, d := range map[string]float64{"map": rep.MapDev, "inverse": rep.InverseDev, "potential": rep.PotDev, "slope": rep.SlopeDev} {
					if !(d <= 1e-9) {
						t.Errorf("%s: %s deviation %g", m.Describe(), what, d)
					}
				}
			}
		}
	}
}

// TestDiskMap checks the t-model's native field against the published map
// chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha)) directly, and the e-model's
// against y = exp(sqrt(2/(3 alpha)) phi) (Kallosh, Linde & Roest 2013,
// arXiv:1311.0472), to 1e-14 relative (one tanh or exp each).
func TestDiskMap(t *testing.T) {
	for _, alpha := range []float64{1e-2, 1.0 / 3, 1, 7.0 / 3, 1e2} {
		tm := mustNew(t, "t-model", map[string]float64{"alpha": alpha})
		em := mustNew(t, "e-model", map[string]float64{"alpha": alpha})
		s := math.Sqrt(6 * alpha)
		b := math.Sqrt(2 / (3 * alpha))
		for _, phi := range []float64{0, 0.1, 1, 3, 10} {
			if got, want := tm.Native.FromCanonical(phi), s*math.Tanh(phi/s); math.Abs(got-want) > 1e-14*math.Max(1, math.Abs(want)) {
				t.Errorf("t-model alpha=%g: chi(phi=%g) = %.17g, want %.17g", alpha, phi, got, want)
			}
			if got, want := em.Native.FromCanonical(phi), math.Exp(b*phi); math.Abs(got-want) > 1e-14*want {
				t.Errorf("e-model alpha=%g: y(phi=%g) = %.17g, want %.17g", alpha, phi, got, want)
			}
		}
		// The origins map to phi = 0.
		if p := tm.Native.ToCanonical(tm.Native.Origin); p != 0 {
			t.Errorf("t-model alpha=%g: phi(origin) = %g", alpha, p)
		}
		if p := em.Native.ToCanonical(em.Native.Origin); p != 0 {
			t.Errorf("e-model alpha=%g: phi(origin) = %g", alpha, p)
		}
	}
}

// TestMapRoundTrip: phi -> x -> phi is the identity away from the pole
// (property). Tolerance 1e-12 relative: tanh/atanh and exp/log lose about
// log10(1/(1 - tanh)) digits, bounded here by keeping phi/sqrt(6 alpha) < 5.
func TestMapRoundTrip(t *testing.T) {
	for _, family := range []string{"t-model", "e-model"} {
		for _, alpha := range []float64{1e-2, 1, 1e2} {
			m := mustNew(t, family, map[string]float64{"alpha": alpha})
			s := math.Sqrt(6 * alpha)
			for i := 1; i <= 20; i++ {
				phi := 5 * s * float64(i) / 20
				back := m.Native.ToCanonical(m.Native.FromCanonical(phi))
				if math.Abs(back-phi) > 1e-11*math.Max(1, phi) {
					t.Errorf("%s: phi=%g -> %g", m.Describe(), phi, back)
				}
			}
		}
	}
}

func TestVerifyCanonicalModel(t *testing.T) {
	for _, c := range []struct {
		family string
		p      map[string]float64
	}{{"starobinsky", nil}, {"power-law", map[string]float64{"p": 2}}, {"natural", map[string]float64{"f": 5}}} {
		rep, err := Verify(mustNew(t, c.family, c.p), nil)
		if err != nil || !rep.Canonical || rep.Field != "phi" {
			t.Errorf("%s: %+v, %v", c.family, rep, err)
		}
	}
}

// broken returns a copy of the t-model with its native field altered.
func broken(t *testing.T, alpha float64, alter func(nf *model.NativeField, s float64)) *model.Model {
	m := mustNew(t, "t-model", map[string]float64{"alpha": alpha})
	c := *m
	nf := *m.Native
	alter(&nf, math.Sqrt(6*alpha))
	c.Native = &nf
	return &c
}

// TestVerifyCatchesWrongMaps: deliberately wrong maps and kinetic functions,
// built by hand, must fail Verify with an error naming what is wrong.
func TestVerifyCatchesWrongMaps(t *testing.T) {
	cases := []struct {
		name  string
		alter func(nf *model.NativeField, s float64)
		want  string
	}{
		{"map off by 1%", func(nf *model.NativeField, s float64) {
			// Self-consistent pair (the inverse is right for the wrong
			// map), so only the quadrature of sqrt(K) can catch it.
			nf.ToCanonical = func(x float64) float64 { return 1.01 * s * math.Atanh(x/s) }
			nf.FromCanonical = func(phi float64) float64 { return s * math.Tanh(phi/(1.01*s)) }
		}, "canonical map against the quadrature"},
		{"map off by 1e-6", func(nf *model.NativeField, s float64) {
			nf.ToCanonical = func(x float64) float64 { return (1 + 1e-6) * s * math.Atanh(x/s) }
			nf.FromCanonical = func(phi float64) float64 { return s * math.Tanh(phi/((1+1e-6)*s)) }
		}, "canonical map against the quadrature"},
		{"kinetic function not squared", func(nf *model.NativeField, s float64) {
			nf.Kinetic = func(x float64) float64 { return 1 / (1 - x*x/(s*s)) }
		}, "canonical map against the quadrature"},
		{"inverse map wrong", func(nf *model.NativeField, s float64) {
			nf.FromCanonical = func(phi float64) float64 { return 0.999 * s * math.Tanh(phi/s) }
		}, "inverse map"},
		{"native potential wrong", func(nf *model.NativeField, s float64) {
			nf.V = func(x num.Jet) num.Jet { return num.PowConst(num.Scale(1/(s*s), num.Mul(x, x)), 1.01) }
		}, "potential in the two fields"},
		{"map leaves the disk", func(nf *model.NativeField, s float64) {
			nf.FromCanonical = func(phi float64) float64 { return phi }
		}, "outside its domain"},
		{"kinetic function negative", func(nf *model.NativeField, s float64) {
			nf.Kinetic = func(x float64) float64 { return -1 }
		}, "want a positive finite value"},
	}
	for _, c := range cases {
		m := broken(t, 1, c.alter)
		_, err := Verify(m, nil)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// TestVerifyTolerance: a looser tolerance lets a small error through; the
// default does not (the 1e-6 map error above).
func TestVerifyTolerance(t *testing.T) {
	m := broken(t, 1, func(nf *model.NativeField, s float64) {
		nf.ToCanonical = func(x float64) float64 { return (1 + 1e-6) * s * math.Atanh(x/s) }
		nf.FromCanonical = func(phi float64) float64 { return s * math.Tanh(phi/((1+1e-6)*s)) }
	})
	rep, err := Verify(m, &Settings{Tol: 1e-3})
	if err != nil {
		t.Errorf("Tol 1e-3: %v", err)
	}
	if !(rep.MapDev > 1e-7 && rep.MapDev < 1e-5) {
		t.Errorf("MapDev %g, want about 1e-6", rep.MapDev)
	}
}

// TestQuadratureOfSqrtKCumulative: the check's quadrature adds stretches
// to the farthest point integrated on each side; asked for points in
// order (as Verify asks) or each on its own, it gives the same integral,
// and both agree with the analytic maps phi(x) - phi(origin) (Kallosh,
// Linde & Roest 2013, arXiv:1311.0472), to 1e-12 relative: each stretch
// is integrated to 1e-13 of the whole, but near the disk's edge K is
// known only to the rounding of x and the quadratures there are accepted
// at their floor (about 1e-13 relative each).
func TestQuadratureOfSqrtKCumulative(t *testing.T) {
	quad := &num.QuadSettings{RelTol: 1e-13, AbsTol: 1e-14}
	for _, c := range []struct {
		family string
		alpha  float64
	}{{"e-model", 1e-2}, {"e-model", 1}, {"e-model", 1e2}, {"t-model", 1e-2}, {"t-model", 1}, {"t-model", 1e2}} {
		m := mustNew(t, c.family, map[string]float64{"alpha": c.alpha})
		nf := m.Native
		cumulative := quadratureOfSqrtK(nf, quad, 1e-13)
		pts := samplePoints(m)
		// Both sides of the origin, and a point back towards the origin.
		pts = append(pts, -pts[2], -pts[5], pts[1])
		for _, phi := range pts {
			x := nf.FromCanonical(phi)
			if !(x > nf.Lo && x < nf.Hi) || edgeGap(x, nf.Lo, nf.Hi) < 1e-6 {
				continue
			}
			got, err := cumulative(x)
			if err != nil {
				t.Errorf("%s alpha=%g: x = %g: %v", c.family, c.alpha, x, err)
				continue
			}
			alone, err := quadratureOfSqrtK(nf, quad, 1e-13)(x)
			if err != nil {
				t.Errorf("%s alpha=%g: x = %g alone: %v", c.family, c.alpha, x, err)
				continue
			}
			want := nf.ToCanonical(x) - nf.ToCanonical(nf.Origin)
			if d := math.Abs(got-alone) / math.Max(1, math.Abs(alone)); d > 1e-12 {
				t.Errorf("%s alpha=%g: x = %g: cumulative %.17g, alone %.17g", c.family, c.alpha, x, got, alone)
			}
			if d := math.Abs(got-want) / math.Max(1, math.Abs(want)); d > 1e-12 {
				t.Errorf("%s alpha=%g: x = %g: quadrature %.17g, map %.17g", c.family, c.alpha, x, got, want)
			}
		}
	}
}
