package root

import (
	"encoding/json"
	"reflect"
	"strings"
	"testing"
)

// studyOne is a small study of one model at one reheating history.
const studyOne = `[[reheating]]
history = "instantaneous"

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "starobinsky"
`

type listedRun struct {
	Run    string   `json:"run"`
	Kind   string   `json:"kind"`
	Tags   []string `json:"tags"`
	Config string   `json:"config"`
}

func (h *harness) listRuns(args ...string) []listedRun {
	h.t.Helper()
	out := h.mustRun(append([]string{"runs", "--json"}, args...)...)
	var rs []listedRun
	if err := json.Unmarshal([]byte(out), &rs); err != nil {
		h.t.Fatalf("runs --json %v: %v\n%s", args, err, out)
	}
	return rs
}

// tagsByRun maps each listed run to its tags.
func tagsByRun(rs []listedRun) map[string][]string {
	m := map[string][]string{}
	for _, r := range rs {
		m[r.Run] = r.Tags
	}
	return m
}

// twoStudiesOnePredict records two study runs (a cold one and a warm one)
// and one predict run, and returns the ids of the study runs and the
// predict run.
func twoStudiesOnePredict(h *harness) (a, b, p string) {
	h.t.Helper()
	cfg := h.write("one.toml", studyOne)
	a = decodeRun(h.t, h.mustRun("run", cfg, "--json")).Run
	b = decodeRun(h.t, h.mustRun("run", cfg, "--json")).Run
	h.mustRun("predict", "--family", "starobinsky", "--efolds", "55")
	rs := h.listRuns()
	if len(rs) != 3 {
		h.t.Fatalf("%d runs listed, want 3", len(rs))
	}
	p = rs[0].Run // newest first
	if p == a || p == b {
		h.t.Fatalf("newest run %s is a study run", p)
	}
	return a, b, p
}

// A tag shows on the run it names and on no other, in the JSON list and in
// the table's tags column; untagged runs have an empty list, not null.
func TestRunsShowTags(t *testing.T) {
	h := newHarness(t)
	a, b, p := twoStudiesOnePredict(h)
	h.mustRun("tag", a, "paper-v1")
	h.mustRun("tag", a, "referee-2")
	got := tagsByRun(h.listRuns())
	want := map[string][]string{a: {"paper-v1", "referee-2"}, b: {}, p: {}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("tags %v, want %v", got, want)
	}
	out := h.mustRun("runs")
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 4 {
		t.Fatalf("runs printed %d lines, want a header and 3 runs:\n%s", len(lines), out)
	}
	header := strings.Split(lines[0], "\t")
	col := -1
	for i, c := range header {
		if c == "tags" {
			col = i
		}
	}
	if col < 0 {
		t.Fatalf("runs header %q has no tags column", lines[0])
	}
	for _, l := range lines[1:] {
		cells := strings.Split(l, "\t")
		want := ""
		if cells[0] == a {
			want = "paper-v1,referee-2"
		}
		if cells[col] != want {
			t.Errorf("run %s: tags cell %q, want %q", cells[0], cells[col], want)
		}
	}
}

// --kind predict lists exactly the predict run, --kind study exactly the
// two study runs, and the kind agrees with the configuration text each run
// recorded (predict's begins with its own comment line).
func TestRunsKind(t *testing.T) {
	h := newHarness(t)
	a, b, p := twoStudiesOnePredict(h)
	check := func(kind string, want ...string) {
		t.Helper()
		rs := h.listRuns("--kind", kind)
		var ids []string
		for _, r := range rs {
			ids = append(ids, r.Run)
			var shown struct {
				Config string `json:"config"`
			}
			if err := json.Unmarshal([]byte(h.mustRun("show", r.Run, "--json")), &shown); err != nil {
				t.Fatal(err)
			}
			isPredict := strings.HasPrefix(shown.Config, "# written by inflatrace predict")
			if isPredict != (r.Kind == "predict") {
				t.Errorf("run %s listed as kind %q, but its configuration begins %.40q", r.Run, r.Kind, shown.Config)
			}
			if kind != "all" && r.Kind != kind {
				t.Errorf("--kind %s listed run %s of kind %q", kind, r.Run, r.Kind)
			}
		}
		if !reflect.DeepEqual(ids, want) {
			t.Errorf("--kind %s listed %v, want %v", kind, ids, want)
		}
	}
	check("predict", p)
	check("study", b, a)
	check("all", p, b, a)
	if len(h.listRuns()) != 3 {
		t.Error("runs without --kind does not list every run")
	}
	_, errs, code := h.run("runs", "--kind", "studies")
	if code != 2 || !strings.Contains(errs, "--kind") || !strings.Contains(errs, "study, shard, predict or all") {
		t.Errorf("runs --kind studies: exit %d, %q; want 2 naming --kind and its values", code, errs)
	}
}

// A name held by another run is refused naming the holder and suggesting
// --move, and the tag stays where it was; tagging the holder again is a
// success that changes nothing; --move moves the tag.
func TestTagCollision(t *testing.T) {
	h := newHarness(t)
	a, b, p := twoStudiesOnePredict(h)
	h.mustRun("tag", a, "paper-v1")

	_, errs, code := h.run("tag", b, "paper-v1")
	if code != 2 || !strings.Contains(errs, a) || !strings.Contains(errs, "--move") {
		t.Errorf("tag over another run's name: exit %d, %q; want 2 naming run %s and --move", code, errs, a)
	}
	want := map[string][]string{a: {"paper-v1"}, b: {}, p: {}}
	if got := tagsByRun(h.listRuns()); !reflect.DeepEqual(got, want) {
		t.Errorf("after a refused tag: %v, want %v", got, want)
	}

	if _, errs, code := h.run("tag", "paper-v1", "paper-v1"); code != 0 {
		t.Errorf("re-tagging the holder (by its tag): exit %d, %s", code, errs)
	}
	if _, errs, code := h.run("tag", a, "paper-v1"); code != 0 {
		t.Errorf("re-tagging the holder: exit %d, %s", code, errs)
	}
	if got := tagsByRun(h.listRuns()); !reflect.DeepEqual(got, want) {
		t.Errorf("after re-tagging: %v, want %v", got, want)
	}

	h.mustRun("tag", b, "paper-v1", "--move")
	want = map[string][]string{a: {}, b: {"paper-v1"}, p: {}}
	if got := tagsByRun(h.listRuns()); !reflect.DeepEqual(got, want) {
		t.Errorf("after --move: %v, want %v", got, want)
	}

	_, errs, code = h.run("tag", a, "2026-final")
	if code != 2 || !strings.Contains(errs, "2026-final") {
		t.Errorf("tag with a name starting with a digit: exit %d, %q; want 2 naming it", code, errs)
	}
}
