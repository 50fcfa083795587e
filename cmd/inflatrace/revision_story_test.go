package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// paperV1 is the study of a first submission, with a comment the
// revision must keep.
const paperV1 = `# Orrery Collaboration, paper v1: attractors against the 2025 combination
[slow_roll]
method = "first"

[[reheating]]
history = "temperature"
w_reh = 0            # matter-like reheating
T_reh_GeV = 1e9

[[constraint]]
use = "planck2018-bk18"

[[model]]
family = "e-model"
alpha = [1, 3]

[[model]]
family = "starobinsky"
`

// snakeKey is a JSON key in snake_case; the physical quantities keep the
// symbols every inflatrace JSON uses (N_star, T_reh_GeV, ...).
var snakeKey = regexp.MustCompile(`^[a-z0-9]+(_[a-z0-9]+)*$`)

var symbolKeys = map[string]bool{"N_star": true, "energy_scale_GeV": true, "H_star_GeV": true, "T_reh_GeV": true}

func checkKeys(t *testing.T, where string, v any) {
	t.Helper()
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			if !snakeKey.MatchString(k) && !symbolKeys[k] {
				t.Errorf("%s: JSON key %q is not snake_case", where, k)
			}
			checkKeys(t, where, e)
		}
	case []any:
		for _, e := range x {
			checkKeys(t, where, e)
		}
	}
}

