package ledger

import (
	"context"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

var ctx = context.Background()

func TestComputedRoundTrip(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"family": pipeline.String("demo \"quoted\"\nline two ✓"), "param:alpha": num(1.0 / 3)},
		pipeline.Values{"v0": pipeline.Float(2.1e-9, pipeline.UnitMp4)})
	record(t, l, run, a, pipeline.Computed)
	// Outputs whose text forms are easy to get wrong.
	outputs := pipeline.Values{
		"third":     num(1.0 / 3),
		"negzero":   num(math.Copysign(0, -1)),
		"subnormal": num(5e-324),
		"huge":      num(math.MaxFloat64),
		"sum":       num(0.1 + 0.2),
		"avogadro":  pipeline.Float(6.02214076e23, pipeline.UnitPerMpc),
		"tiny":      pipeline.Float(-1.2345678901234567e-300, pipeline.UnitGeV),
		"label":     pipeline.String("tab\there, quote \" and é"),
		"empty":     pipeline.String(""),
	}
	b := mkNode(t, "slowroll", pipeline.Values{"N": num(60)}, outputs, a)
	record(t, l, run, b, pipeline.Computed)

	for _, want := range []pipeline.NodeRecord{a, b} {
		got, ok, err := l.Lookup(ctx, want.Key)
		if err != nil || !ok {
			t.Fatalf("Lookup(%s) = %v, %v", want.Key, ok, err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("Lookup(%s):\n got %+v\nwant %+v", want.Key, got, want)
		}
		for name, v := range want.Outputs {
			if v.Kind == pipeline.KindFloat && math.Float64bits(got.Outputs[name].Float) != math.Float64bits(v.Float) {
				t.Errorf("output %s: bits %x, want %x", name, math.Float64bits(got.Outputs[name].Float), math.Float64bits(v.Float))
			}
		}
	}
}

func TestLookupMissing(t *testing.T) {
	l, _ := openTest(t)
	key := pipeline.KeyOf("nothing recorded")
	if _, ok, err := l.Lookup(ctx, key); ok || err != nil {
		t.Errorf("Lookup of an unrecorded key = %v, %v; want a miss without error", ok, err)
	}
}

func TestLookupIgnoresFailed(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	failed := asFailed(a, "inflation never ends for phi > 12.3")
	record(t, l, run, failed, pipeline.Failed)
	if _, ok, err := l.Lookup(ctx, a.Key); ok || err != nil {
		t.Errorf("Lookup of a failed node = %v, %v; want a miss", ok, err)
	}
	got, ok, err := l.Node(ctx, a.Key)
	if err != nil || !ok {
		t.Fatalf("Node = %v, %v", ok, err)
	}
	if !reflect.DeepEqual(got, failed) {
		t.Errorf("Node:\n got %+v\nwant %+v", got, failed)
	}
}

func TestFailedThenOKReplaces(t *testing.T) {
	l, _ := openTest(t)
	r1 := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l, r1, a, pipeline.Computed)
	b := mkNode(t, "slowroll", pipeline.Values{"N": num(50)}, pipeline.Values{"ns": num(0.96)}, a)
	record(t, l, r1, asFailed(b, "solver did not converge"), pipeline.Failed)
	before := rowCounts(t, l)

	r2 := beginRun(t, l, "r2", testClock.Add(time.Minute))
	record(t, l, r2, b, pipeline.Computed)
	got, ok, err := l.Lookup(ctx, b.Key)
	if err != nil || !ok {
		t.Fatalf("Lookup after the successful recomputation = %v, %v", ok, err)
	}
	if !reflect.DeepEqual(got, b) {
		t.Errorf("Lookup:\n got %+v\nwant %+v", got, b)
	}
	after := rowCounts(t, l)
	if after["nodes"] != before["nodes"] || after["node_inputs"] != before["node_inputs"] {
		t.Errorf("replacement added rows: nodes %d→%d, inputs %d→%d", before["nodes"], after["nodes"], before["node_inputs"], after["node_inputs"])
	}
	// Run 1 still says it failed, with its error.
	rns, err := l.RunNodes(ctx, r1)
	if err != nil {
		t.Fatal(err)
	}
	if len(rns) != 2 || rns[1].Action != pipeline.Failed || rns[1].RunError != "solver did not converge" || rns[1].Status != pipeline.NodeOK {
		t.Errorf("run 1 nodes after replacement: %+v", rns)
	}
}

