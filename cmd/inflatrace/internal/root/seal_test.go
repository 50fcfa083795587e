package root

import (
	"database/sql"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Every finished run is sealed, and the edits the trust issue quotes —
// an ok node's link turned failed, a result row or node link edited, a
// run's configuration edited together with its hash — are each reported
// by verify --all and verify RUN (exit 3), where before seals they passed;
// an untouched ledger verifies clean, and merging a ledger whose rows were
// edited after sealing is refused.
func TestSealsCatchEditsOfRunRows(t *testing.T) {
	edits := []struct {
		name string
		sql  []string
	}{
		// A run is recorded as works (ledger migration 0011): its node
		// links and results are a work row's columns.
		{"node link turned failed", []string{"UPDATE works SET actions = substr(actions, 1, length(actions) - 1) || 'f', errors = '{\"n0\":\"edited\"}'"}},
		{"result dropped", []string{"UPDATE works SET results = json_remove(results, '$[0]')"}},
		{"result relabelled", []string{"UPDATE works SET results = json_set(results, '$[1][1]', 'edited')"}},
		{"work digest", []string{"UPDATE works SET digest = zeroblob(32)"}},
		{"configuration and its hash", []string{"UPDATE runs SET config_text = config_text || '# edited', config_hash = 'x'"}},
		{"status", []string{"UPDATE runs SET error = 'was fine'"}},
	}
	for _, e := range edits {
		t.Run(e.name, func(t *testing.T) {
			h := newHarness(t)
			h.mustRun("run", h.write("a.toml", studyA))
			h.mustRun("verify", "--all")
			h.mustRun("verify", "latest")
			db, err := sql.Open("sqlite3", h.ledger)
			if err != nil {
				t.Fatal(err)
			}
			for _, q := range e.sql {
				if strings.Contains(q, "config_hash = 'x'") {
					// A consistent edit: the configuration hash recomputed.
					var text string
					db.QueryRow("SELECT config_text FROM runs").Scan(&text)
					q = "UPDATE runs SET config_text = ?, config_hash = ?"
					if _, err := db.Exec(q, text+"# edited", pipeline.Sum([]byte(text+"# edited"))); err != nil {
						t.Fatal(err)
					}
					continue
				}
				if _, err := db.Exec(q); err != nil {
					t.Fatal(err)
				}
			}
			db.Close()
			_, errs, code := h.run("verify", "--all")
			if code != app.ExitRunFailed || !strings.Contains(errs, "edited") {
				t.Errorf("verify --all after %s: exit %d, %q; want 3 naming the sealed run", e.name, code, errs)
			}
		})
	}
}

// A ledger whose run rows were edited after sealing is refused by merge,
// and verify RUN reports the broken seal (exit 3).
func TestSealRefusesEditedMergeAndVerifyRun(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", h.write("a.toml", studyA))
	db, err := sql.Open("sqlite3", h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("UPDATE works SET results = json_set(results, '$[0][1]', 'edited')"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	if _, errs, code := h.run("verify", "latest"); code != app.ExitRunFailed || !strings.Contains(errs, "seal broken") {
		t.Errorf("verify RUN after an edit: exit %d, %q", code, errs)
	}
	other := h.dir + "/other.db"
	_, errs, code := h.run("--ledger", other, "merge", h.ledger)
	if code == 0 || !strings.Contains(errs, "edited") {
		t.Errorf("merge of an edited ledger: exit %d, %q; want a refusal", code, errs)
	}
}

// runs --close-stale closes a run left running by a process on another
// host once its heartbeat is older than --stale-after, and keeps one that
// beat recently.
func TestRunsCloseStale(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", h.write("a.toml", studyA))
	db, err := sql.Open("sqlite3", h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	for id, beat := range map[string]string{"20261201T000000Z-aaaaaa": "2026-12-01T00:00:00Z", "20261202T045959Z-bbbbbb": "2026-12-02T04:59:59Z"} {
		if _, err := db.Exec(`INSERT INTO runs (id, started_at, tool_version, config_path, config_text, config_hash, status, owner, heartbeat_at)
			SELECT ?, ?, tool_version, config_path, config_text, config_hash, 'running', 'far-away-host:42', ? FROM runs LIMIT 1`, id, beat, beat); err != nil {
			t.Fatal(err)
		}
	}
	db.Close()
	_, errs, code := h.run("runs", "--close-stale")
	if code != 0 || !strings.Contains(errs, "closed run 20261201T000000Z-aaaaaa") || strings.Contains(errs, "bbbbbb") {
		t.Errorf("runs --close-stale: exit %d, %q; want the day-old run closed and the recent one kept", code, errs)
	}
	if _, errs, code := h.run("runs", "--close-stale", "--stale-after", "0s"); code != 2 || !strings.Contains(errs, "--stale-after") {
		t.Errorf("--stale-after 0s: exit %d, %q", code, errs)
	}
}
