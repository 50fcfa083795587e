package root

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

// diffPoints is the size of the diff target: a 1e4-point study.
const diffPoints = 10000

// BenchmarkDiff1e4FourFields: diff of a recorded 1e4-point first-order
// e-model scan against its revision with four fields changed (w_reh,
// T_reh, the method and A_s), so that the attribution evaluates 2^4 = 16
// configurations, 14 of them new, through the cached DAG. Target: under
// a minute on 2 cores. Reports seconds per diff and configurations
// evaluated per second.
func BenchmarkDiff1e4FourFields(b *testing.B) {
	h := newHarness(&testing.T{})
	dir := b.TempDir()
	h.dir, h.ledger = dir, filepath.Join(dir, "l.db")
	p := filepath.Join(dir, "scan.toml")
	text := fmt.Sprintf("[slow_roll]\nmethod = \"first\"\n\n[normalisation]\nA_s = 2.1e-9\n\n[[reheating]]\nhistory = \"temperature\"\nw_reh = 0\nT_reh_GeV = 1e9\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"e-model\"\nalpha = {log = [0.01, 100], points = %d}\n", diffPoints)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		b.Fatal(err)
	}
	for _, args := range [][]string{
		{"run", p},
		{"tag", "latest", "v1"},
		{"run", "--from", "v1", "--set", `reheating[0].w_reh="1/3"`, "--set", "reheating[0].T_reh_GeV=1e12", "--set", "slow_roll.method=second", "--set", "normalisation.A_s=2.2e-9"},
	} {
		if _, errs, code := h.run(args...); code != 0 {
			b.Fatalf("%v: %s", args, errs)
		}
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, errs, code := h.run("diff", "v1", "latest", "--format", "csv"); code != 0 {
			b.Fatal(errs)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/diff")
	b.ReportMetric(16*float64(b.N)/b.Elapsed().Seconds(), "configs/s")
}
