package root

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// BenchmarkAuthCost: what signing and authenticating cost on the 1e5-point
// scan. Each iteration runs the cold scan and one warm re-run twice, into
// fresh ledgers: once with the user's key (nodes and works carry HMAC
// codes, checked on reuse; seals are signed) and once without any key (no
// codes, unsigned seals), in alternating order. Target: within a few
// percent. Reports cold-auth/none and warm-auth/none, the ratios of the
// summed times.
func BenchmarkAuthCost(b *testing.B) {
	var cold, warm [2]time.Duration // [0] with the key, [1] without
	for i := 0; i < b.N; i++ {
		for j := 0; j < 2; j++ {
			k := (i + j) % 2
			b.StopTimer()
			h, p := scanHarness(b, scanPoints)
			h.noKey = k == 1
			b.StartTimer()
			start := time.Now()
			_, errs, code := h.run("run", p)
			cold[k] += time.Since(start)
			if code != 0 {
				b.Fatal(errs)
			}
			if h.noKey != strings.Contains(errs, "no signing key") {
				b.Fatalf("noKey %v, stderr %q", h.noKey, errs)
			}
			start = time.Now()
			if _, errs, code := h.run("run", p); code != 0 {
				b.Fatal(errs)
			}
			warm[k] += time.Since(start)
		}
	}
	n := float64(b.N)
	b.ReportMetric(cold[0].Seconds()/n, "cold-auth-s")
	b.ReportMetric(cold[1].Seconds()/n, "cold-none-s")
	b.ReportMetric(cold[0].Seconds()/cold[1].Seconds(), "cold-auth/none")
	b.ReportMetric(warm[0].Seconds()/n, "warm-auth-s")
	b.ReportMetric(warm[1].Seconds()/n, "warm-none-s")
	b.ReportMetric(warm[0].Seconds()/warm[1].Seconds(), "warm-auth/none")
}

// BenchmarkImport1e5: importing the signed archive of a 1e5-point scan
// (its ledger of 5e5 nodes, tables and figures) into a fresh ledger:
// signature, manifest, streamed hashes, the archive's results against its
// own ledger, every row and seal of that ledger, then the merge. Reports
// seconds per import and the archive's size.
func BenchmarkImport1e5(b *testing.B) {
	h, p := scanHarness(b, scanPoints)
	if _, errs, code := h.run("run", p); code != 0 {
		b.Fatal(errs)
	}
	arc := filepath.Join(h.dir, "release.tar.gz")
	if _, errs, code := h.run("export", "latest", "--out", arc); code != 0 {
		b.Fatal(errs)
	}
	fi, err := os.Stat(arc)
	if err != nil {
		b.Fatal(err)
	}
	own := h.ledger
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		h.ledger = filepath.Join(h.dir, "import-"+string(rune('a'+i%26))+".db")
		os.Remove(h.ledger)
		if _, errs, code := h.run("import", arc); code != 0 {
			b.Fatal(errs)
		}
	}
	b.StopTimer()
	h.ledger = own
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/import")
	b.ReportMetric(float64(fi.Size())/1e6, "archive-MB")
}
