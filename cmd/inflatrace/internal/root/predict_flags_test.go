package root

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
)

func (h *harness) runs() int {
	h.t.Helper()
	out, errs, code := h.run("runs", "--json")
	var runs []map[string]any
	if err := json.Unmarshal([]byte(out), &runs); err != nil || code != 0 {
		h.t.Fatalf("runs --json: exit %d, %v: %s", code, err, errs)
	}
	return len(runs)
}

// TestPredictRefusesBadFlags: every bad value or combination exits 2 with
// an error that names the flag (both flags for a conflict), never a line of
// the configuration predict writes, and records nothing.
func TestPredictRefusesBadFlags(t *testing.T) {
	h := newHarness(t)
	if _, errs, code := h.run("predict", "--family", "starobinsky", "--efolds", "55"); code != 0 {
		t.Fatalf("a good predict: exit %d: %s", code, errs)
	}
	star := []string{"predict", "--family", "starobinsky"}
	cases := []struct {
		args []string
		want []string // each must appear in the error
	}{
		// Non-finite numbers, in every float flag kind.
		{[]string{"--efolds", "nan"}, []string{"--efolds", "finite"}},
		{[]string{"--efolds", "inf"}, []string{"--efolds", "finite"}},
		{[]string{"--efolds", "-Inf"}, []string{"--efolds", "finite"}},
		{[]string{"--A_s", "nan"}, []string{"--A_s", "finite"}},
		{[]string{"--w-reh", "nan", "--T-reh-GeV", "1e9"}, []string{"--w-reh", "finite"}},
		{[]string{"--w-reh", "0", "--T-reh-GeV", "inf"}, []string{"--T-reh-GeV", "finite"}},
		{[]string{"--w-reh", "0", "--N-reh", "nan"}, []string{"--N-reh", "finite"}},
		{[]string{"--g-reh", "nan"}, []string{"--g-reh", "finite"}},
		{[]string{"--T0-K", "inf"}, []string{"--T0-K", "finite"}},
		{[]string{"--field-range", "0.5,nan"}, []string{"--field-range", "finite"}},
		{[]string{"--efolds", "55", "--end", "field", "--end-phi", "nan"}, []string{"--end-phi", "finite"}},
		{[]string{"--band", "--w-reh-max", "nan"}, []string{"--w-reh-max", "finite"}},
		// Values out of their physical range (bounds in stages/study/config.go).
		{[]string{"--efolds", "1e-320"}, []string{"--efolds", "5 <= N* <= 200"}},
		{[]string{"--efolds", "0"}, []string{"--efolds", "5 <= N* <= 200"}},
		{[]string{"--efolds", "4"}, []string{"--efolds", "5 <= N* <= 200"}},
		{[]string{"--efolds", "250"}, []string{"--efolds", "5 <= N* <= 200"}},
		{[]string{"--A_s", "0"}, []string{"--A_s", "0 < A_s < 1"}},
		{[]string{"--A_s", "-2e-9"}, []string{"--A_s", "0 < A_s < 1"}},
		{[]string{"--w-reh", "0", "--T-reh-GeV", "-1"}, []string{"--T-reh-GeV", "T_reh = -1 GeV"}},
		{[]string{"--w-reh", "0", "--T-reh-GeV", "0"}, []string{"--T-reh-GeV", "photon temperature"}},
		{[]string{"--kination", "--T-reh-GeV", "1e-15"}, []string{"--T-reh-GeV", "photon temperature"}},
		{[]string{"--w-reh", "-0.5", "--T-reh-GeV", "1e9"}, []string{"--w-reh", "-1/3 < w_reh <= 1"}},
		{[]string{"--w-reh", "1.5", "--N-reh", "3"}, []string{"--w-reh", "-1/3 < w_reh <= 1"}},
		{[]string{"--w-reh", "0", "--N-reh", "-1"}, []string{"--N-reh", "0 <= N_reh <= 150"}},
		{[]string{"--w-reh", "0", "--N-reh", "1000"}, []string{"--N-reh", "0 <= N_reh <= 150"}},
		{[]string{"--g-reh", "0"}, []string{"--g-reh", "positive"}},
		{[]string{"--g-reh", "-3"}, []string{"--g-reh", "positive"}},
		{[]string{"--g-s-reh", "0.5"}, []string{"--g-s-reh", "at least 1"}},
		{[]string{"--g-s0", "0"}, []string{"--g-s0", "positive"}},
		{[]string{"--T0-K", "-2.7"}, []string{"--T0-K", "positive"}},
		{[]string{"--k-pivot-per-Mpc", "0"}, []string{"--k-pivot-per-Mpc", "positive"}},
		{[]string{"--T-bbn-GeV", "-1"}, []string{"--T-bbn-GeV", "positive"}},
		{[]string{"--band", "--n-w", "0"}, []string{"--n-w", "1 to 10000"}},
		{[]string{"--band", "--T-min-GeV", "-1"}, []string{"--T-min-GeV", "photon temperature"}},
		{[]string{"--band", "--w-reh-min", "0.5", "--w-reh-max", "0.2"}, []string{"--band", "w_reh_min <= w_reh_max"}},
		// Conflicting or incomplete histories name both flags.
		{[]string{"--efolds", "55", "--T-reh-GeV", "1e9"}, []string{"--efolds", "--T-reh-GeV"}},
		{[]string{"--efolds", "55", "--instantaneous"}, []string{"--efolds", "--instantaneous"}},
		{[]string{"--efolds", "55", "--g-reh", "100"}, []string{"--efolds", "--g-reh"}},
		{[]string{"--efolds", "55", "--band"}, []string{"--efolds", "--band"}},
		{[]string{"--instantaneous", "--w-reh", "0"}, []string{"--instantaneous", "--w-reh"}},
		{[]string{"--w-reh", "0", "--T-reh-GeV", "1e9", "--N-reh", "3"}, []string{"--T-reh-GeV", "--N-reh"}},
		{[]string{"--kination", "--w-reh", "1", "--T-reh-GeV", "1e7"}, []string{"--kination", "--w-reh"}},
		{[]string{"--kination", "--N-reh", "3"}, []string{"--kination", "--N-reh"}},
		{[]string{"--band", "--T-reh-GeV", "1e9"}, []string{"--band", "--T-reh-GeV"}},
		{[]string{"--w-reh", "0"}, []string{"--w-reh", "--T-reh-GeV", "--N-reh"}},
		{[]string{"--T-reh-GeV", "1e9"}, []string{"--T-reh-GeV", "--w-reh", "--kination"}},
		{[]string{"--N-reh", "3"}, []string{"--N-reh", "--w-reh"}},
		{[]string{"--kination"}, []string{"--kination", "--T-reh-GeV"}},
		{[]string{"--n-T", "5"}, []string{"--n-T", "--band"}},
		// Slow roll, constraints, forecasts and the model.
		{[]string{"--end", "field"}, []string{"--end", "--end-phi"}},
		{[]string{"--end-phi", "1"}, []string{"--end-phi", "--end field"}},
		{[]string{"--end", "epsilon=1"}, []string{"--end", "not available"}},
		{[]string{"--method", "third"}, []string{"--method", "not available"}},
		{[]string{"--constraint", "nope"}, []string{"--constraint nope"}},
		{[]string{"--constraint", "planck2018-bk18", "--constraint", "planck2018-bk18"}, []string{"--constraint planck2018-bk18", "twice"}},
		{[]string{"--constraint-file", "/nonexistent/set.toml"}, []string{"--constraint-file /nonexistent/set.toml"}},
		{[]string{"--forecast", "nope"}, []string{"--forecast nope"}},
		{[]string{"--forecast", "litebird", "--forecast", "litebird"}, []string{"--forecast litebird", "twice"}},
		{[]string{"--param", "alpha=1"}, []string{"--param alpha", "unknown parameter"}},
		{[]string{"--param", "label=x"}, []string{"--param label", "own flag"}},
		{[]string{"--label", " "}, []string{"--label"}},
		{[]string{"--field-range", "3"}, []string{"--field-range", "lo,hi"}},
		{[]string{"--field-range", "3,1"}, []string{"--field-range", "lo < hi"}},
		{[]string{"--kinetic", "1"}, []string{"--kinetic", "--family"}},
	}
	for _, c := range cases {
		_, errs, code := h.run(append(append([]string(nil), star...), c.args...)...)
		if code != app.ExitUsage {
			t.Errorf("%v: exit %d, want %d (%s)", c.args, code, app.ExitUsage, errs)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: error %q lacks %q", c.args, errs, w)
			}
		}
		if strings.Contains(errs, predictFlagsName) {
			t.Errorf("%v: error %q points into the written configuration instead of at a flag", c.args, errs)
		}
	}
	// A model parameter of a family, and a user-written potential's syntax.
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"predict", "--family", "e-model", "--param", "alpha=-1", "--efolds", "55"}, "--param alpha"},
		{[]string{"predict", "--family", "nope", "--efolds", "55"}, "--family nope"},
		{[]string{"predict", "--potential", "phi^^2", "--field-range", "1,20", "--efolds", "55"}, "--potential"},
		{[]string{"predict", "--potential", "phi^2", "--field-range", "1,20", "--domain", "0,30", "--efolds", "55"}, "--domain"},
	} {
		_, errs, code := h.run(c.args...)
		if code != app.ExitUsage || !strings.Contains(errs, c.want) || strings.Contains(errs, predictFlagsName) {
			t.Errorf("%v: exit %d, error %q; want exit 2 naming %s", c.args, code, errs, c.want)
		}
	}
	if n := h.runs(); n != 1 {
		t.Errorf("%d runs recorded, want only the good one", n)
	}
}

