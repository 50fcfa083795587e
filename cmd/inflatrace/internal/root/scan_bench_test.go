package root

import (
	"database/sql"
	"fmt"
	"os"
	"path/filepath"
	"runtime/debug"
	"syscall"
	"testing"
	"time"
)

// scanPoints is the size of the target scan: 1e5 points.
const scanPoints = 100000

// scanConfig is a first-order scan over alpha of the E-model with
// instantaneous reheating and one comparison: five nodes a point.
func scanConfig(points int) string {
	return fmt.Sprintf("[[reheating]]\nhistory = \"instantaneous\"\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"e-model\"\nalpha = {log = [0.01, 100], points = %d}\n", points)
}

// scanHarness is a harness with a fresh ledger and the scan's study file.
func scanHarness(b *testing.B, points int) (*harness, string) {
	h := newHarness(&testing.T{})
	dir := b.TempDir()
	h.dir, h.ledger = dir, filepath.Join(dir, "l.db")
	p := filepath.Join(dir, "scan.toml")
	if err := os.WriteFile(p, []byte(scanConfig(points)), 0o644); err != nil {
		b.Fatal(err)
	}
	return h, p
}

// BenchmarkScanCold: a cold 1e5-point scan (5e5 nodes) evaluated and
// recorded in a new ledger on two workers. Targets: under 10 s on 2
// cores, under 300 bytes of ledger per node. Reports seconds per scan,
// points per second and bytes per node.
func BenchmarkScanCold(b *testing.B) {
	coldScans(b, scanPoints, false)
	b.ReportMetric(float64(b.N*scanPoints)/b.Elapsed().Seconds(), "points/s")
}

// coldScans runs b.N cold scans of points points, each in a new ledger,
// timing the runs alone, and reports seconds per scan and the bytes on
// disk per node of the last scan's ledger (5 nodes a point). With toFile,
// the table printed goes to a file, as from a shell.
func coldScans(b *testing.B, points int, toFile bool) {
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		h, p := scanHarness(b, points)
		lastLedger = h.ledger
		if toFile {
			f, err := os.Create(filepath.Join(h.dir, "out.txt"))
			if err != nil {
				b.Fatal(err)
			}
			defer f.Close()
			h.stdout = f
		}
		b.StartTimer()
		if _, errs, code := h.run("run", p); code != 0 {
			b.Fatal(errs)
		}
	}
	b.StopTimer()
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/scan")
	b.ReportMetric(float64(ledgerBytes(b, lastLedger))/float64(5*points), "bytes/node")
}

// lastLedger is the ledger of the last cold scan.
var lastLedger string

// ledgerBytes is the ledger's size once its WAL is checkpointed into it.
func ledgerBytes(b testing.TB, path string) int64 {
	db, err := sql.Open("sqlite3", path)
	if err != nil {
		b.Fatal(err)
	}
	defer db.Close()
	if _, err := db.Exec("PRAGMA wal_checkpoint(TRUNCATE)"); err != nil {
		b.Fatal(err)
	}
	var n, size int64
	if err := db.QueryRow("PRAGMA page_count").Scan(&n); err != nil {
		b.Fatal(err)
	}
	if err := db.QueryRow("PRAGMA page_size").Scan(&size); err != nil {
		b.Fatal(err)
	}
	return n * size
}

// BenchmarkScanWarm: re-running a finished 1e5-point scan, every node
// reused. Targets: under 5% of the cold time, which it measures once
// before the timed re-runs and reports as warm/cold, and under 1 MB of
// ledger growth per re-run (growth-bytes/run).
func BenchmarkScanWarm(b *testing.B) {
	h, p := scanHarness(b, scanPoints)
	start := time.Now()
	if _, errs, code := h.run("run", p); code != 0 {
		b.Fatal(errs)
	}
	cold := time.Since(start)
	size := ledgerBytes(b, h.ledger)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, errs, code := h.run("run", p); code != 0 {
			b.Fatal(errs)
		}
	}
	warm := b.Elapsed() / time.Duration(b.N)
	b.StopTimer()
	b.ReportMetric(float64(ledgerBytes(b, h.ledger)-size)/float64(b.N), "growth-bytes/run")
	b.ReportMetric(warm.Seconds(), "s/scan")
	b.ReportMetric(cold.Seconds(), "cold-s")
	b.ReportMetric(warm.Seconds()/cold.Seconds(), "warm/cold")
}

// BenchmarkPlot1e5: the figures of a recorded 1e5-point scan (the scan of
// BenchmarkScanCold), drawn from the ledger as PNG. Target: under 3 s on
// 2 cores. Reports seconds per plot.
func BenchmarkPlot1e5(b *testing.B) {
	h, p := scanHarness(b, scanPoints)
	if _, errs, code := h.run("run", p); code != 0 {
		b.Fatal(errs)
	}
	out := filepath.Join(h.dir, "figs")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, errs, code := h.run("plot", "latest", "--out", out, "--format", "png"); code != 0 {
			b.Fatal(errs)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/plot")
}

// BenchmarkExactScanJobs: a cold exact-method scan (the Mukhanov–Sasaki
// modes, milliseconds a point) run with -j 1 and with -j 2 into fresh
// ledgers, once each per iteration. Target: j2/j1 speed-up above 1.7 on
// 2 cores (the numerics dominate; the writer must not serialise them).
// 240 points: about a second with one job, so that opening a new ledger
// (its migrations) is not what is measured.
func BenchmarkExactScanJobs(b *testing.B) {
	const points = 240
	text := fmt.Sprintf("[slow_roll]\nmethod = \"exact\"\n\n[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"e-model\"\nalpha = {log = [0.1, 10], points = %d}\n", points)
	var t1, t2 time.Duration
	for i := 0; i < b.N; i++ {
		for _, j := range []string{"1", "2"} {
			b.StopTimer()
			h := newHarness(&testing.T{})
			dir := b.TempDir()
			h.dir, h.ledger = dir, filepath.Join(dir, "l.db")
			p := filepath.Join(dir, "exact.toml")
			if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
				b.Fatal(err)
			}
			b.StartTimer()
			start := time.Now()
			if _, errs, code := h.run("run", p, "-j", j); code != 0 {
				b.Fatal(errs)
			}
			if j == "1" {
				t1 += time.Since(start)
			} else {
				t2 += time.Since(start)
			}
		}
	}
	b.ReportMetric(t1.Seconds()/float64(b.N), "j1-s")
	b.ReportMetric(t2.Seconds()/float64(b.N), "j2-s")
	b.ReportMetric(t1.Seconds()/t2.Seconds(), "j2/j1-speedup")
}

// BenchmarkScanCold1e6: a cold 1e6-point scan (5e6 nodes) in a new
// ledger. Targets: under 100 s on 2 cores and under 500 MB resident.
// Reports seconds per scan, bytes per node and the process's peak
// resident memory (getrusage; the benchmark harness included). The table
// goes to a file, as the command's would from a shell.
func BenchmarkScanCold1e6(b *testing.B) {
	const points = 1000000
	// The command's Go heap limit (cmd/inflatrace/main.go, memoryLimit).
	defer debug.SetMemoryLimit(debug.SetMemoryLimit(320 << 20))
	coldScans(b, points, true)
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err == nil {
		b.ReportMetric(float64(ru.Maxrss)/1024, "peak-RSS-MB") // Linux: kilobytes
	}
}
