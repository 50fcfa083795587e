package root

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// reviseStudy is a tiny first-order study: one E-model at fixed N* = 55.
const reviseStudy = `title = "revise"   # kept byte for byte

[[reheating]]
history = "fixed-efolds"
N_star = 55          # the pivot's e-folds

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"   # alpha-attractor
alpha = 1
n = 1
`

// reviseResult is the part of a run --json result these tests read.
type reviseResult struct {
	Model  string             `json:"model"`
	Params map[string]float64 `json:"params"`
	NStar  float64            `json:"N_star"`
	NS     float64            `json:"n_s"`
	R      float64            `json:"r"`
	Key    string             `json:"key"`
}

type reviseRun struct {
	Run     string         `json:"run"`
	Results []reviseResult `json:"results"`
}

func (h *harness) runJSON(args ...string) reviseRun {
	h.t.Helper()
	var r reviseRun
	out := h.mustRun(append(args, "--json")...)
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		h.t.Fatalf("%v: %v: %s", args, err, out)
	}
	if len(r.Results) != 1 {
		h.t.Fatalf("%v: %d results, want 1", args, len(r.Results))
	}
	return r
}

type shownRun struct {
	Config      string `json:"config"`
	DerivedFrom string `json:"derived_from"`
}

func (h *harness) shown(run string) shownRun {
	h.t.Helper()
	var s shownRun
	if err := json.Unmarshal([]byte(h.mustRun("show", run, "--json")), &s); err != nil {
		h.t.Fatal(err)
	}
	return s
}

// A run re-run from the ledger with two values changed gives exactly the
// result of a study written with those values (the same result key), its
// recorded text is the original with only the two edited lines changed,
// and show names the run it was derived from.
func TestRunFromRecordedRun(t *testing.T) {
	h := newHarness(t)
	orig := h.runJSON("run", h.write("study.toml", reviseStudy))
	derived := h.runJSON("run", "--from", "latest", "--set", "reheating[0].N_star=60", "--set", "model[0].alpha=7")
	o, d := orig.Results[0], derived.Results[0]
	if d.NStar != 60 || d.Params["alpha"] != 7 || d.Params["n"] != 1 {
		t.Fatalf("derived result: N* = %g, params %v; want N* = 60, alpha = 7, n = 1", d.NStar, d.Params)
	}
	// Alpha-attractors at large N: n_s = 1 - 2/N and r = 12 alpha/N^2
	// (Kallosh & Linde 2013, arXiv:1306.5220): n_s rises with N*, and r
	// rises with alpha faster than it falls with N* (7 > (60/55)^2).
	if !(d.NS > o.NS) {
		t.Errorf("n_s: %g at N* = 60 is not above %g at N* = 55", d.NS, o.NS)
	}
	if !(d.R > 2*o.R) {
		t.Errorf("r: %g at alpha = 7, N* = 60 is not above twice %g at alpha = 1, N* = 55", d.R, o.R)
	}
	edited := strings.Replace(strings.Replace(reviseStudy, "N_star = 55 ", "N_star = 60 ", 1), "alpha = 1\n", "alpha = 7\n", 1)
	direct := h.runJSON("run", h.write("direct.toml", edited))
	if direct.Results[0].Key != d.Key {
		t.Errorf("derived result key %s, direct run of the edited text %s", d.Key, direct.Results[0].Key)
	}
	sd := h.shown(derived.Run)
	if sd.Config != edited {
		t.Errorf("recorded configuration\n%s\nwant\n%s", sd.Config, edited)
	}
	if sd.DerivedFrom != orig.Run {
		t.Errorf("derived_from %q, want %q", sd.DerivedFrom, orig.Run)
	}
	if so := h.shown(orig.Run); so.DerivedFrom != "" {
		t.Errorf("the original run says derived from %q", so.DerivedFrom)
	}
	if out := h.mustRun("show", derived.Run); !strings.Contains(out, "derived from "+orig.Run+"\n") {
		t.Errorf("show does not say derived from %s:\n%s", orig.Run, out)
	}
	// A derived run of a derived run names its own parent, by tag too.
	h.mustRun("tag", derived.Run, "rev-1")
	again := h.runJSON("run", "--from", "rev-1", "--drop", "model[0]", "--add", `model={family="t-model", alpha=7}`)
	if got := again.Results[0]; got.Model != "t-model" || got.NStar != 60 {
		t.Errorf("after --drop model[0] --add t-model: model %s, N* %g", got.Model, got.NStar)
	}
	if s := h.shown(again.Run); s.DerivedFrom != derived.Run {
		t.Errorf("derived_from %q, want %q", s.DerivedFrom, derived.Run)
	}
}