func TestFailedTwiceKeepsLatestError(t *testing.T) {
	l, _ := openTest(t)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	r1 := beginRun(t, l, "r1", testClock)
	record(t, l, r1, asFailed(a, "first failure"), pipeline.Failed)
	r2 := beginRun(t, l, "r2", testClock.Add(time.Second))
	record(t, l, r2, asFailed(a, "second failure"), pipeline.Failed)
	got, _, err := l.Node(ctx, a.Key)
	if err != nil {
		t.Fatal(err)
	}
	if got.Status != pipeline.NodeFailed || got.Error != "second failure" {
		t.Errorf("node after two failures: status %s error %q", got.Status, got.Error)
	}
	if n := rowCounts(t, l)["nodes"]; n != 1 {
		t.Errorf("%d node rows, want 1", n)
	}
}

func TestOKNeverBecomesFailed(t *testing.T) {
	l, _ := openTest(t)
	r1 := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l, r1, a, pipeline.Computed)
	r2 := beginRun(t, l, "r2", testClock.Add(time.Second))
	record(t, l, r2, asFailed(a, "out of memory"), pipeline.Failed)

	got, ok, err := l.Lookup(ctx, a.Key)
	if err != nil || !ok {
		t.Fatalf("Lookup after a later failure = %v, %v", ok, err)
	}
	if !reflect.DeepEqual(got, a) {
		t.Errorf("the ok node changed:\n got %+v\nwant %+v", got, a)
	}
	rns, err := l.RunNodes(ctx, r2)
	if err != nil {
		t.Fatal(err)
	}
	if len(rns) != 1 || rns[0].Action != pipeline.Failed || rns[0].RunError != "out of memory" {
		t.Errorf("run 2 did not record its failure: %+v", rns)
	}
}

func TestRecomputeSameOutputs(t *testing.T) {
	l, _ := openTest(t)
	r1 := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l, r1, a, pipeline.Computed)
	r2 := beginRun(t, l, "r2", testClock.Add(time.Second))
	again := a
	again.Duration = 42 * time.Millisecond
	record(t, l, r2, again, pipeline.Computed)
	c := rowCounts(t, l)
	if c["nodes"] != 1 || c["run_nodes"] != 2 {
		t.Errorf("counts after a second identical computation: %v", c)
	}
	got, _, err := l.Lookup(ctx, a.Key)
	if err != nil {
		t.Fatal(err)
	}
	if got.Duration != a.Duration {
		t.Errorf("the ok row was rewritten: duration %v, want %v", got.Duration, a.Duration)
	}
	rns, err := l.RunNodes(ctx, r2)
	if err != nil {
		t.Fatal(err)
	}
	if len(rns) != 1 || rns[0].RunDuration != 42*time.Millisecond || rns[0].Action != pipeline.Computed {
		t.Errorf("run 2 nodes: %+v", rns)
	}
}

func TestConflictingOutputsRefused(t *testing.T) {
	l, _ := openTest(t)
	r1 := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l, r1, a, pipeline.Computed)
	r2 := beginRun(t, l, "r2", testClock.Add(time.Second))
	before := rowCounts(t, l)

	other := withOutputs(t, a, pipeline.Values{"y": num(math.Nextafter(2, 3))})
	err := l.RecordNode(ctx, r2, other, pipeline.Computed)
	if err == nil {
		t.Fatal("a conflicting output was accepted")
	}
	if !errors.Is(err, ErrIntegrity) || !strings.Contains(err.Error(), "conflicting outputs for key "+string(a.Key)) {
		t.Errorf("error %q: want ErrIntegrity and 'conflicting outputs for key %s'", err, a.Key)
	}
	for _, h := range []pipeline.OutputID{a.OutputHash, other.OutputHash} {
		if !strings.Contains(err.Error(), string(h)) {
			t.Errorf("error %q does not show hash %s", err, h)
		}
	}
	sameCounts(t, before, rowCounts(t, l))
	if got, _, _ := l.Lookup(ctx, a.Key); got.OutputHash != a.OutputHash {
		t.Errorf("stored output hash changed to %s", got.OutputHash)
	}
}

