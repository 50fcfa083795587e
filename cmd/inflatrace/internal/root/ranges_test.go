package root

import (
	"encoding/json"
	"math"
	"testing"
)

// The issue's failing commands, as a user types them. The T-model's
// first-order n_s and r at N* = 55 follow from its closed forms
// epsilon_V = 4/(3 alpha sinh^2 2x), eta_V = (16 - 8 cosh 2x)/(6 alpha sinh^2 2x),
// cosh 2x* = sqrt(1 + 4/(3 alpha)) + 4 N/(3 alpha) for n = 1 (Kallosh &
// Linde 2013, arXiv:1306.5220, sect. 2; the derivatives are elementary):
// at alpha = 1e-5, n_s = 0.963636 and r = 3.967e-8. Before the fix the
// first command printed n_s = -731, r = 16 with exit 0; the second exited 3
// in the canonical stage; the third failed with K(y = 6.9e+201) = 0.
func TestIssueCommandsOverAlpha(t *testing.T) {
	h := newHarness(t)
	closed := func(alpha, N float64) (float64, float64) {
		c := math.Sqrt(1+4/(3*alpha)) + 4*N/(3*alpha)
		sh2 := c*c - 1
		eps := 4 / (3 * alpha * sh2)
		eta := (16 - 8*c) / (6 * alpha * sh2)
		return 1 - 6*eps + 2*eta, 16 * eps
	}
	for _, c := range []struct {
		family, alpha string
		a             float64
	}{
		{"t-model", "0.00001", 1e-5},
		{"t-model", "0.1810768342443384", 0.1810768342443384},
		{"t-model", "0.000001", 1e-6},
		{"e-model", "0.001", 1e-3},
	} {
		var r map[string]any
		out := h.mustRun("predict", "--family", c.family, "--param", "alpha="+c.alpha, "--efolds", "55", "--json")
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatalf("%s alpha=%s: %v\n%s", c.family, c.alpha, err, out)
		}
		ns, rr := r["n_s"].(float64), r["r"].(float64)
		if c.family == "t-model" {
			wantNs, wantR := closed(c.a, 55)
			// 1e-9: the e-fold root and the closed form agree far below any
			// physical effect (TestAttractorsOverEveryAlpha measures it).
			if math.Abs(ns-wantNs) > 1e-9 || math.Abs(rr-wantR) > 1e-9*wantR {
				t.Errorf("t-model alpha=%s: n_s = %.10g, r = %.6g; closed form %.10g, %.6g", c.alpha, ns, rr, wantNs, wantR)
			}
		}
		// Both approach the attractor n_s = 1 - 2/N, r = 12 alpha/N^2 to
		// O(1/N^2) and O(sqrt(alpha)/N) (Kallosh, Linde & Roest 2013,
		// arXiv:1311.0472, eq. 2.5 from memory): 0.9636 at N = 55.
		if want := 12 * c.a / (55 * 55); math.Abs(ns-(1-2.0/55)) > 2e-3 || math.Abs(rr-want) > 0.1*want {
			t.Errorf("%s alpha=%s: n_s = %.6g, r = %.3g", c.family, c.alpha, ns, rr)
		}
	}
}