// predictFlagsName is what the written configuration is called in errors
// that point into it ("predict flags:17:3").
const predictFlagsName = "predict flags:"

// studyHead is the start of each equivalent study file.
const studyHead = "[slow_roll]\nmethod = \"first\"\n\n[normalisation]\nA_s = 2.1e-9\n\n"

// TestPredictEqualsStudy: for every reheating history and the other flag
// groups, predict prints exactly the results (every field, node key
// included) that "run" prints for the study file written by hand. Dropping
// or misspelling any flag's key changes a key or a number.
func TestPredictEqualsStudy(t *testing.T) {
	h := newHarness(t)
	setPath := filepath.Join(h.dir, "set.toml")
	set := "name = \"hand-set\"\ntitle = \"a set for this test\"\ncitation = \"invented for a test\"\n[n_s]\nmean = 0.965\nsigma = 0.004\n[r]\nupper_95 = 0.03\n"
	if err := os.WriteFile(setPath, []byte(set), 0o644); err != nil {
		t.Fatal(err)
	}
	con := "[[constraint]]\nuse = \"cmb-combined-2025\"\n\n"
	star := "[[model]]\nfamily = \"starobinsky\"\n"
	cases := []struct {
		name string
		args []string
		toml string
	}{
		{"fixed", []string{"--efolds", "57.5"}, "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 57.5\n\n" + con + star},
		{"default instantaneous", nil, "[[reheating]]\nhistory = \"instantaneous\"\n\n" + con + star},
		{"instantaneous with thermal keys", []string{"--instantaneous", "--k-pivot-per-Mpc", "0.002", "--T0-K", "2.7", "--g-s0", "3.9", "--g-reh", "200", "--g-s-reh", "190", "--T-bbn-GeV", "0.01"},
			"[[reheating]]\nhistory = \"instantaneous\"\nk_pivot_per_Mpc = 0.002\nT_0_K = 2.7\ng_s0 = 3.9\ng_reh = 200\ng_s_reh = 190\nT_bbn_GeV = 0.01\n\n" + con + star},
		{"temperature", []string{"--w-reh", "0", "--T-reh-GeV", "1e9", "--g-reh", "120"},
			"[[reheating]]\nhistory = \"temperature\"\nw_reh = 0\nT_reh_GeV = 1e9\ng_reh = 120\n\n" + con + star},
		{"duration", []string{"--w-reh", "0.2", "--N-reh", "12"}, "[[reheating]]\nhistory = \"duration\"\nw_reh = 0.2\nN_reh = 12\n\n" + con + star},
		{"kination", []string{"--kination", "--T-reh-GeV", "1e7"}, "[[reheating]]\nhistory = \"kination\"\nT_reh_GeV = 1e7\n\n" + con + star},
		{"band", []string{"--band", "--w-reh-min", "0.1", "--w-reh-max", "0.3", "--n-w", "3", "--n-T", "4", "--T-min-GeV", "1"},
			"[[reheating]]\nhistory = \"band\"\nw_reh_min = 0.1\nw_reh_max = 0.3\nn_w = 3\nn_T = 4\nT_min_GeV = 1\n\n" + con + star},
		{"constraints and forecasts", []string{"--efolds", "55", "--constraint", "planck2018-bk18", "--constraint", "act-dr6-bk18-2025", "--constraint-file", setPath, "--forecast", "litebird", "--forecast", "cmb-s4"},
			"[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n\n[[constraint]]\nuse = \"planck2018-bk18\"\n[[constraint]]\nuse = \"act-dr6-bk18-2025\"\n[[constraint]]\nfile = \"set.toml\"\n\n[[forecast]]\nuse = \"litebird\"\n[[forecast]]\nuse = \"cmb-s4\"\n\n" + star},
		{"end epsilon_H=1 and a label", []string{"--efolds", "55", "--end", "epsilon_H=1", "--label", "R^2"},
			"[slow_roll]\nend = \"epsilon_H=1\"\n[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n\n" + con + "[[model]]\nfamily = \"starobinsky\"\nlabel = \"R^2\"\n"},
		{"end at a field value, second order, A_s", []string{"--efolds", "55", "--method", "second", "--end", "field", "--end-phi", "0.9", "--A_s", "2.2e-9"},
			"[slow_roll]\nmethod = \"second\"\nend = \"field\"\nend_phi = 0.9\n[normalisation]\nA_s = 2.2e-9\n[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n\n" + con + star},
		{"family parameters and range", []string{"--family", "e-model", "--param", "alpha=1/3", "--param", "n=1", "--field-range", "0,20", "--w-reh", "0", "--T-reh-GeV", "1e6"},
			"[[reheating]]\nhistory = \"temperature\"\nw_reh = 0\nT_reh_GeV = 1e6\n\n" + con + "[[model]]\nfamily = \"e-model\"\nalpha = \"1/3\"\nn = 1\nfield_range = [0, 20]\n"},
	}
	for i, c := range cases {
		args := append([]string{"predict", "--json"}, c.args...)
		if !contains(c.args, "--family") {
			args = append(args, "--family", "starobinsky")
		}
		out, errs, code := h.run(args...)
		if code != 0 {
			t.Errorf("%s: predict exit %d: %s", c.name, code, errs)
			continue
		}
		var got []map[string]any
		var one map[string]any
		if json.Unmarshal([]byte(out), &one) == nil {
			got = []map[string]any{one}
		} else if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Errorf("%s: predict --json is neither an object nor a list: %v\n%s", c.name, err, out)
			continue
		}
		text := c.toml
		if !strings.HasPrefix(text, "[slow_roll]") {
			text = studyHead + text
		}
		p := filepath.Join(h.dir, "study-"+string(rune('a'+i))+".toml")
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		out, errs, code = h.run("run", p, "--json")
		if code != 0 {
			t.Errorf("%s: run exit %d: %s", c.name, code, errs)
			continue
		}
		var want struct {
			Results []map[string]any `json:"results"`
		}
		if err := json.Unmarshal([]byte(out), &want); err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want.Results) {
			t.Errorf("%s: predict\n%v\nrun\n%v", c.name, got, want.Results)
		}
		if len(got) > 1 && len(got) != strings.Count(text, "[[constraint]]")+strings.Count(text, "[[forecast]]") {
			t.Errorf("%s: %d results, want one per constraint set and forecast", c.name, len(got))
		}
	}
}