// TestRefusedRecordsWriteNothing hands RecordNode records that are not
// genuine, or that contradict the ledger, and checks that each is refused
// with a saying error and that no table changed.
func TestRefusedRecordsWriteNothing(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a, _ := chainAB(t, l, run)
	good := mkNode(t, "reheat", pipeline.Values{"w": num(0)}, pipeline.Values{"Nre": num(10)}, a)
	unrecorded := mkNode(t, "model", pipeline.Values{"x": num(99)}, pipeline.Values{"y": num(1)})

	tamper := func(f func(*pipeline.NodeRecord)) pipeline.NodeRecord {
		rec := good
		rec.Params = pipeline.Values{"w": num(0)}
		rec.Inputs = append([]pipeline.InputRef(nil), good.Inputs...)
		f(&rec)
		return rec
	}
	for _, tc := range []struct {
		name      string
		rec       pipeline.NodeRecord
		action    pipeline.Action
		want      []string
		integrity bool
	}{
		{"tampered output hash", tamper(func(r *pipeline.NodeRecord) { r.OutputHash = a.OutputHash }), pipeline.Computed,
			[]string{"expected " + string(good.OutputHash), "found " + string(a.OutputHash)}, true},
		{"tampered outputs", tamper(func(r *pipeline.NodeRecord) { r.Outputs = pipeline.Values{"Nre": num(11)} }), pipeline.Computed,
			[]string{"output hash", "found " + string(good.OutputHash)}, true},
		{"tampered key", tamper(func(r *pipeline.NodeRecord) { r.Key = a.Key }), pipeline.Computed,
			[]string{"expected " + string(good.Key), "found " + string(a.Key)}, true},
		{"params disagree with description", tamper(func(r *pipeline.NodeRecord) { r.Params["w"] = num(1.0 / 3) }), pipeline.Computed,
			[]string{"description does not match", "0.3333333333333333"}, true},
		{"version disagrees with description", tamper(func(r *pipeline.NodeRecord) { r.Version = 4 }), pipeline.Computed,
			[]string{"description does not match", "version"}, true},
		{"input key not recorded", tamper(func(r *pipeline.NodeRecord) { r.Inputs[0].Key = unrecorded.Key }), pipeline.Computed,
			[]string{string(unrecorded.Key), "not found"}, false},
		{"failed with outputs", tamper(func(r *pipeline.NodeRecord) { r.Status = pipeline.NodeFailed; r.Error = "boom" }), pipeline.Failed,
			[]string{"carries outputs"}, false},
		{"failed without error", asFailed(good, ""), pipeline.Failed, []string{"error text"}, false},
		{"computed with failed status", asFailed(good, "boom"), pipeline.Computed, []string{"status"}, false},
		{"negative duration", tamper(func(r *pipeline.NodeRecord) { r.Duration = -time.Second }), pipeline.Computed, []string{"negative duration"}, false},
		{"non-finite output", withOutputs(t, good, pipeline.Values{"Nre": num(1)}), pipeline.Computed, nil, false},
		{"reused missing", unrecorded, pipeline.Reused, []string{string(unrecorded.Key), "not found"}, false},
		{"unknown action", good, pipeline.Action("skipped"), []string{"unknown action"}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if tc.name == "non-finite output" {
				tc.rec.Outputs = pipeline.Values{"Nre": num(math.NaN())}
				tc.want = []string{"not finite"}
			}
			before := rowCounts(t, l)
			err := l.RecordNode(ctx, run, tc.rec, tc.action)
			if err == nil {
				t.Fatal("accepted")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not contain %q", err, w)
				}
			}
			if tc.integrity != errors.Is(err, ErrIntegrity) {
				t.Errorf("errors.Is(%v, ErrIntegrity) = %v, want %v", err, !tc.integrity, tc.integrity)
			}
			sameCounts(t, before, rowCounts(t, l))
		})
	}
	// The untampered record is accepted, so the refusals above were about
	// the tampering.
	record(t, l, run, good, pipeline.Computed)
}

func TestInputOutputHashMustMatchLedger(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(t, l, run, a, pipeline.Computed)
	// A consumer built on outputs of a that the ledger never saw: key and
	// description agree, but the input's output hash is not a's.
	phantom := withOutputs(t, a, pipeline.Values{"y": num(3)})
	b := mkNode(t, "slowroll", pipeline.Values{"N": num(50)}, pipeline.Values{"ns": num(0.96)}, phantom)
	before := rowCounts(t, l)
	err := l.RecordNode(ctx, run, b, pipeline.Computed)
	if err == nil || !errors.Is(err, ErrIntegrity) || !strings.Contains(err.Error(), "expected "+string(a.OutputHash)) {
		t.Errorf("RecordNode = %v, want an integrity error expecting %s", err, a.OutputHash)
	}
	sameCounts(t, before, rowCounts(t, l))
}

