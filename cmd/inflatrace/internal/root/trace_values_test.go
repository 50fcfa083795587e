package root

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tracecmd"
	"github.com/inflatrace/inflatrace/pipeline"
)

// traceJSON is the shape of trace --json.
type traceJSON struct {
	Result  string `json:"result"`
	Label   string `json:"label"`
	Lineage []struct {
		Stage   string                     `json:"stage"`
		Outputs map[string]tracecmd.Output `json:"outputs"`
	} `json:"lineage"`
}

// resultOutputs are the outputs of the reheat node of a traced result,
// where n_s, r and the energy scales are computed.
func resultOutputs(t *testing.T, tr traceJSON) map[string]tracecmd.Output {
	t.Helper()
	for _, n := range tr.Lineage {
		if n.Stage == "reheat" {
			return n.Outputs
		}
	}
	t.Fatalf("lineage of %s has no reheat node", tr.Result)
	return nil
}

// TestTraceShowsValues: trace RUN#N lists every node's outputs with their
// units, and for each N the n_s, r and V*^1/4 it shows are the values run
// --json gave for the N-th result, in JSON to the bit and in text to ten
// digits.
func TestTraceShowsValues(t *testing.T) {
	h := newHarness(t)
	res := decodeRun(t, h.mustRun("run", demoPath(t), "--json")).Results
	for _, n := range []int{1, 7, 30, len(res)} {
		ref := fmt.Sprintf("latest#%d", n)
		var tr traceJSON
		if err := json.Unmarshal([]byte(h.mustRun("trace", ref, "--json")), &tr); err != nil {
			t.Fatal(err)
		}
		want := res[n-1]
		if tr.Result != want["key"] || tr.Label != want["label"] {
			t.Fatalf("%s traces %s %q, run --json row %d is %v %q", ref, tr.Result, tr.Label, n, want["key"], want["label"])
		}
		for _, node := range tr.Lineage {
			if len(node.Outputs) == 0 {
				t.Errorf("%s: %s node has no outputs", ref, node.Stage)
			}
		}
		outs := resultOutputs(t, tr)
		text := h.mustRun("trace", ref)
		for name, unit := range map[string]string{"n_s": "1", "r": "1", "energy_scale_GeV": "GeV", "N_star": "1"} {
			o, ok := outs[name]
			if !ok {
				t.Fatalf("%s: reheat outputs lack %s", ref, name)
			}
			if o.Value != want[name] || o.Unit != unit {
				t.Errorf("%s: %s = %v [%s], run --json has %v [%s]", ref, name, o.Value, o.Unit, want[name], unit)
			}
			line := fmt.Sprintf(" %s = %s", name, tracecmd.ReadableValue(pipeline.Float(want[name].(float64), unit)))
			if !strings.Contains(strings.Join(strings.Fields(text), " "), line) {
				t.Errorf("%s: text lacks %q", ref, line)
			}
		}
	}
}

// TestShowRowIsTraceN: the # column of show's results table is the N that
// trace accepts: the row numbered N shows the n_s that trace RUN#N gives.
func TestShowRowIsTraceN(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", demoPath(t))
	show := h.mustRun("show", "latest")
	_, table, ok := strings.Cut(show, "# results (64)\n")
	if !ok {
		t.Fatalf("show has no results section:\n%s", show)
	}
	lines := strings.Split(table, "\n")
	header := strings.Split(lines[0], "\t")
	col := map[string]int{}
	for i, c := range header {
		col[c] = i
	}
	if header[0] != "#" {
		t.Fatalf("results header %v does not start with #", header)
	}
	seen := 0
	for _, line := range lines[1:65] {
		cells := strings.Split(line, "\t")
		n, err := strconv.Atoi(cells[0])
		if err != nil {
			t.Fatalf("row %q: # is %q", line, cells[0])
		}
		seen++
		if n != seen {
			t.Errorf("row %d numbered %d", seen, n)
		}
		if n%9 != 1 { // a sample of rows, each traced
			continue
		}
		var tr traceJSON
		if err := json.Unmarshal([]byte(h.mustRun("trace", fmt.Sprintf("latest#%d", n), "--json")), &tr); err != nil {
			t.Fatal(err)
		}
		ns := resultOutputs(t, tr)["n_s"].Value.(float64)
		if got := fmt.Sprintf("%.5f", ns); got != cells[col["n_s"]] {
			t.Errorf("show row #%d has n_s %s, trace latest#%d gives %s", n, cells[col["n_s"]], n, got)
		}
		if !strings.HasPrefix(tr.Label, cells[col["label"]]) {
			t.Errorf("show row #%d has label %q, trace gives result %q", n, cells[col["label"]], tr.Label)
		}
	}
	if seen != 64 {
		t.Errorf("%d numbered rows, want 64", seen)
	}
}

// TestTraceBareRunIsUsage: trace RUN without #N is refused with exit 2
// and a hint naming the range of N; so is N past the last result.
func TestTraceBareRunIsUsage(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", demoPath(t))
	for _, ref := range []string{"latest", "latest#65"} {
		_, errs, code := h.run("trace", ref)
		if code != 2 {
			t.Errorf("trace %s: exit %d, want 2", ref, code)
		}
		if !strings.Contains(errs, "trace needs one result: RUN#N, N from 1 to 64 (the # column") {
			t.Errorf("trace %s: no hint in %q", ref, errs)
		}
	}
}

// TestModelLabelShown: the [[model]] label of a study is in run's and
// show's tables and in table's default CSV, under the family it names.
func TestModelLabelShown(t *testing.T) {
	h := newHarness(t)
	study := h.write("labelled.toml", `
[slow_roll]
method = "first"
end = "epsilon_V=1"

[normalisation]
A_s = 2.1e-9

[[reheating]]
history = "fixed-efolds"
N_star = [50, 60]

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "power-law"
label = "Chaotic (quadratic)"
p = 2
`)
	runOut := h.mustRun("run", study)
	show := h.mustRun("show", "latest")
	for name, out := range map[string]string{"run": runOut, "show": show} {
		if !strings.Contains(out, "1\tChaotic (quadratic)\tpower-law\t") || !strings.Contains(out, "2\tChaotic (quadratic)\tpower-law\t") {
			t.Errorf("%s: rows lack # and label:\n%s", name, out)
		}
	}
	recs, err := csv.NewReader(strings.NewReader(h.mustRun("table", "latest", "--format", "csv"))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 3 || recs[0][0] != "row" || recs[0][1] != "model_label" {
		t.Fatalf("table csv: %v", recs)
	}
	for k, rec := range recs[1:] {
		if rec[0] != strconv.Itoa(k+1) || rec[1] != "Chaotic (quadratic)" || rec[2] != "power-law" {
			t.Errorf("table csv row %d: %v", k+1, rec)
		}
	}
}
