package ledger

import (
	"context"
	"errors"
	"reflect"
	"sort"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// RunLineages gives, for every result of a run, the same nodes that
// Lineage gives one result at a time (a diamond with a shared root, and a
// failed branch), every input before the nodes it feeds; an unknown run
// wraps ErrNotFound; an edited output is refused.
func TestRunLineagesAgreesWithLineage(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	run := beginRun(t, l, "20261203T050000Z-aaaaaa", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	b := mkNode(t, "canonical", pipeline.Values{"k": num(0.05)}, pipeline.Values{"y": num(3)}, a)
	c := mkNode(t, "slowroll", pipeline.Values{"N": num(60)}, pipeline.Values{"y": num(4)}, a)
	d := mkNode(t, "compare", pipeline.Values{"set": pipeline.String("demo")}, pipeline.Values{"chi2": num(1.5)}, b, c)
	e := asFailed(mkNode(t, "slowroll", pipeline.Values{"N": num(900)}, pipeline.Values{"y": num(0)}, a), "inflation never ends")
	for _, n := range []pipeline.NodeRecord{a, b, c, d} {
		record(t, l, run, n, pipeline.Computed)
	}
	record(t, l, run, e, pipeline.Failed)
	refs := []pipeline.ResultRef{{Ordinal: 0, Label: "d", Key: d.Key}, {Ordinal: 1, Label: "c", Key: c.Key}}
	if err := l.RecordResults(ctx, run, refs); err != nil {
		t.Fatal(err)
	}
	if err := l.FinishRun(ctx, run, pipeline.RunSucceeded, testClock.Add(time.Second), ""); err != nil {
		t.Fatal(err)
	}
	got, err := l.RunLineages(ctx, run, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 {
		t.Fatalf("%d results, want 2", len(got))
	}
	for i, rl := range got {
		if rl.Ref != refs[i] {
			t.Errorf("result %d: %+v, want %+v", i, rl.Ref, refs[i])
		}
		one, err := l.Lineage(ctx, rl.Ref.Key)
		if err != nil {
			t.Fatal(err)
		}
		var want, have []string
		for _, n := range one {
			want = append(want, n.Stage+pipeline.FormatFloat(n.Outputs["y"].Float)+pipeline.FormatFloat(n.Outputs["chi2"].Float))
		}
		pos := map[string]int{}
		for k, n := range rl.Nodes {
			have = append(have, n.Stage+pipeline.FormatFloat(n.Outputs["y"].Float)+pipeline.FormatFloat(n.Outputs["chi2"].Float))
			pos[n.Stage] = k
		}
		sort.Strings(want)
		sort.Strings(have)
		if !reflect.DeepEqual(want, have) {
			t.Errorf("result %s: RunLineages %v, Lineage %v", rl.Ref.Label, have, want)
		}
		if pos["model"] != 0 || rl.Nodes[len(rl.Nodes)-1].Stage != map[int]string{0: "compare", 1: "slowroll"}[i] {
			t.Errorf("result %s: nodes %v not inputs first", rl.Ref.Label, have)
		}
	}
	if _, err := l.RunLineages(ctx, "20261203T050001Z-nosuch", nil); !errors.Is(err, ErrNotFound) {
		t.Errorf("unknown run: %v", err)
	}
	if _, err := l.db.Exec("UPDATE nodes SET outputs = replace(outputs, '1.5', '0.5') WHERE stage = 'compare'"); err != nil {
		t.Fatal(err)
	}
	if _, err := l.RunLineages(ctx, run, nil); !errors.Is(err, ErrIntegrity) {
		t.Errorf("edited outputs: %v, want ErrIntegrity", err)
	}
}