// The revision of a paper, as a user does it, with real child processes:
// run and tag the first version; re-run it with several kinds of change
// (a method, a reheating field, the constraint set, a longer alpha list,
// a new model); diff the two in every format; trace a result; export
// both runs, import them into another ledger and diff there, getting the
// same table.
func TestRevisionStory(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command and runs studies")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "inflatrace")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	run := func(ledger string, args ...string) (string, string, int) {
		t.Helper()
		cmd := exec.Command(bin, append([]string{"--ledger", ledger}, args...)...)
		cmd.Dir = dir
		var out, errs bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errs
		err := cmd.Run()
		code := 0
		if ee, ok := err.(*exec.ExitError); ok {
			code = ee.ExitCode()
		} else if err != nil {
			t.Fatal(err)
		}
		return out.String(), errs.String(), code
	}
	main := filepath.Join(dir, "paper.db")
	must := func(ledger string, args ...string) string {
		t.Helper()
		out, errs, code := run(ledger, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		return out
	}
	cfg := filepath.Join(dir, "paper.toml")
	if err := os.WriteFile(cfg, []byte(paperV1), 0o644); err != nil {
		t.Fatal(err)
	}
	must(main, "run", cfg)
	must(main, "tag", "latest", "paper-v1")
	rev := filepath.Join(dir, "revision.toml")
	must(main, "run", "--from", "paper-v1",
		"--set", "slow_roll.method=second",
		"--set", `reheating[0].w_reh="1/3"`,
		"--set", `constraint[0].use="act-dr6-bk18-2025"`,
		"--set", "model[0].alpha=[1, 3, 7]",
		"--add", `model={family="t-model", alpha=7}`,
		"--write-config", rev)
	must(main, "tag", "latest", "paper-v2")
	text, _ := os.ReadFile(rev)
	if !strings.Contains(string(text), "# matter-like reheating") || !strings.Contains(string(text), "# Orrery Collaboration") {
		t.Errorf("the revised configuration lost the comments:\n%s", text)
	}
	if !strings.Contains(must(main, "show", "paper-v2"), "derived from") {
		t.Error("show paper-v2 does not say which run it was derived from")
	}

	// diff, whole report: pairs by identity, added results listed, the
	// main cause of the N* shift is the equation of state (at T_reh =
	// 1e9 GeV, w 0 -> 1/3 moves N* by about 5 e-folds, the method by a
	// fraction of one: Liddle & Leach 2003, arXiv:astro-ph/0305263, eq. 4).
	var rep struct {
		Pairs []struct {
			LabelB  string `json:"label_b"`
			Changes map[string]struct {
				A, B, Total   float64
				Contributions []float64
				Remainder     float64
				MainCause     string `json:"main_cause"`
			} `json:"changes"`
		} `json:"pairs"`
		Added []struct{ Label string } `json:"added"`
	}
	js := must(main, "diff", "paper-v1", "paper-v2", "--format", "json")
	var generic any
	if err := json.Unmarshal([]byte(js), &generic); err != nil {
		t.Fatal(err)
	}
	checkKeys(t, "diff --format json", generic)
	if err := json.Unmarshal([]byte(js), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Pairs) != 3 || len(rep.Added) != 2 {
		t.Fatalf("%d pairs and %d added results, want 3 (e-model alpha 1, 3; Starobinsky) and 2 (e-model alpha 7, t-model)", len(rep.Pairs), len(rep.Added))
	}
	for _, p := range rep.Pairs {
		for q, c := range p.Changes {
			sum := c.Remainder
			for _, x := range c.Contributions {
				sum += x
			}
			if math.Abs(sum-c.Total) > 1e-13*math.Max(math.Abs(c.A), math.Abs(c.B)) {
				t.Errorf("%s %s: contributions + remainder %g, total %g", p.LabelB, q, sum, c.Total)
			}
		}
		if c := p.Changes["N_star"]; c.MainCause != "reheating[0].w_reh" || c.Total < 3 {
			t.Errorf("%s: N* %+v: want an increase of several e-folds caused by reheating[0].w_reh", p.LabelB, c)
		}
		if c := p.Changes["delta_chi2"]; c.Total == 0 {
			t.Errorf("%s: Delta chi^2 unchanged although the constraint set changed", p.LabelB)
		}
	}

	// The table formats: one row per changed quantity, change = new - old.
	table := must(main, "diff", "paper-v1", "paper-v2", "--format", "csv", "--digits", "17")
	rows, err := csv.NewReader(strings.NewReader(table)).ReadAll()
	if err != nil || len(rows) < 2 || strings.Join(rows[0], ",") != "row_a,row_b,result,quantity,old,new,change,main_cause" {
		t.Fatalf("diff csv: %v\n%s", err, table)
	}
	for _, r := range rows[1:] {
		old, _ := strconv.ParseFloat(r[4], 64)
		nw, _ := strconv.ParseFloat(r[5], 64)
		ch, _ := strconv.ParseFloat(r[6], 64)
		if math.Abs(ch-(nw-old)) > 1e-15*math.Max(math.Abs(old), math.Abs(nw)) || r[7] == "" {
			t.Errorf("csv row %v: change is not new - old, or no main cause", r)
		}
	}
	md := must(main, "diff", "paper-v1", "paper-v2", "--format", "markdown", "--quantities", "n_s,r")
	if !strings.HasPrefix(md, "| A# | B# | result | quantity | old | new | change | main cause |\n") || strings.Count(md, "\n") != 2+2*3 {
		t.Errorf("diff markdown of n_s and r for 3 pairs:\n%s", md)
	}
	tex := must(main, "diff", "paper-v1", "paper-v2", "--format", "latex")
	if !strings.Contains(tex, `\begin{tabular}`) || !strings.Contains(tex, `$n_s$`) || !strings.Contains(tex, `reheating[0].w\_reh`) {
		t.Errorf("diff latex:\n%s", tex)
	}
	txt := must(main, "diff", "paper-v1", "paper-v2")
	if !strings.Contains(txt, "added (B only)") || !strings.Contains(txt, "main cause: reheating[0].w_reh") {
		t.Errorf("diff text:\n%s", txt)
	}

	// Lineage with values and units.
	tr := must(main, "trace", "paper-v2#1")
	if !strings.Contains(tr, "GeV") || !strings.Contains(tr, "n_s") {
		t.Errorf("trace paper-v2#1 shows no values with units:\n%s", tr)
	}
	if _, errs, code := run(main, "trace", "paper-v2"); code != 2 || !strings.Contains(errs, "#") {
		t.Errorf("trace without #N: exit %d, %q; want 2 with a hint", code, errs)
	}

	// Export both, import elsewhere, diff there: the same table.
	other := filepath.Join(dir, "elsewhere.db")
	for _, tag := range []string{"paper-v1", "paper-v2"} {
		arch := filepath.Join(dir, tag+".tar.gz")
		must(main, "export", tag, "--out", arch)
		must(other, "import", arch)
	}
	if got := must(other, "diff", "paper-v1", "paper-v2", "--format", "csv", "--digits", "17"); got != table {
		t.Errorf("diff after import differs:\n%s\nwant\n%s", got, table)
	}
	if !strings.Contains(must(other, "show", "paper-v2"), "derived from") {
		t.Error("the imported revision lost the run it was derived from")
	}
}
