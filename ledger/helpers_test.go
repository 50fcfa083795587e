package ledger

import (
	"context"
	"path/filepath"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

const testTool = "inflatrace test build"

// testClock is the clock the tests inject; it never moves.
var testClock = time.Date(2031, 5, 6, 7, 8, 9, 123456789, time.UTC)

func fixedClock() time.Time { return testClock }

// openTest opens a fresh ledger file in a temporary directory.
func openTest(t testing.TB) (*Ledger, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "ledger.db")
	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if err := l.Close(); err != nil {
			t.Error(err)
		}
	})
	return l, path
}

// mkNode builds a genuine computed node record: its description, key and
// output hash come from the pipeline's own functions.
func mkNode(t testing.TB, stage string, params, outputs pipeline.Values, inputs ...pipeline.NodeRecord) pipeline.NodeRecord {
	t.Helper()
	var refs []pipeline.InputRef
	for _, in := range inputs {
		refs = append(refs, pipeline.InputRef{Stage: in.Stage, Key: in.Key, Output: in.OutputHash})
	}
	desc, err := pipeline.Describe(testTool, stage, 3, params, refs)
	if err != nil {
		t.Fatal(err)
	}
	hash, _, err := pipeline.OutputHash(outputs)
	if err != nil {
		t.Fatal(err)
	}
	return pipeline.NodeRecord{
		Key:         pipeline.KeyOf(desc),
		Stage:       stage,
		Version:     3,
		Params:      params,
		Inputs:      refs,
		Description: desc,
		Outputs:     outputs,
		OutputHash:  hash,
		Status:      pipeline.NodeOK,
		Duration:    1234567 * time.Nanosecond,
	}
}

// asFailed turns a computed record into the record of the same node failing.
func asFailed(rec pipeline.NodeRecord, errText string) pipeline.NodeRecord {
	rec.Status = pipeline.NodeFailed
	rec.Outputs = nil
	rec.OutputHash = ""
	rec.Error = errText
	return rec
}

// withOutputs is rec with other outputs (and their genuine hash).
func withOutputs(t testing.TB, rec pipeline.NodeRecord, outputs pipeline.Values) pipeline.NodeRecord {
	t.Helper()
	hash, _, err := pipeline.OutputHash(outputs)
	if err != nil {
		t.Fatal(err)
	}
	rec.Outputs, rec.OutputHash = outputs, hash
	return rec
}

func runInfo(id string, started time.Time) pipeline.RunInfo {
	text := "[model]\nfamily = \"demo\"\n# run " + id + "\n"
	return pipeline.RunInfo{
		ID:          pipeline.RunID(id),
		Started:     started,
		ToolVersion: "v0.0.0-test",
		ConfigPath:  "configs/demo.toml",
		ConfigText:  text,
		ConfigHash:  pipeline.Sum([]byte(text)),
	}
}

func beginRun(t testing.TB, l *Ledger, id string, started time.Time) pipeline.RunID {
	t.Helper()
	info := runInfo(id, started)
	if err := l.BeginRun(context.Background(), info); err != nil {
		t.Fatal(err)
	}
	return info.ID
}

func record(t testing.TB, l *Ledger, run pipeline.RunID, rec pipeline.NodeRecord, action pipeline.Action) {
	t.Helper()
	if err := l.RecordNode(context.Background(), run, rec, action); err != nil {
		t.Fatal(err)
	}
}

var countedTables = []string{"runs", "nodes", "node_inputs", "run_nodes", "run_results"}

// rowCounts counts the rows of every data table.
func rowCounts(t testing.TB, l *Ledger) map[string]int {
	t.Helper()
	out := map[string]int{}
	for _, table := range countedTables {
		var n int
		if err := l.db.QueryRow("SELECT count(*) FROM " + table).Scan(&n); err != nil {
			t.Fatal(err)
		}
		out[table] = n
	}
	return out
}

func sameCounts(t testing.TB, before, after map[string]int) {
	t.Helper()
	for _, table := range countedTables {
		if before[table] != after[table] {
			t.Errorf("table %s: %d rows before, %d after", table, before[table], after[table])
		}
	}
}

func num(x float64) pipeline.Value { return pipeline.Float(x, pipeline.UnitNone) }

// chainAB records a node a and a node b fed by a in run and returns both.
func chainAB(t testing.TB, l *Ledger, run pipeline.RunID) (a, b pipeline.NodeRecord) {
	t.Helper()
	a = mkNode(t, "model", pipeline.Values{"family": pipeline.String("demo"), "param:alpha": num(2)},
		pipeline.Values{"v0": pipeline.Float(1e-10, pipeline.UnitMp4)})
	b = mkNode(t, "slowroll", pipeline.Values{"N": num(55)}, pipeline.Values{"ns": num(0.965), "r": num(0.004)}, a)
	record(t, l, run, a, pipeline.Computed)
	record(t, l, run, b, pipeline.Computed)
	return a, b
}
