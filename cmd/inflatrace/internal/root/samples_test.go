package root

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// A constraint given as samples drawn from a known Gaussian (n_s Gaussian,
// r half-normal) gives, through its kernel density estimate, nearly the
// Delta chi^2 of that Gaussian near its centre (common practice: a KDE
// converges to the sampled density; the bandwidth smooths it by a factor
// 1 + h^2 with h = n^(-1/6), Silverman 1986 eq. 4.14).
func TestSampleConstraintInAStudy(t *testing.T) {
	h := newHarness(t)
	rng := rand.New(rand.NewPCG(7, 11))
	var b strings.Builder
	b.WriteString("# n_s r, drawn from n_s ~ N(0.965, 0.004), r ~ |N(0, 0.02)|\n")
	const n = 3000
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "%.6f %.6f\n", 0.965+0.004*rng.NormFloat64(), math.Abs(0.02*rng.NormFloat64()))
	}
	h.write("chain.txt", b.String())
	h.write("chain-set.toml", "name = \"test-chain\"\ncitation = \"samples drawn in this test\"\n\n[samples]\nfile = \"chain.txt\"\n")
	study := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = [55, 60]\n\n[[constraint]]\nfile = \"chain-set.toml\"\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"starobinsky\"\n"
	res := decodeRun(t, h.mustRun("run", h.write("s.toml", study), "--json")).Results
	if len(res) != 4 {
		t.Fatalf("%d results, want 2 histories x 2 sets", len(res))
	}
	g := compare.Gaussian{MeanNs: 0.965, SigmaNs: 0.004, SigmaR: 0.02}
	smoothing := 1 + math.Pow(n, -1.0/3) // 1 + h^2
	for _, r := range res {
		if r["constraint"] != "test-chain" {
			continue
		}
		want := g.DeltaChi2(r["n_s"].(float64), r["r"].(float64)) / smoothing
		got := r["delta_chi2"].(float64)
		if math.Abs(got-want) > 0.15+0.1*want {
			t.Errorf("%s: KDE Delta chi^2 %.3f, Gaussian %.3f", r["label"], got, want)
		}
	}
	// A second run reuses the comparisons: the samples are in the key.
	again := decodeRun(t, h.mustRun("run", h.write("s.toml", study), "--json"))
	if again.Computed != 0 {
		t.Errorf("warm run computed %d nodes", again.Computed)
	}
	h.write("chain.txt", b.String()+"0.97 0.001\n")
	changed := decodeRun(t, h.mustRun("run", h.write("s.toml", study), "--json"))
	if changed.Computed != 2 {
		t.Errorf("one more sample recomputed %d nodes, want the 2 comparisons with that set", changed.Computed)
	}
}
