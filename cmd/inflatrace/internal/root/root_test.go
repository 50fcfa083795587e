package root

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"math/rand"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

// harness runs the command line in-process against a ledger in a
// temporary directory, with a fixed clock and seeded randomness.
type harness struct {
	t      *testing.T
	dir    string
	ledger string
	tick   atomic.Int64
	rng    *rand.Rand
	// noKey: the signing key cannot be made (its folder is a file), so
	// the command runs without authentication codes and signed seals, as
	// it does, with a warning, for a user without a writable home.
	noKey bool
	// stdout, when set, receives the command's output instead of the
	// returned string (a large scan's table goes to a file, as from a
	// shell, rather than into the test's memory).
	stdout io.Writer
}

func newHarness(t *testing.T) *harness {
	dir := t.TempDir()
	return &harness{t: t, dir: dir, ledger: filepath.Join(dir, "ledger.db"), rng: rand.New(rand.NewSource(1))}
}

func (h *harness) run(args ...string) (stdout, stderr string, code int) {
	h.t.Helper()
	var out, errb bytes.Buffer
	var w io.Writer = &out
	if h.stdout != nil {
		w = h.stdout
	}
	env := &app.Env{
		Stdout: w, Stderr: &errb,
		Getenv: func(k string) string {
			if k == app.LedgerEnv {
				return h.ledger
			}
			if k == app.KeyEnv && h.noKey {
				block := filepath.Join(h.dir, "nokey")
				if err := os.WriteFile(block, nil, 0o600); err != nil {
					h.t.Fatal(err)
				}
				return filepath.Join(block, "key")
			}
			if k == "XDG_CONFIG_HOME" {
				// Keys live in the test's folder, never the user's.
				return filepath.Join(h.dir, "config")
			}
			return os.Getenv(k)
		},
		Now: func() time.Time {
			return time.Date(2026, 12, 2, 5, 0, 0, 0, time.UTC).Add(time.Duration(h.tick.Add(1)) * time.Millisecond)
		},
		Random: h.rng,
		CPUs:   2,
	}
	code = Execute(context.Background(), env, args)
	return out.String(), errb.String(), code
}

