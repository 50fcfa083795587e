package root

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// inferStudy is a study of inferences alone: the Starobinsky model as the
// reference, and the E-model with alpha log-uniform, both with w_reh = 0
// and T_reh log-uniform from the BBN bound to its maximum.
const inferStudy = `title = "Orrery Collaboration: alpha-attractors and reheating"

[[constraint]]
use = "cmb-combined-2025"

[[forecast]]
use = "simons-observatory"

[[inference]]
label = "Starobinsky"
family = "e-model"
alpha = 1
reference = true

[[inference]]
label = "E-model"
family = "e-model"
alpha = {log_uniform = [0.01, 100]}
`

type inferJSON struct {
	Run  string `json:"run"`
	Rows []struct {
		Label     string             `json:"label"`
		Reference bool               `json:"reference"`
		LnZ       float64            `json:"ln_Z"`
		LnZErr    float64            `json:"ln_Z_err"`
		LnB       *float64           `json:"ln_B"`
		Grade     string             `json:"grade"`
		Values    map[string]float64 `json:"values"`
	} `json:"rows"`
}

// TestInferRecordsAndReuses: infer records one node per inference; a
// re-run reuses them and prints the same numbers bit for bit; verify
// recomputes them identically; ln B is the difference of the evidences,
// the reference's 0; and the posterior keeps T_reh between the BBN bound
// and the instantaneous maximum and N* below its instantaneous value
// (about 55.6 for Starobinsky with A_s = 2.1e-9: ExampleInstant in
// stages/reheat).
func TestInferRecordsAndReuses(t *testing.T) {
	h := newHarness(t)
	p := h.write("inf.toml", inferStudy)
	out, errs, code := h.run("infer", p, "--format", "json")
	if code != 0 {
		t.Fatalf("infer: exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "2 computed, 0 reused") {
		t.Errorf("cold infer: %s", errs)
	}
	var a inferJSON
	if err := json.Unmarshal([]byte(out), &a); err != nil || len(a.Rows) != 2 {
		t.Fatalf("infer --format json: %v: %s", err, out)
	}
	out2, errs2, code := h.run("infer", p, "--format", "json")
	if code != 0 || !strings.Contains(errs2, "0 computed, 2 reused") {
		t.Fatalf("warm infer: exit %d: %s", code, errs2)
	}
	var b inferJSON
	if err := json.Unmarshal([]byte(out2), &b); err != nil {
		t.Fatal(err)
	}
	for i := range a.Rows {
		for k, v := range a.Rows[i].Values {
			if math.Float64bits(v) != math.Float64bits(b.Rows[i].Values[k]) {
				t.Errorf("%s %s: %v cold, %v warm", a.Rows[i].Label, k, v, b.Rows[i].Values[k])
			}
		}
	}
	ref, em := a.Rows[0], a.Rows[1]
	if !ref.Reference || ref.LnB == nil || *ref.LnB != 0 || em.LnB == nil || math.Abs(*em.LnB-(em.LnZ-ref.LnZ)) > 1e-15 || em.Grade == "" {
		t.Errorf("Bayes factors: reference %+v, E-model ln B %v (%q)", ref.LnB, em.LnB, em.Grade)
	}
	for _, r := range a.Rows {
		v := r.Values
		if v["ln_Z_err"] > 0.01 {
			t.Errorf("%s: ln Z error %g above the default tolerance", r.Label, v["ln_Z_err"])
		}
		if !(v["log10_T_reh_GeV:lo95"] >= math.Log10(4.1e-3)-1e-9 && v["log10_T_reh_GeV:hi95"] <= 16) {
			t.Errorf("%s: T_reh 95%% range [%g, %g] outside [BBN, maximum]", r.Label, v["log10_T_reh_GeV:lo95"], v["log10_T_reh_GeV:hi95"])
		}
		if !(v["N_star:lo68"] < v["N_star:median"] && v["N_star:median"] < v["N_star:hi68"] && v["N_star:hi95"] < 56) {
			t.Errorf("%s: N* intervals %g %g %g %g", r.Label, v["N_star:lo68"], v["N_star:median"], v["N_star:hi68"], v["N_star:hi95"])
		}
		if p := v["P_detect_3sigma:simons-observatory"]; !(p >= 0 && p <= 1) {
			t.Errorf("%s: detection probability %g", r.Label, p)
		}
	}
	vout, verrs, code := h.run("verify", b.Run)
	if code != 0 || !strings.Contains(vout+verrs, "2 identical") {
		t.Errorf("verify: exit %d: %s%s", code, vout, verrs)
	}
	// Two identical runs: diff pairs every inference, nothing changed.
	if out, errs, code := h.run("diff", a.Run, b.Run); code != 0 || !strings.Contains(out, "2 paired results unchanged") {
		t.Errorf("diff of identical inference runs: exit %d: %s%s", code, out, errs)
	}
	// run refuses a study of inferences alone, pointing to infer.
	if _, errs, code := h.run("run", p); code != 2 || !strings.Contains(errs, "inflatrace infer") {
		t.Errorf("run of an inference study: exit %d: %s", code, errs)
	}
	for _, f := range []string{"text", "markdown", "csv", "latex"} {
		if out, errs, code := h.run("infer", p, "--format", f); code != 0 || !strings.Contains(out, "E-model") {
			t.Errorf("--format %s: exit %d: %s%s", f, code, out, errs)
		}
	}
	// Figures from the ledger: a posterior density per quantity.
	figs := filepath.Join(h.dir, "figs")
	if _, errs, code := h.run("plot", b.Run, "--out", figs); code != 0 {
		t.Fatalf("plot of an inference run: exit %d: %s", code, errs)
	}
	for _, name := range []string{"posterior-alpha.pdf", "posterior-N_star.pdf", "posterior-log10_T_reh_GeV.pdf", "posterior-log10_r.pdf", "posterior-alpha-T_reh.pdf"} {
		if st, err := os.Stat(filepath.Join(figs, name)); err != nil || st.Size() < 1000 {
			t.Errorf("plot wrote no %s: %v", name, err)
		}
	}
	// table RUN writes the inference table, not a prediction table.
	if out, errs, code := h.run("table", b.Run, "--format", "markdown"); code != 0 || !strings.Contains(out, "ln B") {
		t.Errorf("table of an inference run: exit %d: %s%s", code, out, errs)
	}
	if _, errs, code := h.run("infer", p, "--format", "pdf"); code != 2 || !strings.Contains(errs, "--format") {
		t.Errorf("--format pdf: exit %d: %s", code, errs)
	}
}

// TestInferSampleBasedSet: an inference against a sample-based set (the
// synthetic chain of testdata/configs, n_s ~ N(0.965, 0.004), r ~ |N(0,
// 0.02)|) uses its kernel density estimate as the likelihood; against the
// Gaussian of the same mean and deviations the evidence is close (the
// estimate is broadened by its bandwidth and the samples are few).
func TestInferSampleBasedSet(t *testing.T) {
	h := newHarness(t)
	chain, err := filepath.Abs("../../../../testdata/configs/build-chain.toml")
	if err != nil {
		t.Fatal(err)
	}
	gauss := h.write("gauss.toml", "name = \"gauss\"\ncitation = \"the synthetic chain's distribution, not data\"\n\n[n_s]\nmean = 0.965\nsigma = 0.004\n\n[r]\nmean = 0\nsigma = 0.02\n")
	p := h.write("kde.toml", "[[constraint]]\nfile = \""+chain+"\"\n\n[[constraint]]\nfile = \""+gauss+"\"\n\n[[inference]]\nfamily = \"e-model\"\nalpha = {log_uniform = [0.1, 10]}\nconstraint = [\"build-chain\", \"gauss\"]\n")
	out, errs, code := h.run("infer", p, "--format", "json")
	if code != 0 {
		t.Fatalf("infer: exit %d: %s", code, errs)
	}
	var a inferJSON
	if err := json.Unmarshal([]byte(out), &a); err != nil || len(a.Rows) != 2 {
		t.Fatalf("%v: %s", err, out)
	}
	kde, g := a.Rows[0], a.Rows[1]
	if kde.LnZErr > 0.01 || math.Abs(kde.LnZ-g.LnZ) > 0.5 {
		t.Errorf("ln Z against the samples %.4f ± %.2g, against the Gaussian %.4f", kde.LnZ, kde.LnZErr, g.LnZ)
	}
	t.Logf("ln Z: samples %.4f, Gaussian %.4f", kde.LnZ, g.LnZ)
}

// TestDiffAttributesInferences: a revision that narrows the E-model's
// alpha prior changes its ln Z and intervals, not the Starobinsky
// inference's; diff pairs the inferences by label and set, attributes the
// change to the prior, and reports the reference unchanged.
func TestDiffAttributesInferences(t *testing.T) {
	h := newHarness(t)
	p1 := h.write("a.toml", inferStudy)
	p2 := h.write("b.toml", strings.Replace(inferStudy, "alpha = {log_uniform = [0.01, 100]}", "alpha = {log_uniform = [0.1, 10]}", 1))
	runOf := func(p string) string {
		out, errs, code := h.run("infer", p, "--format", "json")
		if code != 0 {
			t.Fatalf("infer %s: exit %d: %s", p, code, errs)
		}
		var r inferJSON
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		return r.Run
	}
	a, b := runOf(p1), runOf(p2)
	out, errs, code := h.run("diff", a, b, "--format", "json")
	if code != 0 {
		t.Fatalf("diff: exit %d: %s", code, errs)
	}
	var rep struct {
		Pairs []struct {
			LabelA  string `json:"label_a"`
			Changes map[string]struct {
				A, B      float64
				MainCause string `json:"main_cause"`
			} `json:"changes"`
		} `json:"pairs"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	found := false
	for _, p := range rep.Pairs {
		c, ok := p.Changes["ln_Z"]
		switch {
		case strings.HasPrefix(p.LabelA, "Starobinsky") && ok && c.A != c.B:
			t.Errorf("the reference's ln Z changed: %+v", c)
		case strings.HasPrefix(p.LabelA, "E-model") && ok && c.A != c.B:
			found = true
			if !strings.Contains(c.MainCause, "alpha") {
				t.Errorf("ln Z change attributed to %q, want the alpha prior", c.MainCause)
			}
		}
	}
	if !found {
		t.Errorf("no E-model ln Z change in the diff: %s", out)
	}
}

// TestInferOneOff: a one-off inference from flags is the same inference
// as the study file that says the same: its node is reused (same key),
// its numbers are the file's bit for bit, and the run records the study
// the flags described. A bad flag is refused by name, with nothing run.
func TestInferOneOff(t *testing.T) {
	h := newHarness(t)
	p := h.write("one.toml", `title = "Orrery Collaboration: one E-model (invented demo)"
[[constraint]]
use = "planck2018-bk18"
[[forecast]]
use = "simons-observatory"
[[inference]]
family = "e-model"
alpha = {log_uniform = ["0.01", "100"]}
w_reh = {uniform = ["0", "1/3"]}
`)
	out, errs, code := h.run("infer", p, "--format", "json")
	if code != 0 || !strings.Contains(errs, "1 computed") {
		t.Fatalf("infer STUDY: exit %d: %s", code, errs)
	}
	var a, b inferJSON
	if err := json.Unmarshal([]byte(out), &a); err != nil || len(a.Rows) != 1 {
		t.Fatalf("%v: %s", err, out)
	}
	out, errs, code = h.run("infer", "--family", "e-model", "--prior", "alpha=log_uniform:0.01,100", "--w-reh", "uniform:0,1/3",
		"--constraint", "planck2018-bk18", "--forecast", "simons-observatory", "--format", "json")
	if code != 0 {
		t.Fatalf("infer --family: exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "0 computed, 1 reused") {
		t.Errorf("the one-off inference was not the study's node: %s", errs)
	}
	if err := json.Unmarshal([]byte(out), &b); err != nil || len(b.Rows) != 1 {
		t.Fatalf("%v: %s", err, out)
	}
	for k, v := range a.Rows[0].Values {
		if math.Float64bits(v) != math.Float64bits(b.Rows[0].Values[k]) {
			t.Errorf("%s: %v from the file, %v from flags", k, v, b.Rows[0].Values[k])
		}
	}
	shown := h.mustRun("show", b.Run)
	if !strings.Contains(shown, `alpha" = {log_uniform = ["0.01", "100"]}`) {
		t.Errorf("show of the one-off run does not print the study the flags built:\n%s", shown)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--prior", "alpha=log_uniform:0,100"}, "--prior alpha=log_uniform:0,100: "},
		{[]string{"--prior", "beta=2"}, "--prior beta=2: unknown key"},
		{[]string{"--w-reh", "log_uniform:0.1,1"}, "--w-reh \"log_uniform:0.1,1\""},
		{[]string{"--constraint", "nope"}, "--constraint nope: no shipped constraint set"},
		{[]string{"--N-reh", "3", "--efolds", "55"}, "give one"},
		{[]string{p}, "not both"},
	} {
		_, errs, code := h.run(append([]string{"infer", "--family", "e-model"}, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
	if _, errs, code := h.run("infer", p, "--prior", "alpha=1"); code != 2 || !strings.Contains(errs, "--prior describes a one-off") {
		t.Errorf("a one-off flag beside a study: exit %d, %q", code, errs)
	}
}
