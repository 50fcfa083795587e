package model

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/kinetic"
	"github.com/inflatrace/inflatrace/stages/num"
)

// diskSpec is the T-model written on its native disk field with a
// numerical map: K = 1/(1 - chi^2/(6 alpha))^2, V = chi^2/(6 alpha)
// (Kallosh, Linde & Roest 2013, arXiv:1311.0472).
func diskSpec(alpha float64) NativeSpec {
	s := math.Sqrt(6 * alpha)
	return NativeSpec{
		Family: "disk-numerical", Params: map[string]float64{"alpha": alpha}, Field: "chi",
		V: func(x num.Jet) num.Jet { return num.Scale(1/(6*alpha), num.Mul(x, x)) },
		K: func(x num.Jet) num.Jet {
			q := num.AddConst(num.Scale(-1/(6*alpha), num.Mul(x, x)), 1)
			return num.Recip(num.Mul(q, q))
		},
		Origin: 0, Lo: -s, Hi: s,
		SearchLo: 0, SearchHi: 14 * s,
	}
}

// TestNewNativeMatchesAnalytic: the T-model built by NewNative from its
// native V and K reproduces the analytic t-model (same potential
// tanh^2(phi/sqrt(6 alpha)); Kallosh, Linde & Roest 2013) in V and its
// three derivatives, to relative 1e-12 plus 1e-15 absolute (x(phi) is
// accurate to about 1e-15 sqrt(6 alpha)), over the inflationary range.
func TestNewNativeMatchesAnalytic(t *testing.T) {
	for _, alpha := range []float64{1.0 / 3, 1, 7.0 / 3} {
		nm, err := NewNative(diskSpec(alpha))
		if err != nil {
			t.Fatal(err)
		}
		ana := mustNew(t, "t-model", map[string]float64{"alpha": alpha})
		s := math.Sqrt(6 * alpha)
		for _, u := range []float64{0.05, 0.3, 1, 2, 3.5, 6} {
			checkDerivs(t, "numerical disk vs t-model", jetOf(nm, u*s), jetOf(ana, u*s), 1e-12, 1e-15)
		}
		if nm.Native.MapFormula != NumericalMapFormula || !nm.Native.Numerical() || nm.Native.Map == nil {
			t.Errorf("native field %+v", nm.Native)
		}
		if nm.Lo != 0 || nm.Hi != 14*s {
			t.Errorf("range (%g, %g)", nm.Lo, nm.Hi)
		}
	}
}

// TestNewNativeSearchInField: a search range given in the native field is
// mapped to phi through the map (for the disk, phi = s atanh(chi/s)).
func TestNewNativeSearchInField(t *testing.T) {
	spec := diskSpec(1)
	s := math.Sqrt(6.0)
	hi := s * (1 - 1e-4)
	spec.SearchLo, spec.SearchHi, spec.SearchInField = 0.1, hi, true
	m, err := NewNative(spec)
	if err != nil {
		t.Fatal(err)
	}
	// The upper end sits 1e-4 from the pole, where one ulp of chi moves phi
	// by about 1e-12: tolerance 1e-10.
	if !within(m.Lo, s*math.Atanh(0.1/s), 1e-13, 0) || !within(m.Hi, s*math.Atanh(hi/s), 1e-10, 0) {
		t.Errorf("range (%.17g, %.17g), want (%.17g, %.17g)", m.Lo, m.Hi, s*math.Atanh(0.1/s), s*math.Atanh(hi/s))
	}
}

// TestNewNativeErrors: bad specifications are refused with the family's
// name and the reason; kinetic failures keep their kinetic.Error.
func TestNewNativeErrors(t *testing.T) {
	s := math.Sqrt(6.0)
	cases := []struct {
		name  string
		alter func(*NativeSpec)
		is    error
		words []string
	}{
		{"no potential", func(n *NativeSpec) { n.V = nil }, nil, []string{"needs both"}},
		{"empty search range", func(n *NativeSpec) { n.SearchLo, n.SearchHi = 3, 3 }, nil, []string{"search range (3, 3) is empty"}},
		{"search range beyond the resolved map", func(n *NativeSpec) { n.SearchHi = 1e6 }, nil, []string{"leaves the resolved canonical range"}},
		{"native search range outside the domain", func(n *NativeSpec) { n.SearchInField, n.SearchLo, n.SearchHi = true, 0, 2*s }, nil, []string{"leaves the resolved native range"}},
		{"origin outside the domain", func(n *NativeSpec) { n.Origin = 5 }, kinetic.ErrOrigin, []string{"canonical normalisation of chi"}},
		{"kinetic function negative", func(n *NativeSpec) {
			n.K = func(x num.Jet) num.Jet { return num.AddConst(x, 0.5) }
		}, kinetic.ErrNotPositive, []string{"not positive"}},
		{"pole inside", func(n *NativeSpec) {
			n.K = func(x num.Jet) num.Jet { d := num.AddConst(x, -1/math.Pi); return num.Recip(num.Mul(d, d)) }
		}, kinetic.ErrPole, []string{"pole inside the domain"}},
	}
	for _, c := range cases {
		spec := diskSpec(1)
		c.alter(&spec)
		_, err := NewNative(spec)
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		if !strings.HasPrefix(err.Error(), "disk-numerical: ") {
			t.Errorf("%s: error %q does not name the family", c.name, err)
		}
		if c.is != nil && !errors.Is(err, c.is) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.is)
		}
		for _, w := range c.words {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", c.name, err, w)
			}
		}
	}
}

// TestNewNativeCopiesParams: the model keeps its own copy of the
// parameters (common practice for value-like configuration).
func TestNewNativeCopiesParams(t *testing.T) {
	spec := diskSpec(1)
	m, err := NewNative(spec)
	if err != nil {
		t.Fatal(err)
	}
	spec.Params["alpha"] = 5
	if m.Params["alpha"] != 1 || m.Describe() != "disk-numerical(alpha=1)" {
		t.Errorf("params %v", m.Params)
	}
}
