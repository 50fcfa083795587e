package model

import (
	"math"
	"testing"
)

// higgsPhiExact is the exact canonical field of the Higgs (derived here by
// integrating sqrt(K); see kinetic's higgsPhi for the derivation and the
// check against a 50-digit evaluation): with u = sqrt(xi) h,
// c = sqrt(1 + 6 xi), k = sqrt(6 xi),
// sqrt(xi) phi = asinh(c u)/(c + k) + k asinh(u sqrt(1 + c^2 u^2)/((c + k) sqrt(1 + u^2))).
func higgsPhiExact(xi, h float64) float64 {
	c := math.Sqrt(1 + 6*xi)
	k := math.Sqrt(6 * xi)
	u := math.Sqrt(xi) * h
	return (math.Asinh(c*u)/(c+k) + k*math.Asinh(u*math.Sqrt(1+c*c*u*u)/((c+k)*math.Sqrt(1+u*u)))) / math.Sqrt(xi)
}

// higgsNative returns V = h^4/(1 + u)^2 and K = (1 + (1 + 6 xi) u)/(1 + u)^2,
// u = xi h^2, with their h-derivatives differentiated by hand (derived
// here): V_h = 4h^3/(1+u)^3, V_hh = 12h^2 (1-u)/(1+u)^4,
// V_hhh = 24h (1 - 5u + 2u^2)/(1+u)^5, K_h = 2 xi h P/(1+u)^3 with
// P = 6 xi - 1 - (1 + 6 xi) u, K_hh = 2 xi (P (1 - 5u) - 2u (1 + 6 xi)(1 + u))/(1+u)^4.
//
// With abs set, every sum in these formulas is replaced by the sum of the
// absolute values of its terms: the size of what cancels, which sets the
// rounding of each derivative where it passes through zero.
func higgsNative(xi, h float64, abs bool) (v, k [4]float64) {
	u := xi * h * h
	q := 1 + u
	sg := 1.0
	if abs {
		sg = -1
	}
	P := 6*xi - sg*1 - sg*(1+6*xi)*u
	P5 := P * (1 - sg*5*u)
	if abs {
		P5 = P * (1 + 5*u)
	}
	v = [4]float64{h * h * h * h / (q * q), 4 * h * h * h / (q * q * q), 12 * h * h * (1 - sg*u) / (q * q * q * q), 24 * h * (1 - sg*5*u + 2*u*u) / (q * q * q * q * q)}
	k = [4]float64{(1 + (1+6*xi)*u) / (q * q), 2 * xi * h * P / (q * q * q), 2 * xi * (P5 - sg*2*u*(1+6*xi)*(1+u)) / (q * q * q * q), 0}
	if abs {
		for i := range v {
			v[i], k[i] = math.Abs(v[i]), math.Abs(k[i])
		}
	}
	return v, k
}

// higgsChain applies the chain rule of TestHiggsPotential; with abs, every
// difference becomes a sum of magnitudes.
func higgsChain(v, k [4]float64, abs bool) [4]float64 {
	sg := 1.0
	if abs {
		sg = -1
	}
	sk := math.Sqrt(k[0])
	k2 := k[0] * k[0]
	return [4]float64{v[0], v[1] / sk, v[2]/k[0] - sg*v[1]*k[1]/(2*k2),
		(v[3]/k[0] - sg*1.5*v[2]*k[1]/k2 - sg*v[1]*k[2]/(2*k2) + v[1]*k[1]*k[1]/(k2*k[0])) / sk}
}

// TestHiggsPotential: the Higgs model's V(phi) and its phi-derivatives at
// phi = phi(h) (exact closed form) against the chain rule applied by hand
// to the Einstein-frame potential and kinetic function of Bezrukov &
// Shaposhnikov 2008 (arXiv:0710.3755), with D = K^(-1/2) d/dh (derived
// here):
//
//	V_phi = V_h/sqrt(K),  V_phiphi = V_hh/K - V_h K_h/(2K^2),
//	V_phiphiphi = K^(-1/2) (V_hhh/K - (3/2) V_hh K_h/K^2 - V_h K_hh/(2K^2) + V_h K_h^2/K^3).
//
// The map's x(phi) is accurate to about 1e-15 relative and V varies like
// h^4, so the tolerance is relative 1e-12.
func TestHiggsPotential(t *testing.T) {
	for _, xi := range []float64{1e-3, 1, 1e2, 1e4, 1e8} {
		m := mustNew(t, "higgs", map[string]float64{"xi": xi})
		if m.Native == nil || !m.Native.Numerical() || m.Native.Name != "h" {
			t.Fatalf("xi=%g: native field %+v", xi, m.Native)
		}
		for _, uh := range []float64{0.01, 0.3, 1, 10, 300} { // xi h^2
			h := math.Sqrt(uh / xi)
			phi := higgsPhiExact(xi, h)
			if !(phi > m.Lo && phi < m.Hi) {
				continue
			}
			v, k := higgsNative(xi, h, false)
			want := higgsChain(v, k, false)
			// V'' and V''' pass through zero (V_hh at xi h^2 = 1): their
			// scale is the size of the terms that cancel there.
			va, ka := higgsNative(xi, h, true)
			scales := higgsChain(va, ka, true)
			got := jetOf(m, phi)
			for i := range got {
				if math.Abs(got[i]-want[i]) > 1e-12*scales[i] {
					t.Errorf("xi=%g h=%g: derivative %d = %.17g, want %.17g", xi, h, i, got[i], want[i])
				}
			}
			// The native potential and map agree with the closed forms.
			if x := m.Native.FromCanonical(phi); !within(x, h, 1e-13, 0) {
				t.Errorf("xi=%g: h(phi=%g) = %.17g, want %.17g", xi, phi, x, h)
			}
		}
	}
}

// TestHiggsRange: the search range is 0 < phi < phi(h_max) with
// (1 + 6 xi) h_max^2/8 = 600 (higgs.go), checked against the exact map,
// and the canonical potential vanishes at the origin.
func TestHiggsRange(t *testing.T) {
	for _, xi := range []float64{1e-4, 1, 1e4, 1e10} {
		m := mustNew(t, "higgs", map[string]float64{"xi": xi})
		hmax := math.Sqrt(4800 / (1 + 6*xi))
		if want := higgsPhiExact(xi, hmax); m.Lo != 0 || !within(m.Hi, want, 1e-13, 0) {
			t.Errorf("xi=%g: range (%g, %.17g), want (0, %.17g)", xi, m.Lo, m.Hi, want)
		}
		if v := m.At(0).V; v != 0 {
			t.Errorf("xi=%g: V(0) = %g", xi, v)
		}
	}
}
