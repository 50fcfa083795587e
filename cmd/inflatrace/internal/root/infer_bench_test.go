package root

import (
	"path/filepath"
	"testing"
	"time"
)

// BenchmarkInferWarm: re-running a finished study of inferences (the
// Starobinsky model and the E-model with alpha and T_reh free), every
// node reused. Target: under 0.2 s. Reports the cold run's time too.
func BenchmarkInferWarm(b *testing.B) {
	h := newHarness(&testing.T{})
	h.dir = b.TempDir()
	h.ledger = filepath.Join(h.dir, "l.db")
	p := h.write("inf.toml", inferStudy)
	start := time.Now()
	if _, errs, code := h.run("infer", p); code != 0 {
		b.Fatal(errs)
	}
	cold := time.Since(start)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, errs, code := h.run("infer", p); code != 0 {
			b.Fatal(errs)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "warm-s")
	b.ReportMetric(cold.Seconds(), "cold-s")
}
