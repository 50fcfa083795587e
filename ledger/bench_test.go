package ledger

import (
	"fmt"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

// BenchmarkRecordNode records one new computed node per iteration: twelve
// outputs, one input, in its own transaction, including the ledger's
// verification of the record. Target: well under 1 ms per node, so the
// ledger never dominates a stage that takes milliseconds.
func BenchmarkRecordNode(b *testing.B) {
	l, _ := openTest(b)
	run := beginRun(b, l, "bench", testClock)
	root := mkNode(b, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(b, l, run, root, pipeline.Computed)
	outputs := pipeline.Values{}
	for i := range 12 {
		outputs[fmt.Sprintf("out%02d", i)] = pipeline.Float(0.1*float64(i+1)/3, pipeline.UnitNone)
	}
	recs := make([]pipeline.NodeRecord, b.N)
	for i := range recs {
		recs[i] = mkNode(b, "slowroll", pipeline.Values{"N": num(float64(i))}, outputs, root)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := range b.N {
		if err := l.RecordNode(ctx, run, recs[i], pipeline.Computed); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLookup reads back and verifies one stored node per iteration.
func BenchmarkLookup(b *testing.B) {
	l, _ := openTest(b)
	run := beginRun(b, l, "bench", testClock)
	root := mkNode(b, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(b, l, run, root, pipeline.Computed)
	outputs := pipeline.Values{}
	for i := range 12 {
		outputs[fmt.Sprintf("out%02d", i)] = pipeline.Float(0.1*float64(i+1)/3, pipeline.UnitNone)
	}
	n := mkNode(b, "slowroll", pipeline.Values{"N": num(60)}, outputs, root)
	record(b, l, run, n, pipeline.Computed)
	b.ReportAllocs()
	for b.Loop() {
		if _, ok, err := l.Lookup(ctx, n.Key); err != nil || !ok {
			b.Fatal(ok, err)
		}
	}
}

// BenchmarkRecordNodesBatched records computed nodes (twelve outputs, one
// input, their outputs' text handed over as the engine does) in
// transactions of 10000, the engine's batch, reporting nodes per second.
// Target: above 50,000 nodes per second.
func BenchmarkRecordNodesBatched(b *testing.B) {
	l, _ := openTest(b)
	run := beginRun(b, l, "bench", testClock)
	root := mkNode(b, "model", pipeline.Values{"x": num(1)}, pipeline.Values{"y": num(2)})
	record(b, l, run, root, pipeline.Computed)
	outputs := pipeline.Values{}
	for i := range 12 {
		outputs[fmt.Sprintf("out%02d", i)] = pipeline.Float(0.1*float64(i+1)/3, pipeline.UnitNone)
	}
	text, err := outputs.Encode()
	if err != nil {
		b.Fatal(err)
	}
	const size = 10000
	recs := make([]pipeline.Recorded, b.N*size)
	for i := range recs {
		recs[i] = pipeline.Recorded{Node: mkNode(b, "slowroll", pipeline.Values{"N": num(float64(i))}, outputs, root), Action: pipeline.Computed, OutputsText: text}
	}
	b.ResetTimer()
	for i := range b.N {
		if err := l.RecordNodes(ctx, run, recs[i*size:(i+1)*size]); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.N*size)/b.Elapsed().Seconds(), "nodes/s")
}
