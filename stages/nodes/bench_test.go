package nodes

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// scanPoints is the number of E-model points (alpha log-spaced over
// [0.01, 100], n = 1) each benchmark iteration runs.
const scanPoints = 200

// scanAlphas returns scanPoints values of alpha log-spaced over
// [0.01, 100], both ends included.
func scanAlphas() []float64 {
	out := make([]float64, scanPoints)
	for i := range out {
		out[i] = math.Pow(10, -2+4*float64(i)/float64(scanPoints-1))
	}
	return out
}

// scanParams are the node parameters of a first-order scan with
// instantaneous reheating and one Gaussian comparison, as
// study.Graph and expandHistories build them: the default thermal
// history, A_s = 2.1e-9, and the Planck 2018 + BK18 constraint as shipped
// in configs/constraints/planck2018-bk18.toml.
func scanParams() (sr, rh, cmp pipeline.Values) {
	sr = SlowRollParams{Method: MethodFirst, End: EndEpsilonVOne}.Values()
	rh = ReheatParams(HistoryParams{Kind: HistoryInstant, Thermal: reheat.DefaultHistory(), TBBNGeV: reheat.DefaultBBNBoundGeV}, 2.1e-9)
	cmp = GaussianParams(compare.Gaussian{
		Name: "planck2018-bk18", Citation: "Planck 2018 VI, arXiv:1807.06209, Table 2; BICEP/Keck 2021, arXiv:2110.00483, abstract",
		MeanNs: 0.9649, SigmaNs: 0.0042, MeanR: 0, SigmaR: 0.036 / compare.HalfNormal95,
	})
	return sr, rh, cmp
}

// scanChain holds the outputs of the five stages for one model point.
type scanChain struct {
	model, canonical, slowroll, reheat, compare pipeline.Values
}

// runChain runs the five stage adapters for one model point exactly as
// the pipeline calls them: each stage's outputs are the next one's single
// input.
func runChain(tb testing.TB, mp, sr, rh, cmp pipeline.Values) scanChain {
	ctx := context.Background()
	var c scanChain
	var err error
	if c.model, err = (Model{}).Run(ctx, mp, nil); err != nil {
		tb.Fatal(err)
	}
	if c.canonical, err = (Canonical{}).Run(ctx, pipeline.Values{}, []pipeline.Values{c.model}); err != nil {
		tb.Fatal(err)
	}
	if c.slowroll, err = (SlowRoll{}).Run(ctx, sr, []pipeline.Values{c.canonical}); err != nil {
		tb.Fatal(err)
	}
	if c.reheat, err = (Reheat{}).Run(ctx, rh, []pipeline.Values{c.slowroll}); err != nil {
		tb.Fatal(err)
	}
	if c.compare, err = (Compare{}).Run(ctx, cmp, []pipeline.Values{c.reheat}); err != nil {
		tb.Fatal(err)
	}
	return c
}

func scanModelParams(tb testing.TB) []pipeline.Values {
	var out []pipeline.Values
	for _, a := range scanAlphas() {
		mp, err := ModelParams("e-model", map[string]float64{"alpha": a, "n": 1}, nil)
		if err != nil {
			tb.Fatal(err)
		}
		out = append(out, mp)
	}
	return out
}

// BenchmarkEModelScan runs the five stage adapters (Model, Canonical,
// SlowRoll, Reheat, Compare) for E-model points with alpha log-spaced over
// [0.01, 100] and n = 1, first order, instantaneous reheating, one
// Gaussian comparison: the per-point CPU cost of a first-order scan
// without the ledger. The metrics us/point (wall) and cpu-us/point
// (process CPU time) are averages over the alpha range. Target: under
// 20 us/point (about 51 us/point, 60 cpu-us/point before the closed-form
// slow-roll quantities and the field-space matching).
//
// The sub-benchmarks time one stage each on precomputed inputs.
func BenchmarkEModelScan(b *testing.B) {
	sr, rh, cmp := scanParams()
	mps := scanModelParams(b)
	chains := make([]scanChain, len(mps))
	for i, mp := range mps {
		chains[i] = runChain(b, mp, sr, rh, cmp)
	}
	// us/point is wall time; cpu-us/point is the process's CPU time
	// (garbage collection included), steadier on a shared machine.
	var cpu0 time.Duration
	start := func(b *testing.B) {
		b.ReportAllocs()
		cpu0, _ = processCPU()
		b.ResetTimer()
	}
	perPoint := func(b *testing.B) {
		points := float64(b.N * len(mps))
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/1e3/points, "us/point")
		if cpu1, ok := processCPU(); ok {
			b.ReportMetric(float64((cpu1-cpu0).Nanoseconds())/1e3/points, "cpu-us/point")
		}
	}
	b.Run("all", func(b *testing.B) {
		start(b)
		for i := 0; i < b.N; i++ {
			for _, mp := range mps {
				runChain(b, mp, sr, rh, cmp)
			}
		}
		perPoint(b)
	})
	ctx := context.Background()
	stage := func(name string, st pipeline.Stage, params func(i int) pipeline.Values, input func(i int) pipeline.Values) {
		b.Run(name, func(b *testing.B) {
			start(b)
			for n := 0; n < b.N; n++ {
				for i := range mps {
					var in []pipeline.Values
					if input != nil {
						in = []pipeline.Values{input(i)}
					}
					if _, err := st.Run(ctx, params(i), in); err != nil {
						b.Fatal(err)
					}
				}
			}
			perPoint(b)
		})
	}
	fixed := func(vs pipeline.Values) func(int) pipeline.Values { return func(int) pipeline.Values { return vs } }
	stage("model", Model{}, func(i int) pipeline.Values { return mps[i] }, nil)
	stage("canonical", Canonical{}, fixed(pipeline.Values{}), func(i int) pipeline.Values { return chains[i].model })
	stage("slowroll", SlowRoll{}, fixed(sr), func(i int) pipeline.Values { return chains[i].canonical })
	stage("reheat", Reheat{}, fixed(rh), func(i int) pipeline.Values { return chains[i].slowroll })
	stage("compare", Compare{}, fixed(cmp), func(i int) pipeline.Values { return chains[i].reheat })
}
