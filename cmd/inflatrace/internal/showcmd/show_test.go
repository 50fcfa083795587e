package showcmd

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/study"
)

// TestShowBothReadings: a recorded comparison with the shipped
// planck2018-bk18 set (r_0.05 < 0.036 at 95%, BICEP/Keck Collaboration
// 2021, arXiv:2110.00483, abstract), read back without the compare node's
// parameters, gets its bound from the run's compare node; show prints both
// readings: a model just above the bound exceeds it while still inside the
// two-parameter 95% region (n_sigma 1.45), one just below does not.
func TestShowBothReadings(t *testing.T) {
	g, err := study.Shipped("planck2018-bk18")
	if err != nil {
		t.Fatal(err)
	}
	params := nodes.GaussianParams(g)
	var results []study.Result
	var recorded []ledger.RunNode
	for i, r := range []float64{math.Nextafter(g.R95(), 0), math.Nextafter(g.R95(), 1)} {
		c := g.Compare(g.MeanNs, r)
		d, n, in95 := c.DeltaChi2, c.Sigmas, c.Inside95
		key := pipeline.KeyID([]string{"sha256:below", "sha256:above"}[i])
		results = append(results, study.Result{Label: []string{"below", "above"}[i], Constraint: g.Name, Ns: g.MeanNs, R: r,
			DeltaChi2: &d, NSigma: &n, Inside95: &in95, Key: string(key)})
		var rec ledger.RunNode
		rec.Key, rec.Stage, rec.Params = key, nodes.CompareStage, params
		recorded = append(recorded, rec)
	}
	addBounds(results, recorded)
	for i, want := range []bool{false, true} {
		r := results[i]
		if r.R95 == nil || r.ExceedsR95 == nil || math.Abs(*r.R95-0.036) > 1e-17 || *r.ExceedsR95 != want {
			t.Fatalf("%s: r95 %v, exceeds_r95 %v; want 0.036, %v", r.Label, r.R95, r.ExceedsR95, want)
		}
	}
	var out bytes.Buffer
	if err := significance(&app.Env{Stdout: &out}, results); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	for _, want := range []string{"two readings", "1.45 sigma", "below\tplanck2018-bk18\t0.036\t0.036\tno\t1.45\tyes", "above\tplanck2018-bk18\t0.036\t0.036\tyes\t1.45\tyes"} {
		if !strings.Contains(text, want) {
			t.Errorf("show's significance section lacks %q:\n%s", want, text)
		}
	}
	// Nothing to print without a constraint comparison.
	out.Reset()
	if err := significance(&app.Env{Stdout: &out}, []study.Result{{Label: "forecast only"}}); err != nil || out.Len() != 0 {
		t.Errorf("printed %q for results without a constraint", out.String())
	}
}
