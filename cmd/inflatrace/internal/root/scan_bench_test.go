package root

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

// scanConfig is a first-order scan over alpha of the E-model with
// instantaneous reheating and one comparison: five nodes a point.
func scanConfig(points int) string {
	return fmt.Sprintf("[[reheating]]\nhistory = \"instantaneous\"\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"e-model\"\nalpha = {log = [0.01, 100], points = %d}\n", points)
}

// BenchmarkScanCold: a cold 2000-point scan recorded in a new ledger,
// reporting points per second (the target is 1e5 points in 10 s on
// 2 cores, i.e. 10,000 points/s).
func BenchmarkScanCold(b *testing.B) {
	const points = 2000
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		h := newHarness(&testing.T{})
		dir := b.TempDir()
		h.dir, h.ledger = dir, filepath.Join(dir, "l.db")
		p := filepath.Join(dir, "scan.toml")
		os.WriteFile(p, []byte(scanConfig(points)), 0o644)
		b.StartTimer()
		if _, errs, code := h.run("run", p); code != 0 {
			b.Fatal(errs)
		}
	}
	b.ReportMetric(float64(b.N*points)/b.Elapsed().Seconds(), "points/s")
}

// BenchmarkScanWarm: re-running a finished 2000-point scan (the target is
// under 5% of the cold time).
func BenchmarkScanWarm(b *testing.B) {
	const points = 2000
	h := newHarness(&testing.T{})
	dir := b.TempDir()
	h.dir, h.ledger = dir, filepath.Join(dir, "l.db")
	p := filepath.Join(dir, "scan.toml")
	os.WriteFile(p, []byte(scanConfig(points)), 0o644)
	if _, errs, code := h.run("run", p); code != 0 {
		b.Fatal(errs)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, errs, code := h.run("run", p); code != 0 {
			b.Fatal(errs)
		}
	}
	b.ReportMetric(float64(b.N*points)/b.Elapsed().Seconds(), "points/s")
}
