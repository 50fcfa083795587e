package root

import (
	"encoding/json"
	"fmt"
	"strings"
	"testing"
)

// rowsStudy gives three results: two models at one N*, one at another.
const rowsStudy = `title = "rows"

[[reheating]]
history = "fixed-efolds"
N_star = 55

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = 1
n = 1

[[model]]
family = "t-model"
alpha = 3
n = 1

[[model]]
family = "starobinsky"
`

type rowResult struct {
	Key   string  `json:"key"`
	Error string  `json:"error"`
	Row   *int    `json:"row"`
	Ns    float64 `json:"n_s"`
}

// traceKey is the result key trace RESULT --json names.
func (h *harness) traceKey(result string) string {
	h.t.Helper()
	var tr struct {
		Result string `json:"result"`
	}
	if err := json.Unmarshal([]byte(h.mustRun("trace", result, "--json")), &tr); err != nil {
		h.t.Fatal(err)
	}
	return tr.Result
}

// runs --json names, for a run re-run from another, that run as
// derived_from and leaves the field out for a run of a file; the text
// table shows the same in its derived_from column.
func TestRunsListDerivedFrom(t *testing.T) {
	h := newHarness(t)
	first := h.runJSON("run", h.write("study.toml", reviseStudy)).Run
	second := h.runJSON("run", "--from", "latest", "--set", "reheating[0].N_star=60").Run
	var rows []map[string]any
	if err := json.Unmarshal([]byte(h.mustRun("runs", "--json")), &rows); err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 {
		t.Fatalf("runs --json listed %d runs, want 2", len(rows))
	}
	byRun := map[string]map[string]any{}
	for _, r := range rows {
		byRun[r["run"].(string)] = r
	}
	if got := byRun[second]["derived_from"]; got != first {
		t.Errorf("run %s: derived_from %v, want %s", second, got, first)
	}
	if got, ok := byRun[first]["derived_from"]; ok {
		t.Errorf("run %s, of a file, has derived_from %v; want the field omitted", first, got)
	}
	out := h.mustRun("runs")
	header, cells := derivedTableCells(t, out)
	col := -1
	for i, c := range header {
		if c == "from" {
			col = i
		}
	}
	if col < 0 {
		t.Fatalf("runs header %v has no from column", header)
	}
	want := map[string]string{first: "", second: first}
	for _, c := range cells {
		if c[col] != want[c[0]] {
			t.Errorf("runs table: run %s derived_from cell %q, want %q", c[0], c[col], want[c[0]])
		}
	}
}

// Each run --json result's row is its position, from 1, among the run's
// results, and trace RUN#row names that very result's key; predict --json
// gives its single result row 1, which traces to its key too.
func TestRunJSONRows(t *testing.T) {
	h := newHarness(t)
	var out struct {
		Run     string      `json:"run"`
		Results []rowResult `json:"results"`
	}
	text := h.mustRun("run", h.write("rows.toml", rowsStudy), "--json")
	if err := json.Unmarshal([]byte(text), &out); err != nil {
		t.Fatalf("%v\n%s", err, text)
	}
	if len(out.Results) != 3 {
		t.Fatalf("%d results, want 3:\n%s", len(out.Results), text)
	}
	seen := map[string]bool{}
	n := 0
	for i, r := range out.Results {
		if r.Error != "" {
			if r.Row != nil {
				t.Errorf("failed result %d has row %d", i, *r.Row)
			}
			continue
		}
		n++
		if r.Row == nil || *r.Row != n {
			t.Errorf("result %d (%s): row %v, want %d", i, r.Key, r.Row, n)
			continue
		}
		if got := h.traceKey(fmt.Sprintf("%s#%d", out.Run, *r.Row)); got != r.Key {
			t.Errorf("trace %s#%d names %s, the result's key is %s", out.Run, *r.Row, got, r.Key)
		}
		seen[r.Key] = true
	}
	if len(seen) != 3 {
		t.Errorf("rows name %d distinct results, want 3", len(seen))
	}

	var p rowResult
	text = h.mustRun("predict", "--family", "e-model", "--param", "alpha=2", "--efolds", "50", "--json")
	if err := json.Unmarshal([]byte(text), &p); err != nil {
		t.Fatalf("%v\n%s", err, text)
	}
	if p.Row == nil || *p.Row != 1 {
		t.Fatalf("predict --json row %v, want 1", p.Row)
	}
	if got := h.traceKey("latest#1"); got != p.Key {
		t.Errorf("trace latest#1 names %s, predict's result key is %s", got, p.Key)
	}
}

// derivedTableCells splits tab-separated table output into its header and
// its rows of cells, failing when a row's width differs from the header's.
func derivedTableCells(t *testing.T, out string) ([]string, [][]string) {
	t.Helper()
	lines := strings.Split(strings.TrimRight(out, "\n"), "\n")
	header := strings.Split(lines[0], "\t")
	var rows [][]string
	for _, l := range lines[1:] {
		c := strings.Split(l, "\t")
		if len(c) != len(header) {
			t.Fatalf("row %q has %d cells, header %d", l, len(c), len(header))
		}
		rows = append(rows, c)
	}
	return header, rows
}
