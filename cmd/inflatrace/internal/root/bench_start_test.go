package root

import (
	"context"
	"crypto/rand"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"sync"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

// startPoints is the size of the scan whose start is measured: 1e7 points.
const startPoints = 10_000_000

// firstWrite records when a stream first receives what match accepts,
// and calls then (once).
type firstWrite struct {
	mu    sync.Mutex
	start time.Time
	at    time.Duration // 0: not yet
	match func([]byte) bool
	then  func()
	text  []byte // the first 4 kB written
}

func (w *firstWrite) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if len(w.text) < 4096 {
		w.text = append(w.text, p...)
	}
	if w.at == 0 && w.match(p) {
		w.at = time.Since(w.start)
		if w.then != nil {
			w.then()
		}
	}
	return len(p), nil
}

func (w *firstWrite) seen() time.Duration {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.at
}

// barCount finds the node count a progress bar frame shows.
var barCount = regexp.MustCompile(`nodes (\d+) /`)

// advanced reports whether p holds a bar frame with at least one node done.
func advanced(p []byte) bool {
	for _, m := range barCount.FindAllSubmatch(p, -1) {
		if n, err := strconv.Atoi(string(m[1])); err == nil && n > 0 {
			return true
		}
	}
	return false
}

// BenchmarkStart1e7: how long a cold first-order scan of 1e7 points (5e7
// nodes) takes, from the command line to its first committed chunk (the
// first results printed: results are printed only once committed) and to
// the first progress bar frame showing a node done (stderr taken for a
// terminal). The run is cancelled once the first chunk is printed. Target:
// both under 2 s on 2 cores. Reports seconds to each.
func BenchmarkStart1e7(b *testing.B) {
	dir := b.TempDir()
	cfg := filepath.Join(dir, "scan.toml")
	if err := os.WriteFile(cfg, []byte(scanConfig(startPoints)), 0o644); err != nil {
		b.Fatal(err)
	}
	var chunk, progress time.Duration
	progressSeen := 0
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		ledger := filepath.Join(dir, "l"+strconv.Itoa(i)+".db")
		ctx, cancel := context.WithCancel(context.Background())
		start := time.Now()
		out := &firstWrite{start: start, match: func(p []byte) bool { return len(p) > 0 }, then: cancel}
		errw := &firstWrite{start: start, match: advanced}
		env := &app.Env{
			Stdout: out, Stderr: errw,
			Getenv: func(k string) string {
				if k == app.LedgerEnv {
					return ledger
				}
				return os.Getenv(k)
			},
			Now: time.Now, Random: rand.Reader, CPUs: 2,
			StderrTerminal: true,
		}
		b.StartTimer()
		code := Execute(ctx, env, []string{"run", cfg})
		b.StopTimer()
		cancel()
		if out.seen() == 0 {
			b.Fatalf("the run ended (exit %d) before printing its first chunk:\n%s", code, errw.text)
		}
		chunk += out.seen()
		if p := errw.seen(); p > 0 {
			progress += p
			progressSeen++
		}
		os.Remove(ledger)
		os.Remove(ledger + "-wal")
		os.Remove(ledger + "-shm")
	}
	b.ReportMetric(chunk.Seconds()/float64(b.N), "s/first-chunk")
	if progressSeen > 0 {
		b.ReportMetric(progress.Seconds()/float64(progressSeen), "s/first-progress")
	} else {
		b.Log("no progress bar frame with a node done was shown before the first chunk")
	}
}