// Bad edits exit 2 naming the flag and the path, and record nothing.
func TestRunFromRefusesBadEdits(t *testing.T) {
	h := newHarness(t)
	study := h.write("study.toml", reviseStudy)
	h.mustRun("run", study)
	out := filepath.Join(h.dir, "never.toml")
	cases := []struct {
		args []string
		code int
		want []string
	}{
		{[]string{"--from", "latest", "--set", "model[0].alpah=3"}, 2, []string{"--set model[0].alpah=3", "unknown parameter \"alpah\"", "alpha, n"}},
		{[]string{"--from", "latest", "--set", "reheating[0].N_star=300"}, 2, []string{"--set reheating[0].N_star=300", "N_star"}},
		{[]string{"--from", "latest", "--set", "model[3].alpha=1"}, 2, []string{"--set model[3].alpha=1", "model[0]"}},
		{[]string{"--from", "latest", "--set", "slow_roll.method=exakt"}, 2, []string{"--set slow_roll.method=exakt", "exakt"}},
		{[]string{"--from", "latest", "--set", "model[0]alpha=1"}, 2, []string{"model[0]alpha", "not a key path"}},
		{[]string{"--from", "latest", "--drop", "model[0].beta"}, 2, []string{"--drop model[0].beta", "family, alpha, n"}},
		{[]string{"--from", "latest", "--add", `model={family="no-such"}`}, 2, []string{"no-such"}},
		{[]string{"--from", "latest", "--set", "model[0].alpha=1", "--write-config", out}, 2, []string{"--set model[0].n=-1", "outside"}},
		{[]string{study, "--from", "latest"}, 2, []string{"not both"}},
		{[]string{"--from", "no-such-run", "--set", "model[0].alpha=2"}, 4, []string{"no-such-run"}},
	}
	// The --write-config case is made bad by a second, failing edit.
	cases[7].args = append(cases[7].args, "--set", "model[0].n=-1")
	before := h.runs()
	for _, tc := range cases {
		_, errs, code := h.run(append([]string{"run"}, tc.args...)...)
		if code != tc.code {
			t.Errorf("%v: exit %d, want %d: %s", tc.args, code, tc.code, errs)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: error %q does not contain %q", tc.args, errs, w)
			}
		}
	}
	if after := h.runs(); after != before {
		t.Errorf("%d runs recorded by refused edits", after-before)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("--write-config wrote %s for a refused edit (stat: %v)", out, err)
	}
}

// --set edits a file's text too; --write-config with --dry-run writes the
// edited text and records nothing, and the written file runs as it says.
func TestSetOnFileWriteConfig(t *testing.T) {
	h := newHarness(t)
	study := h.write("study.toml", reviseStudy)
	written := filepath.Join(h.dir, "revised.toml")
	h.mustRun("run", study, "--set", "model[0].alpha=7", "--write-config", written, "--dry-run")
	if n := h.runs(); n != 0 {
		t.Fatalf("--dry-run recorded %d runs", n)
	}
	got, err := os.ReadFile(written)
	if err != nil {
		t.Fatal(err)
	}
	if want := strings.Replace(reviseStudy, "alpha = 1\n", "alpha = 7\n", 1); string(got) != want {
		t.Fatalf("written\n%s\nwant\n%s", got, want)
	}
	a := h.runJSON("run", study, "--set", "model[0].alpha=7")
	b := h.runJSON("run", written)
	if a.Results[0].Key != b.Results[0].Key || a.Results[0].Params["alpha"] != 7 {
		t.Errorf("edited run key %s alpha %v, written file's %s", a.Results[0].Key, a.Results[0].Params["alpha"], b.Results[0].Key)
	}
	if s := h.shown(a.Run); s.DerivedFrom != "" {
		t.Errorf("a file run says derived from %q", s.DerivedFrom)
	}
	if src, _ := os.ReadFile(study); string(src) != reviseStudy {
		t.Errorf("--set changed the file itself")
	}
}