func contains(list []string, s string) bool {
	for _, e := range list {
		if e == s {
			return true
		}
	}
	return false
}

// TestPredictNStarFollowsReheating: the e-folds of the pivot move with the
// reheating history as the matching condition says (common practice;
// Liddle & Leach 2003, astro-ph/0305263): an era softer than radiation
// (w_reh = 0) lowers N* below instantaneous reheating, the more the longer
// it lasts (the lower T_reh); a stiff era (kination, w_reh = 1) raises it;
// a radiation-like era (w_reh = 1/3) leaves it where instantaneous
// reheating puts it. Quantitatively, with the era's density falling as
// a^-3(1+w) from rho_end to rho_reh (the same g at both ends, so that
// rho_end/rho_reh = (T_max/T_reh)^4 with T_max the instantaneous
// temperature),
//
//	N* = ln(a_0 T_0/k*) + (1/3) ln(g_s0/g_s,reh) + ln(H*/T_max)
//	     - (1-3w)/(3(1+w)) ln(T_max/T_reh),
//
// so N* - ln(H*/T_max) + (1-3w)/(3(1+w)) ln(T_max/T_reh) is the same
// number for every history of one set of thermal inputs.
func TestPredictNStarFollowsReheating(t *testing.T) {
	h := newHarness(t)
	type pred struct{ n, h, tmax, treh float64 }
	predict := func(args ...string) pred {
		t.Helper()
		out, errs, code := h.run(append([]string{"predict", "--family", "starobinsky", "--json"}, args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		var r map[string]any
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		p := pred{n: r["N_star"].(float64), h: r["H_star_GeV"].(float64), treh: r["T_reh_GeV"].(float64)}
		p.tmax = p.treh // instantaneous: T_reh is the maximum
		if m, ok := r["T_max_GeV"].(float64); ok {
			p.tmax = m
		}
		return p
	}
	invariant := func(p pred, w float64) float64 {
		return p.n - math.Log(p.h/p.tmax) + (1-3*w)/(3*(1+w))*math.Log(p.tmax/p.treh)
	}
	inst := predict("--instantaneous")
	if def := predict(); def != inst {
		t.Errorf("no reheating flag gives %+v, --instantaneous %+v", def, inst)
	}
	want := invariant(inst, 1.0/3)
	// Tolerance 1e-6 e-folds: the N* iteration converges far below it.
	const tol = 1e-6
	prev := inst.n
	for _, T := range []string{"1e14", "1e9", "1e3", "1e-2"} {
		p := predict("--w-reh", "0", "--T-reh-GeV", T)
		if !(p.n < prev) {
			t.Errorf("w_reh = 0, T_reh = %s GeV: N* = %v, want below %v (instantaneous or a hotter T_reh)", T, p.n, prev)
		}
		prev = p.n
		if got := invariant(p, 0); math.Abs(got-want) > tol {
			t.Errorf("w_reh = 0, T_reh = %s GeV: matching invariant %v, instantaneous %v", T, got, want)
		}
	}
	if inst.n-prev < 10 {
		t.Errorf("w_reh = 0 down to 10 MeV lowers N* by only %v e-folds", inst.n-prev)
	}
	kin := predict("--kination", "--T-reh-GeV", "1e7")
	if !(kin.n > inst.n) {
		t.Errorf("kination to 1e7 GeV: N* = %v, want above instantaneous %v", kin.n, inst.n)
	}
	if got := invariant(kin, 1); math.Abs(got-want) > tol {
		t.Errorf("kination: matching invariant %v, instantaneous %v", got, want)
	}
	for _, T := range []string{"1e12", "1e3"} {
		if p := predict("--w-reh", "0.3333333333333333", "--T-reh-GeV", T); math.Abs(p.n-inst.n) > tol {
			t.Errorf("w_reh = 1/3, T_reh = %s GeV: N* = %v, want instantaneous %v", T, p.n, inst.n)
		}
	}
	// A duration of zero e-folds is instantaneous reheating.
	if p := predict("--w-reh", "0", "--N-reh", "0"); math.Abs(p.n-inst.n) > tol {
		t.Errorf("N_reh = 0: N* = %v, want instantaneous %v", p.n, inst.n)
	}
}