func TestReusedNeedsAnOKNode(t *testing.T) {
	l, _ := openTest(t)
	r1 := beginRun(t, l, "r1", testClock)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	b := mkNode(t, "model", pipeline.Values{"x": num(2)}, pipeline.Values{"y": num(3)})
	record(t, l, r1, a, pipeline.Computed)
	record(t, l, r1, asFailed(b, "boom"), pipeline.Failed)

	r2 := beginRun(t, l, "r2", testClock.Add(time.Second))
	before := rowCounts(t, l)
	if err := l.RecordNode(ctx, r2, b, pipeline.Reused); err == nil || !strings.Contains(err.Error(), "cannot be reused") {
		t.Errorf("reusing a failed node: %v", err)
	}
	wrong := a
	wrong.OutputHash = b.OutputHash
	if err := l.RecordNode(ctx, r2, wrong, pipeline.Reused); !errors.Is(err, ErrIntegrity) {
		t.Errorf("reusing with another output hash: %v, want ErrIntegrity", err)
	}
	sameCounts(t, before, rowCounts(t, l))

	reused := a
	reused.Duration = 3 * time.Microsecond
	record(t, l, r2, reused, pipeline.Reused)
	after := rowCounts(t, l)
	if after["nodes"] != before["nodes"] || after["run_nodes"] != before["run_nodes"]+1 {
		t.Errorf("reuse wrote %v, from %v; want one run_nodes row only", after, before)
	}
	rns, err := l.RunNodes(ctx, r2)
	if err != nil {
		t.Fatal(err)
	}
	if len(rns) != 1 || rns[0].Action != pipeline.Reused || rns[0].RunDuration != 3*time.Microsecond || rns[0].Duration != a.Duration {
		t.Errorf("run 2 nodes: %+v", rns)
	}
}

