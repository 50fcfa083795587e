package pipeline

import (
	"context"
	"fmt"
	"testing"
	"time"
)

// link is a toy stage for scan-shaped graphs: y = k * (input y) + 1, with
// its name and its upstream stage's name as fields.
type link struct{ name, up string }

func (l link) Spec() Spec {
	s := Spec{Name: l.name, Version: 1, Params: []ParamSpec{{Name: "k", Kind: KindFloat, Unit: UnitNone}}}
	if l.up != "" {
		s.Inputs = []string{l.up}
	}
	return s
}

func (l link) Run(_ context.Context, p Values, in []Values) (Values, error) {
	k, _ := p.Num("k")
	y := 1.0
	if len(in) > 0 {
		y, _ = in[0].Num("y")
	}
	return Values{"y": Float(k*y+1, UnitNone), "k": Float(k, UnitNone), "label": String(l.name)}, nil
}

// scanChain is a graph of points chains of five nodes (the shape of a
// first-order scan: model, canonical, slowroll, reheat, compare), point
// offset..offset+points-1.
func scanChain(tb testing.TB, offset, points int) *Graph {
	g := &Graph{}
	stages := []link{{"m", ""}, {"c", "m"}, {"s", "c"}, {"r", "s"}, {"x", "r"}}
	for p := offset; p < offset+points; p++ {
		prev := -1
		for j, st := range stages {
			var in []int
			if prev >= 0 {
				in = []int{prev}
			}
			i, err := g.Add(st, Values{"k": Float(float64(p)+float64(j)/10, UnitNone)}, st.name, in...)
			if err != nil {
				tb.Fatal(err)
			}
			prev = i
		}
		g.MarkResult(fmt.Sprint(p), prev)
	}
	return g
}

// runScan runs chunks graphs as one session, as the CLI runs a scan.
func runScan(tb testing.TB, rec Recorder, id RunID, chunks []*Graph, opts Options) Report {
	tb.Helper()
	sess, err := Begin(context.Background(), rec, RunInfo{ID: id}, opts)
	if err != nil {
		tb.Fatal(err)
	}
	for _, g := range chunks {
		if _, err := sess.Execute(context.Background(), g); err != nil {
			tb.Fatal(err)
		}
	}
	if _, err := sess.Finish(context.Background(), nil); err != nil {
		tb.Fatal(err)
	}
	return sess.Totals
}

// BenchmarkSchedulerCold and BenchmarkSchedulerWarm measure the engine's
// own cost a node, apart from SQLite and the numerics: a 10,000-point
// scan of five-node chains (two chunks, as the CLI runs it) on an
// in-memory recorder with batched writes and look-ups, two workers.
func BenchmarkSchedulerCold(b *testing.B) { benchScheduler(b, false) }

// BenchmarkSchedulerWarm: the same scan re-run on a recorder holding it.
func BenchmarkSchedulerWarm(b *testing.B) { benchScheduler(b, true) }

func benchScheduler(b *testing.B, warm bool) {
	const points, chunk = 10000, 5000
	var chunks []*Graph
	for off := 0; off < points; off += chunk {
		chunks = append(chunks, scanChain(b, off, chunk))
	}
	opts := Options{Jobs: 2, Tool: "bench/1", Now: time.Now, Batch: 20000}
	var rec *lookupMem
	fresh := func() { rec = &lookupMem{batchMem: &batchMem{memRecorder: newMem()}} }
	fresh()
	if warm {
		runScan(b, rec, "warmup", chunks, opts)
		rec.calls = 0
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if !warm {
			b.StopTimer()
			fresh()
			b.StartTimer()
		}
		tot := runScan(b, rec, RunID(fmt.Sprint("r", i)), chunks, opts)
		if warm && tot.Reused != 5*points || !warm && tot.Computed != 5*points {
			b.Fatalf("computed %d reused %d", tot.Computed, tot.Reused)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*5*points), "ns/node")
	b.ReportMetric(float64(rec.calls)/float64(max(b.N, 1)), "lookups/run")
}
