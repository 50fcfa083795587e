package root

import (
	"database/sql"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

const studyA = `[[reheating]]
history = "temperature"
w_reh = 0
T_reh_GeV = 1e9

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "starobinsky"

[[model]]
family = "e-model"
alpha = ["1/3", "7/3"]
`

func (h *harness) write(name, text string) string {
	h.t.Helper()
	p := filepath.Join(h.dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		h.t.Fatal(err)
	}
	return p
}

func (h *harness) mustRun(args ...string) string {
	h.t.Helper()
	out, errs, code := h.run(args...)
	if code != 0 {
		h.t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	return out
}

// Two runs differing in exactly T_reh and one constraint set: diff names
// exactly those two assumptions, and for every paired quantity the
// contributions plus the remainder give the total (the Shapley
// decomposition is efficient: Shapley 1953), within 1e-12.
func TestDiffAttribution(t *testing.T) {
	h := newHarness(t)
	a := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	studyB := strings.NewReplacer("T_reh_GeV = 1e9", "T_reh_GeV = 1e12", "cmb-combined-2025", "planck2018-bk18").Replace(studyA)
	b := decodeRun(t, h.mustRun("run", h.write("b.toml", studyB), "--json"))
	runsBefore := h.mustRun("runs", "--json")
	out := h.mustRun("diff", a.Run, b.Run, "--json")
	var rep struct {
		Assumptions []struct{ Kind, What string } `json:"assumptions"`
		Pairs       []struct {
			Changes map[string]struct {
				A, B, Total, Remainder float64
				Contributions          []float64
			} `json:"changes"`
		} `json:"pairs"`
		Evaluated int `json:"configurations_evaluated"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Assumptions) != 2 || !strings.HasPrefix(rep.Assumptions[0].What, "constraint[0].use") || !strings.HasPrefix(rep.Assumptions[1].What, "reheating[0].T_reh_GeV") {
		t.Fatalf("assumptions %+v, want exactly constraint[0].use and reheating[0].T_reh_GeV", rep.Assumptions)
	}
	if len(rep.Pairs) != 3 || rep.Evaluated != 4 {
		t.Fatalf("%d pairs, %d configurations; want 3 and 4", len(rep.Pairs), rep.Evaluated)
	}
	for _, p := range rep.Pairs {
		for q, c := range p.Changes {
			sum := c.Remainder
			for _, x := range c.Contributions {
				sum += x
			}
			if math.Abs(sum-c.Total) > 1e-12 || math.Abs(c.Total-(c.B-c.A)) > 1e-12 {
				t.Errorf("%s: contributions %v + remainder %g != total %g", q, c.Contributions, c.Remainder, c.Total)
			}
			if math.Abs(c.Remainder) > 1e-12 {
				t.Errorf("%s: remainder %g with every assumption re-evaluable", q, c.Remainder)
			}
		}
		// The constraint set cannot move N*, n_s or r; T_reh moves N*.
		if c := p.Changes["N_star"]; c.Contributions[0] != 0 || math.Abs(c.Contributions[1]-c.Total) > 1e-12 || c.Total < 2 {
			t.Errorf("N* change %+v: all of it must come from T_reh", c)
		}
		if c := p.Changes["delta_chi2"]; c.Contributions[0] == 0 || c.Contributions[1] == 0 {
			t.Errorf("delta chi^2 change %+v: both assumptions move it", c)
		}
	}
	if h.mustRun("runs", "--json") != runsBefore {
		t.Error("diff recorded runs for its intermediate configurations")
	}
}

func TestVerifyTagTraceExportImport(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	h.mustRun("tag", r.Run, "paper-v1")
	// verify of an unchanged run reports all identical.
	out := h.mustRun("verify", "paper-v1", "--json")
	var v struct {
		Counts map[string]int `json:"counts"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if v.Counts["identical"] != r.Computed || v.Counts["different"] != 0 {
		t.Fatalf("verify counts %v, want %d identical", v.Counts, r.Computed)
	}
	// trace RUN#1 lists the five stages, upstream first.
	out = h.mustRun("trace", "paper-v1#1", "--json")
	var tr struct {
		Lineage []struct{ Stage, Key, OutputHash string } `json:"lineage"`
	}
	if err := json.Unmarshal([]byte(out), &tr); err != nil {
		t.Fatal(err)
	}
	var stages []string
	for _, n := range tr.Lineage {
		stages = append(stages, n.Stage)
	}
	if strings.Join(stages, ",") != "model,canonical,slowroll,reheat,compare" {
		t.Errorf("lineage stages %v", stages)
	}
	// export, then import into an empty ledger: every hash is reproduced.
	arc := filepath.Join(h.dir, "release.tar.gz")
	h.mustRun("export", "paper-v1", "--out", arc)
	other := filepath.Join(h.dir, "other.db")
	h.mustRun("--ledger", other, "import", arc)
	h.mustRun("--ledger", other, "import", arc) // idempotent
	orig := h.mustRun("show", "paper-v1", "--json")
	imported := h.mustRun("--ledger", other, "show", "paper-v1", "--json")
	if orig != imported {
		t.Error("show of the imported run differs from the original")
	}
	// a tampered archive is refused.
	dir := filepath.Join(h.dir, "release")
	h.mustRun("export", "paper-v1", "--out", dir)
	res := filepath.Join(dir, "results.json")
	data, _ := os.ReadFile(res)
	os.WriteFile(res, []byte(strings.Replace(string(data), "0.96", "0.97", 1)), 0o644)
	_, errs, code := h.run("--ledger", filepath.Join(h.dir, "third.db"), "import", dir)
	if code != app.ExitRunFailed || !strings.Contains(errs, "results.json: expected sha256:") {
		t.Errorf("tampered archive: exit %d, %s", code, errs)
	}
	// editing one outputs row by hand is detected by verify --all.
	db, err := sql.Open("sqlite3", "file:"+h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec("UPDATE nodes SET outputs = replace(outputs, 'n_s f 0.9', 'n_s f 0.8') WHERE id = (SELECT min(id) FROM nodes WHERE stage = 'reheat')"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	out, errs, code = h.run("verify", "--all")
	if code != app.ExitRunFailed || !strings.Contains(out, "nodes\tsha256:") || !strings.Contains(errs, "1 row(s) no longer match") {
		t.Errorf("hand edit not detected: exit %d\n%s\n%s", code, out, errs)
	}
}
