package root

import (
	"bytes"
	"context"
	"database/sql"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

// checkingWriter counts the table rows written to it and, at each write,
// the result rows the ledger holds, through a connection of its own.
type checkingWriter struct {
	t      *testing.T
	db     *sql.DB
	buf    bytes.Buffer
	writes int
	ahead  int // writes at which more rows were printed than recorded
}

func (w *checkingWriter) Write(p []byte) (int, error) {
	w.buf.Write(p)
	w.writes++
	printed := strings.Count(w.buf.String(), "\n") - 1 // the header line
	var recorded int
	if err := w.db.QueryRow("SELECT count(*) FROM run_results").Scan(&recorded); err != nil {
		w.t.Errorf("count run_results: %v", err)
	}
	if printed > recorded {
		w.ahead++
		w.t.Errorf("%d result rows printed, %d recorded", printed, recorded)
	}
	return len(p), nil
}

// A result is printed only once it and its nodes are committed: at every
// write to stdout of a 3000-point scan (three chunks, written in batches
// from the writer goroutine), the ledger already holds at least the rows
// printed so far.
func TestResultsPrintedOnlyOnceCommitted(t *testing.T) {
	h := newHarness(t)
	study := "[[reheating]]\nhistory = \"instantaneous\"\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n[[model]]\nfamily = \"e-model\"\nalpha = {log = [0.01, 100], points = 3000}\n"
	cfg := h.write("scan.toml", study)
	h.mustRun("runs") // creates the ledger, so that the checker can open it
	db, err := sql.Open("sqlite3", "file:"+h.ledger+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	w := &checkingWriter{t: t, db: db}
	var errb bytes.Buffer
	env := &app.Env{
		Stdout: w, Stderr: &errb,
		Getenv: func(k string) string {
			if k == app.LedgerEnv {
				return h.ledger
			}
			return os.Getenv(k)
		},
		Now:    func() time.Time { return time.Date(2026, 12, 3, 5, 0, 0, 0, time.UTC) },
		Random: h.rng,
		CPUs:   2,
	}
	if code := Execute(context.Background(), env, []string{"run", cfg}); code != 0 {
		t.Fatalf("run: exit %d: %s", code, errb.String())
	}
	if w.writes < 3 {
		t.Errorf("%d writes to stdout: the scan's chunks were not printed as they were committed", w.writes)
	}
	if rows := strings.Count(w.buf.String(), "\n") - 1; rows != 3000 {
		t.Errorf("%d rows printed, want 3000", rows)
	}
}
