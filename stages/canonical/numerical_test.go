package canonical

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// TestVerifyNumericalMaps: the Higgs family's numerical canonical map
// (dphi/dh = sqrt((1 + xi h^2 + 6 xi^2 h^2)/(1 + xi h^2)^2), Bezrukov &
// Shaposhnikov 2008, arXiv:0710.3755) passes the independent check across
// the coupling's range, at the numerical sample (at least 16 points up to
// the top of the range), with the numerical tolerance 1000 x 1e-13. The
// measured deviations are about 1e-15 (logged); the test also asks
// MapDev <= 1e-12 so that a map that merely meets the tolerance is noticed.
func TestVerifyNumericalMaps(t *testing.T) {
	for _, xi := range []float64{1e-3, 1, 1e4, 1e10} {
		m := mustNew(t, "higgs", map[string]float64{"xi": xi})
		rep, err := Verify(m, nil)
		if err != nil {
			t.Errorf("xi=%g: %v", xi, err)
			continue
		}
		if !rep.Numerical || rep.MapTol != 1e-10 || rep.Points < 16 || rep.Field != "h" || rep.MapFormula != m.Native.MapFormula {
			t.Errorf("xi=%g: report %+v", xi, rep)
		}
		if rep.MapDev > 1e-12 {
			t.Errorf("xi=%g: map deviation %g", xi, rep.MapDev)
		}
		t.Logf("xi=%g: %d points, map %.2g, inverse %.2g, V %.2g, V' %.2g, V'' %.2g", xi, rep.Points, rep.MapDev, rep.InverseDev, rep.PotDev, rep.SlopeDev, rep.CurvatureDev)
	}
}

// numericalDisk is the T-model on its disk with the canonical map computed
// numerically by model.NewNative (K = 1/(1 - chi^2/(6 alpha))^2,
// V = chi^2/(6 alpha); Kallosh, Linde & Roest 2013, arXiv:1311.0472).
func numericalDisk(t *testing.T, alpha float64) *model.Model {
	t.Helper()
	s := math.Sqrt(6 * alpha)
	m, err := model.NewNative(model.NativeSpec{
		Family: "disk", Params: map[string]float64{"alpha": alpha}, Field: "chi",
		V: func(x num.Jet) num.Jet { return num.Scale(1/(6*alpha), num.Mul(x, x)) },
		K: func(x num.Jet) num.Jet {
			q := num.AddConst(num.Scale(-1/(6*alpha), num.Mul(x, x)), 1)
			return num.Recip(num.Mul(q, q))
		},
		Origin: 0, Lo: -s, Hi: s, SearchLo: 0, SearchHi: 10 * s,
	})
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestVerifyNumericalDisk: a numerical map with poles at both ends of its
// domain passes, with the edge sample (points towards the poles) included,
// for the discrete set 3 alpha = 1, 7 (Ferrara & Kallosh 2016,
// arXiv:1610.04163).
func TestVerifyNumericalDisk(t *testing.T) {
	for _, alpha := range []float64{1.0 / 3, 7.0 / 3} {
		m := numericalDisk(t, alpha)
		rep, err := Verify(m, nil)
		if err != nil || !rep.Numerical || rep.Points < 20 {
			t.Errorf("alpha=%g: %+v, %v", alpha, rep, err)
		}
		t.Logf("alpha=%g: %d points, map %.2g, inverse %.2g, V %.2g, V' %.2g, V'' %.2g", alpha, rep.Points, rep.MapDev, rep.InverseDev, rep.PotDev, rep.SlopeDev, rep.CurvatureDev)
	}
}

// TestVerifyCatchesWrongNumericalMaps: a numerical model altered by hand
// must fail with an error naming what is wrong. The 4e-10 error in K
// (2e-10 in phi) would pass the analytic tolerance 1e-9 but not the
// numerical 1e-10; a looser NumericalMapTol lets it through.
func TestVerifyCatchesWrongNumericalMaps(t *testing.T) {
	cases := []struct {
		name  string
		alter func(nf *model.NativeField)
		s     *Settings
		want  string
	}{
		{"kinetic function off by 4e-10", func(nf *model.NativeField) {
			k := nf.Kinetic
			nf.Kinetic = func(x float64) float64 { return k(x) * (1 + 4e-10) }
		}, nil, "canonical map against the quadrature"},
		{"kinetic function off by 1e-6", func(nf *model.NativeField) {
			k := nf.Kinetic
			nf.Kinetic = func(x float64) float64 { return k(x) * (1 + 1e-6) }
		}, nil, "canonical map against the quadrature"},
		{"native potential off by 1e-6", func(nf *model.NativeField) {
			v := nf.V
			nf.V = func(x num.Jet) num.Jet { return num.Scale(1+1e-6, v(x)) }
		}, nil, "potential in the two fields"},
		{"kinetic derivative wrong", func(nf *model.NativeField) {
			k := nf.KineticJet
			nf.KineticJet = func(x num.Jet) num.Jet { j := k(x); j.D1 *= 1.01; return j }
		}, nil, "potential curvature"},
		{"inverse off by 1e-6", func(nf *model.NativeField) {
			f := nf.FromCanonical
			nf.FromCanonical = func(phi float64) float64 { return f(phi) * (1 + 1e-6) }
		}, nil, "inverse map"},
	}
	for _, c := range cases {
		m := mustNew(t, "higgs", map[string]float64{"xi": 1e4})
		cp := *m
		nf := *m.Native
		c.alter(&nf)
		cp.Native = &nf
		_, err := Verify(&cp, c.s)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	m := mustNew(t, "higgs", map[string]float64{"xi": 1e4})
	cp := *m
	nf := *m.Native
	k := nf.Kinetic
	nf.Kinetic = func(x float64) float64 { return k(x) * (1 + 4e-10) }
	cp.Native = &nf
	if rep, err := Verify(&cp, &Settings{NumericalMapTol: 1e-9}); err != nil || !(rep.MapDev > 1e-10 && rep.MapDev < 1e-9) || rep.MapTol != 1e-9 {
		t.Errorf("looser tolerance: %+v, %v", rep, err)
	}
}