func TestRecordNodeNeedsARunningRun(t *testing.T) {
	l, _ := openTest(t)
	a := mkNode(t, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	err := l.RecordNode(ctx, "nope", a, pipeline.Computed)
	if !errors.Is(err, ErrNotFound) || !strings.Contains(err.Error(), "nope") {
		t.Errorf("recording into an unknown run: %v", err)
	}
	run := beginRun(t, l, "r1", testClock)
	record(t, l, run, a, pipeline.Computed)
	if err := l.RecordNode(ctx, run, a, pipeline.Computed); err == nil || !strings.Contains(err.Error(), "already recorded node") {
		t.Errorf("recording a key twice in one run: %v", err)
	}
	if err := l.FinishRun(ctx, run, pipeline.RunSucceeded, testClock.Add(time.Minute), ""); err != nil {
		t.Fatal(err)
	}
	b := mkNode(t, "model", pipeline.Values{"x": num(2)}, pipeline.Values{"y": num(2)})
	if err := l.RecordNode(ctx, run, b, pipeline.Computed); err == nil || !strings.Contains(err.Error(), "already finished") {
		t.Errorf("recording into a finished run: %v", err)
	}
	if _, ok, _ := l.Node(ctx, b.Key); ok {
		t.Error("the refused node was stored")
	}
}

func TestRunOrdinals(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a, b := chainAB(t, l, run)
	c := mkNode(t, "reheat", pipeline.Values{"w": num(1)}, nil, a)
	record(t, l, run, asFailed(c, "boom"), pipeline.Failed)
	rns, err := l.RunNodes(ctx, run)
	if err != nil {
		t.Fatal(err)
	}
	want := []pipeline.KeyID{a.Key, b.Key, c.Key}
	if len(rns) != len(want) {
		t.Fatalf("%d run nodes, want %d", len(rns), len(want))
	}
	for i, rn := range rns {
		if rn.Key != want[i] || rn.Ordinal != i {
			t.Errorf("run node %d: key %s ordinal %d, want %s %d", i, rn.Key.Short(), rn.Ordinal, want[i].Short(), i)
		}
	}
}

func TestBeginRun(t *testing.T) {
	l, _ := openTest(t)
	info := runInfo("r1", testClock)
	if err := l.BeginRun(ctx, info); err != nil {
		t.Fatal(err)
	}
	if err := l.BeginRun(ctx, info); err == nil || !strings.Contains(err.Error(), "r1 already exists") {
		t.Errorf("duplicate BeginRun: %v", err)
	}
	bad := runInfo("r2", testClock)
	bad.ConfigText += "# edited\n"
	if err := l.BeginRun(ctx, bad); !errors.Is(err, ErrIntegrity) {
		t.Errorf("BeginRun with a stale config hash: %v, want ErrIntegrity", err)
	}
	for _, id := range []string{"", " r3"} {
		if err := l.BeginRun(ctx, runInfo(id, testClock)); err == nil {
			t.Errorf("BeginRun accepted id %q", id)
		}
	}
	if err := l.BeginRun(ctx, runInfo("r4", time.Time{})); err == nil {
		t.Error("BeginRun accepted a zero start time")
	}
	if n := rowCounts(t, l)["runs"]; n != 1 {
		t.Errorf("%d runs stored, want 1", n)
	}
}

func TestFinishRun(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	if err := l.FinishRun(ctx, run, pipeline.RunRunning, testClock, ""); err == nil {
		t.Error("FinishRun accepted status running")
	}
	if err := l.FinishRun(ctx, run, pipeline.RunSucceeded, time.Time{}, ""); err == nil {
		t.Error("FinishRun accepted a zero finish time")
	}
	end := testClock.Add(90 * time.Second)
	if err := l.FinishRun(ctx, run, pipeline.RunFailed, end, "2 nodes failed"); err != nil {
		t.Fatal(err)
	}
	d, err := l.Run(ctx, run)
	if err != nil {
		t.Fatal(err)
	}
	if d.Status != pipeline.RunFailed || !d.Finished.Equal(end) || d.Error != "2 nodes failed" {
		t.Errorf("finished run: %+v", d)
	}
	if err := l.FinishRun(ctx, run, pipeline.RunSucceeded, end, ""); err == nil || !strings.Contains(err.Error(), "already finished") {
		t.Errorf("finishing twice: %v", err)
	}
	if err := l.FinishRun(ctx, "ghost", pipeline.RunSucceeded, end, ""); !errors.Is(err, ErrNotFound) {
		t.Errorf("finishing an unknown run: %v, want ErrNotFound", err)
	}
}

func TestRecordResults(t *testing.T) {
	l, _ := openTest(t)
	run := beginRun(t, l, "r1", testClock)
	a, b := chainAB(t, l, run)
	c := mkNode(t, "reheat", pipeline.Values{"w": num(1)}, nil, a)
	record(t, l, run, asFailed(c, "boom"), pipeline.Failed)
	other := mkNode(t, "model", pipeline.Values{"x": num(7)}, pipeline.Values{"y": num(1)})
	r0 := beginRun(t, l, "r0", testClock)
	record(t, l, r0, other, pipeline.Computed)

	for _, tc := range []struct {
		name string
		refs []pipeline.ResultRef
		want string
	}{
		{"node of another run", []pipeline.ResultRef{{Ordinal: 0, Label: "ns", Key: b.Key}, {Ordinal: 1, Label: "x", Key: other.Key}}, "not part of the run"},
		{"failed node", []pipeline.ResultRef{{Ordinal: 0, Label: "ns", Key: b.Key}, {Ordinal: 1, Label: "Nre", Key: c.Key}}, "never a result"},
		{"repeated ordinal", []pipeline.ResultRef{{Ordinal: 0, Label: "ns", Key: b.Key}, {Ordinal: 0, Label: "model", Key: a.Key}}, "result 0"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := rowCounts(t, l)
			err := l.RecordResults(ctx, run, tc.refs)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("RecordResults = %v, want an error containing %q", err, tc.want)
			}
			sameCounts(t, before, rowCounts(t, l))
		})
	}
	refs := []pipeline.ResultRef{{Ordinal: 1, Label: "model", Key: a.Key}, {Ordinal: 0, Label: "ns and r", Key: b.Key}}
	if err := l.RecordResults(ctx, run, refs); err != nil {
		t.Fatal(err)
	}
	got, err := l.RunResults(ctx, run)
	if err != nil {
		t.Fatal(err)
	}
	want := []pipeline.ResultRef{refs[1], refs[0]}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("RunResults = %+v, want %+v", got, want)
	}
}