func demoPath(t *testing.T) string {
	p, err := filepath.Abs("../../../../configs/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

type runJSON struct {
	Run      string           `json:"run"`
	Status   string           `json:"status"`
	Computed int              `json:"computed"`
	Reused   int              `json:"reused"`
	Failed   int              `json:"failed"`
	Results  []map[string]any `json:"results"`
}

func decodeRun(t *testing.T, s string) runJSON {
	t.Helper()
	var r runJSON
	if err := json.Unmarshal([]byte(s), &r); err != nil {
		t.Fatalf("run --json output is not one JSON object: %v\n%s", err, s)
	}
	return r
}

// The documented JSON names of a result (issue "Interface details").
var resultFields = []string{"model", "params", "N_star", "phi_star", "phi_end", "n_s", "r", "alpha_s", "n_t",
	"energy_scale_GeV", "H_star_GeV", "constraint", "delta_chi2", "n_sigma"}

func TestDemoColdWarmAndOneChange(t *testing.T) {
	h := newHarness(t)
	out, errs, code := h.run("run", demoPath(t), "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	cold := decodeRun(t, out)
	// 7 E-models + 7 T-models + Starobinsky + phi^2, each at N* = 50, 55,
	// 60 and instantaneous, against one constraint.
	if len(cold.Results) != 16*4 {
		t.Fatalf("%d results, want 64", len(cold.Results))
	}
	for _, f := range resultFields {
		if _, ok := cold.Results[0][f]; !ok {
			t.Errorf("result lacks %q", f)
		}
	}
	if cold.Computed == 0 || cold.Failed != 0 {
		t.Fatalf("cold run computed %d failed %d", cold.Computed, cold.Failed)
	}

	out, _, code = h.run("run", demoPath(t), "--json")
	warm := decodeRun(t, out)
	if code != 0 || warm.Computed != 0 || warm.Reused != cold.Computed+cold.Reused {
		t.Fatalf("warm run: exit %d computed %d reused %d", code, warm.Computed, warm.Reused)
	}
	for i := range cold.Results {
		if cold.Results[i]["n_s"] != warm.Results[i]["n_s"] || cold.Results[i]["key"] != warm.Results[i]["key"] {
			t.Fatalf("result %d differs between cold and warm runs", i)
		}
	}

	// Change one reheating input (g_reh of the instantaneous history):
	// exactly the 16 instantaneous reheat nodes and their 16 comparisons
	// are computed again.
	demo, _ := os.ReadFile(demoPath(t))
	changed := strings.Replace(string(demo), "g_reh = 106.75", "g_reh = 100", 1)
	if changed == string(demo) {
		t.Fatal("test setup: g_reh line not found in the demo")
	}
	alt := filepath.Join(h.dir, "changed.toml")
	if err := os.WriteFile(alt, []byte(changed), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code = h.run("run", alt, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	ch := decodeRun(t, out)
	// Starobinsky and the E-model with alpha = n = 1 are one potential;
	// their predictions carry the model's specification, so their
	// comparisons keep distinct keys and lineages.
	compareKeys := map[any]bool{}
	for _, r := range ch.Results {
		if r["reheating"] == "instantaneous" {
			compareKeys[r["key"]] = true
		}
	}
	if len(compareKeys) != 16 || ch.Computed != 16+len(compareKeys) {
		t.Fatalf("changing g_reh computed %d nodes, want 16 reheat + %d distinct compare nodes (16 expected)", ch.Computed, len(compareKeys))
	}
	out, _, _ = h.run("show", ch.Run, "--json")
	var shown struct {
		Nodes []struct {
			Stage  string         `json:"stage"`
			Action string         `json:"action"`
			Params map[string]any `json:"params"`
		} `json:"nodes"`
	}
	if err := json.Unmarshal([]byte(out), &shown); err != nil {
		t.Fatal(err)
	}
	for _, n := range shown.Nodes {
		if n.Action != "computed" {
			continue
		}
		if n.Stage == "reheat" && n.Params["history"] == "instantaneous" || n.Stage == "compare" {
			continue
		}
		t.Errorf("changing g_reh recomputed a %s node %v", n.Stage, n.Params)
	}
	for i, r := range ch.Results {
		fixed := r["reheating"] == "fixed-efolds"
		same := r["n_s"] == cold.Results[i]["n_s"]
		if fixed != same {
			t.Errorf("result %d (%s): fixed-N* results must be unchanged and instantaneous ones changed", i, r["label"])
		}
	}
}

func TestPredictMatchesRunAndIsRecorded(t *testing.T) {
	h := newHarness(t)
	out, errs, code := h.run("predict", "--family", "e-model", "--param", "alpha=1", "--efolds", "55", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r map[string]any
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("predict --json is not one object: %v", err)
	}
	for _, f := range resultFields {
		if _, ok := r[f]; !ok {
			t.Errorf("predict result lacks %q", f)
		}
	}
	// First-order slow roll for the Starobinsky-equivalent E-model at
	// N = 55: n_s = 0.96498, r = 0.00350 (published-values.md B2, computed).
	if ns := r["n_s"].(float64); ns < 0.964975 || ns > 0.964985 {
		t.Errorf("n_s = %v, want 0.96498", ns)
	}
	out, _, _ = h.run("run", demoPath(t), "--json")
	demo := decodeRun(t, out)
	found := false
	for _, d := range demo.Results {
		if d["model"] == "e-model" && d["N_star"] == 55.0 && d["params"].(map[string]any)["alpha"] == 1.0 {
			found = true
			if d["n_s"] != r["n_s"] || d["key"] != r["key"] {
				t.Errorf("demo result %v differs from predict %v", d["n_s"], r["n_s"])
			}
		}
	}
	if !found {
		t.Fatal("demo has no e-model alpha=1 N*=55 result")
	}
	out, _, code = h.run("runs", "--json")
	var runs []map[string]any
	if err := json.Unmarshal([]byte(out), &runs); err != nil || code != 0 || len(runs) != 2 {
		t.Fatalf("runs: exit %d, %d runs, %v", code, len(runs), err)
	}
	if runs[1]["config"] != "predict flags" {
		t.Errorf("oldest run config %v, want the predict run", runs[1]["config"])
	}
	// Every recorded result's lineage leads back to its own model, even
	// where two models predict the same numbers (Starobinsky and the
	// E-model with alpha = n = 1).
	out, _, _ = h.run("show", "latest", "--json")
	var shown struct {
		Results []struct {
			Label, Model string
		} `json:"results"`
	}
	if err := json.Unmarshal([]byte(out), &shown); err != nil {
		t.Fatal(err)
	}
	for _, r := range shown.Results {
		if strings.HasPrefix(r.Label, "Starobinsky") != (r.Model == "starobinsky") {
			t.Errorf("result %q traces back to model %q", r.Label, r.Model)
		}
	}
	out, _, code = h.run("show", "latest")
	if code != 0 || !strings.Contains(out, "# results (64)") || !strings.Contains(out, "# configuration") {
		t.Errorf("show latest: exit %d\n%s", code, out)
	}
}

func TestBadInput(t *testing.T) {
	h := newHarness(t)
	write := func(name, text string) string {
		p := filepath.Join(h.dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	head := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n"
	cases := []struct {
		name, config string
		code         int
		want         []string // fragments of stderr
	}{
		{"unknown family", head + "[[model]]\nfamily = \"e-modle\"\nalpha = 1\n", app.ExitUsage,
			[]string{"unknown-family.toml:9:", "unknown model family \"e-modle\"", "known: ", " e-model,"}},
		{"unknown parameter", head + "[[model]]\nfamily = \"e-model\"\nalhpa = 1\n", app.ExitUsage,
			[]string{"unknown-parameter.toml:10:1", "unknown parameter \"alhpa\"", "parameters: alpha, n"}},
		{"missing parameter", head + "[[model]]\nfamily = \"power-law\"\n", app.ExitUsage,
			[]string{"missing-parameter.toml:8:", "parameter p: missing"}},
		{"out of range", head + "[[model]]\nfamily = \"natural\"\nf = -1\n", app.ExitUsage,
			[]string{"out-of-range.toml:10:1", "parameter f: value -1 outside (0, +Inf)"}},
		{"malformed", head + "[[model]]\nfamily = \"e-model\"\nalpha = [1, \n", app.ExitUsage,
			[]string{"malformed.toml:10:"}},
		{"unknown key", "titel = \"x\"\n" + head + "[[model]]\nfamily = \"starobinsky\"\n", app.ExitUsage,
			[]string{"unknown-key.toml:1:1", "titel"}},
		{"unknown constraint", strings.Replace(head, "cmb-combined-2025", "planck-1999", 1) + "[[model]]\nfamily = \"starobinsky\"\n", app.ExitUsage,
			[]string{"unknown-constraint.toml:6:", "no shipped constraint set \"planck-1999\""}},
		{"never ends", head + "[[model]]\nfamily = \"power-law\"\np = 2\nfield_range = [5, 20]\n", app.ExitRunFailed,
			[]string{"inflation never ends: epsilon_V < 1 everywhere"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := write(strings.ReplaceAll(c.name, " ", "-")+".toml", c.config)
			before, _, _ := h.run("runs", "--json")
			_, errs, code := h.run("run", p)
			if code != c.code {
				t.Fatalf("exit %d, want %d; stderr: %s", code, c.code, errs)
			}
			for _, w := range c.want {
				if !strings.Contains(errs, w) {
					t.Errorf("stderr lacks %q:\n%s", w, errs)
				}
			}
			after, _, _ := h.run("runs", "--json")
			var b, a []map[string]any
			_ = json.Unmarshal([]byte(before), &b)
			_ = json.Unmarshal([]byte(after), &a)
			if c.code == app.ExitUsage && len(a) != len(b) {
				t.Errorf("a rejected configuration left a run in the ledger")
			}
			if c.code == app.ExitRunFailed {
				if len(a) != len(b)+1 || a[0]["status"] != "failed" {
					t.Fatalf("a failing run must be recorded as failed: %v", a)
				}
				out, _, _ := h.run("show", a[0]["run"].(string), "--json")
				var shown struct {
					Nodes []struct {
						Stage, Action, Error, OutputHash string
						Outputs                          map[string]any
					} `json:"nodes"`
					Results []map[string]any `json:"results"`
				}
				if err := json.Unmarshal([]byte(out), &shown); err != nil {
					t.Fatal(err)
				}
				failed := 0
				for _, n := range shown.Nodes {
					if n.Action == "failed" {
						failed++
						if n.Stage != "slowroll" || n.Outputs != nil || n.OutputHash != "" {
							t.Errorf("failed node %+v carries outputs", n)
						}
					}
				}
				if failed != 1 {
					t.Errorf("%d failed nodes recorded, want 1 (the slow-roll node)", failed)
				}
				for _, r := range shown.Results {
					if r["error"] == nil || r["n_s"] != 0.0 {
						t.Errorf("a result below a failed node must carry its error and no prediction: %v", r)
					}
				}
			}
		})
	}
	_, errs, code := h.run("show", "no-such-run")
	if code != app.ExitNotFound || !strings.Contains(errs, "no-such-run") {
		t.Errorf("show of an unknown run: exit %d, %s", code, errs)
	}
	_, _, code = h.run("predict", "--family", "e-model", "--param", "alpha")
	if code != app.ExitUsage {
		t.Errorf("predict with a malformed --param: exit %d, want %d", code, app.ExitUsage)
	}
	_, _, code = h.run("frobnicate")
	if code != app.ExitUsage {
		t.Errorf("unknown command: exit %d", code)
	}
}

func TestLedgerFlagOverridesEnvironment(t *testing.T) {
	h := newHarness(t)
	other := filepath.Join(h.dir, "other.db")
	if _, errs, code := h.run("--ledger", other, "predict", "--family", "starobinsky", "--efolds", "60"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if _, err := os.Stat(other); err != nil {
		t.Fatalf("--ledger file not created: %v", err)
	}
	if _, err := os.Stat(h.ledger); err == nil {
		t.Fatal("the environment's ledger was written despite --ledger")
	}
}
