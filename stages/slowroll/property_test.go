package slowroll

import (
	"math"
	"testing"
)

// A spread of models for the property tests: every family, plateau and
// large-field, field growing and shrinking during inflation.
var propertyModels = []struct {
	family string
	params map[string]float64
}{
	{"t-model", map[string]float64{"alpha": 1.0 / 3}},
	{"t-model", map[string]float64{"alpha": 7.0 / 3, "n": 2}},
	{"e-model", map[string]float64{"alpha": 1}},
	{"e-model", map[string]float64{"alpha": 1e-2}},
	{"starobinsky", nil},
	{"power-law", map[string]float64{"p": 2.0 / 3}},
	{"power-law", map[string]float64{"p": 4}},
	{"natural", map[string]float64{"f": 7}},
	{"hilltop", map[string]float64{"mu": 10}},
	{"hilltop", map[string]float64{"mu": 15, "p": 4}},
}

// TestEfoldRoundTrip: N(PhiAt(N)) = N (property; the root is solved to
// |N(phi) - N| <= 1e-12 max(1, N), the quadrature to 1e-12 relative), and
// PhiAt moves monotonically back along the roll as N grows.
func TestEfoldRoundTrip(t *testing.T) {
	for _, pm := range propertyModels {
		sol := mustSolve(t, pm.family, pm.params)
		prev := sol.End.Phi
		for _, N := range []float64{0, 0.01, 0.5, 5, 50, 60, 200} {
			phi, err := sol.PhiAt(N)
			if err != nil {
				t.Errorf("%s: PhiAt(%g): %v", sol.Model.Describe(), N, err)
				continue
			}
			back, err := sol.Efolds(phi)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(back-N) > 1e-10*math.Max(1, N) {
				t.Errorf("%s: N(PhiAt(%g)) = %.15g", sol.Model.Describe(), N, back)
			}
			if N > 0 && !((phi-prev)*sol.End.Direction < 0) {
				t.Errorf("%s: PhiAt(%g) = %g is not further back than %g (direction %g)", sol.Model.Describe(), N, phi, prev, sol.End.Direction)
			}
			prev = phi
		}
		if e, _ := sol.Efolds(sol.End.Phi); e != 0 {
			t.Errorf("%s: N(phi_end) = %g, want 0", sol.Model.Describe(), e)
		}
	}
}

// TestEndIsEpsilonOne: at the returned end epsilon_V = 1 to the root
// finder's tolerance, and the field rolls downhill (Direction = -sign V').
func TestEndIsEpsilonOne(t *testing.T) {
	for _, pm := range propertyModels {
		sol := mustSolve(t, pm.family, pm.params)
		p := At(sol.Model, sol.End.Phi)
		if math.Abs(p.Epsilon-1) > 1e-12 {
			t.Errorf("%s: epsilon_V at the end = %.15g", sol.Model.Describe(), p.Epsilon)
		}
		if slope := sol.Model.At(sol.End.Phi).D1; sol.End.Direction != -math.Copysign(1, slope) {
			t.Errorf("%s: direction %g with V' = %g", sol.Model.Describe(), sol.End.Direction, slope)
		}
		if sol.End.V != p.V {
			t.Errorf("%s: End.V = %g, V(phi_end) = %g", sol.Model.Describe(), sol.End.V, p.V)
		}
	}
}

// TestRunningIsMinusDnsDN: with dphi/dN = V'/V, differentiating the
// first-order n_s = 1 - 6 epsilon_V + 2 eta_V along N gives exactly
// -(16 epsilon_V eta_V - 24 epsilon_V^2 - 2 xi^2_V) (derived here), the
// first-order running of Kosowsky & Turner 1995 (astro-ph/9504071, eq. 9)
// with d ln k = -dN. Checked against a fourth-order central difference in N
// with step 0.25 (truncation ~1e-12, rounding ~1e-11 absolute); tolerance
// 1e-6 relative plus 1e-11 absolute.
func TestRunningIsMinusDnsDN(t *testing.T) {
	for _, pm := range propertyModels {
		sol := mustSolve(t, pm.family, pm.params)
		for _, N := range []float64{30, 55} {
			ns := func(n float64) float64 { _, o := mustEvaluate(t, sol, n); return o.Ns }
			h := 0.25
			d := (ns(N-2*h) - 8*ns(N-h) + 8*ns(N+h) - ns(N+2*h)) / (12 * h)
			_, o := mustEvaluate(t, sol, N)
			if !within(o.AlphaS, -d, 1e-6, 1e-11) {
				t.Errorf("%s N=%g: alpha_s = %.10g, -dn_s/dN = %.10g", sol.Model.Describe(), N, o.AlphaS, -d)
			}
		}
	}
}

// TestConsistencyRelation: at first order n_t = -2 epsilon_V = -r/8 (Liddle
// & Lyth 2000, ch. 7) for every model and N.
func TestConsistencyRelation(t *testing.T) {
	for _, pm := range propertyModels {
		sol := mustSolve(t, pm.family, pm.params)
		for _, N := range []float64{10, 55} {
			p, o := mustEvaluate(t, sol, N)
			if !within(o.Nt, -o.R/8, 1e-15, 0) || !within(o.R, 16*p.Epsilon, 1e-15, 0) {
				t.Errorf("%s N=%g: n_t = %g, r = %g, epsilon = %g", sol.Model.Describe(), N, o.Nt, o.R, p.Epsilon)
			}
		}
	}
}

// TestDeterminism: the same inputs give identical bits (slowroll package
// doc: every step is deterministic).
func TestDeterminism(t *testing.T) {
	for _, pm := range propertyModels {
		run := func() [7]uint64 {
			sol := mustSolve(t, pm.family, pm.params)
			p, o := mustEvaluate(t, sol, 55)
			var b [7]uint64
			for i, v := range []float64{sol.End.Phi, p.Phi, p.Epsilon, o.Ns, o.R, o.AlphaS, o.Nt} {
				b[i] = math.Float64bits(v)
			}
			return b
		}
		if a, b := run(), run(); a != b {
			t.Errorf("%s: two runs differ: %v vs %v", pm.family, a, b)
		}
	}
}

// TestScanPointsDoNotMatter: the end of inflation is a root, not a scan
// value, so the scan density changes nothing beyond the root tolerance.
func TestScanPointsDoNotMatter(t *testing.T) {
	for _, pm := range propertyModels {
		m := mustModel(t, pm.family, pm.params)
		a, err := FindEnd(m, nil)
		if err != nil {
			t.Fatal(err)
		}
		b, err := FindEnd(m, &Settings{ScanPoints: 400})
		if err != nil {
			t.Fatal(err)
		}
		if !within(a.Phi, b.Phi, 1e-13, 1e-15) || a.Direction != b.Direction {
			t.Errorf("%s: end %.17g (96 points) vs %.17g (400 points)", m.Describe(), a.Phi, b.Phi)
		}
	}
}
