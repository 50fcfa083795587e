package revision

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
)

// none is an empty store: every node is computed, in memory.
type none struct{}

func (none) Lookup(context.Context, pipeline.KeyID) (pipeline.NodeRecord, bool, error) {
	return pipeline.NodeRecord{}, false, nil
}

func evaluator() Evaluate {
	return Evaluator(&ReadThrough{L: none{}}, ".", "inflatrace/test", 2, func() time.Time { return time.Unix(0, 0) })
}

// record evaluates a configuration as a recorded run would be.
func record(t *testing.T, id, text string) Run {
	t.Helper()
	res, err := evaluator()(context.Background(), text)
	if err != nil {
		t.Fatalf("%s: %v", id, err)
	}
	return Run{ID: pipeline.RunID(id), ConfigText: text, ToolVersion: "test", Results: res}
}

// Runs A and B differ in three fields: N* (fixed e-folds) and the
// e-model's n, which move every prediction, and A_s, which at fixed N*
// and first order moves only the energy scales.
const propA = `
[slow_roll]
method = "first"

[normalisation]
A_s = 2.1e-9

[[reheating]]
history = "fixed-efolds"
N_star = 55

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "e-model"
alpha = [1, 3]
`

var propB = strings.NewReplacer(
	"A_s = 2.1e-9", "A_s = 2.3e-9",
	"N_star = 55", "N_star = 60",
	"alpha = [1, 3]", "alpha = [1, 3]\nn = 2",
).Replace(propA)

func TestAttributionProperties(t *testing.T) {
	a, b := record(t, "A", propA), record(t, "B", propB)
	rep, err := Compare(context.Background(), a, b, evaluator())
	if err != nil {
		t.Fatal(err)
	}
	names := map[string]int{}
	for i, x := range rep.Attributed() {
		names[x.Name] = i
	}
	if len(names) != 3 || rep.Grouping != ByField || rep.Evaluated != 8 {
		t.Fatalf("attributed %v, grouping %s, %d evaluated: want normalisation.A_s, reheating[0].N_star, model[0].n; by field; 8", names, rep.Grouping, rep.Evaluated)
	}
	iAs, ok := names["normalisation.A_s"]
	if !ok {
		t.Fatalf("A_s not attributed: %v", names)
	}
	if len(rep.Pairs) != 2 || len(rep.Added)+len(rep.Removed) != 0 {
		t.Fatalf("%d pairs, %d added, %d removed: want 2, 0, 0", len(rep.Pairs), len(rep.Added), len(rep.Removed))
	}
	for _, p := range rep.Pairs {
		for q, c := range p.Changes {
			// Contributions plus remainder equal the total, and with every
			// assumption re-evaluable the remainder is rounding only.
			sum := c.Remainder
			for _, x := range c.Contributions {
				sum += x
			}
			scale := math.Max(math.Abs(c.A), math.Abs(c.B))
			if math.Abs(sum-c.Total) > 1e-14*scale || math.Abs(c.Remainder) > 1e-12*scale {
				t.Errorf("%s %s: contributions %v + remainder %g = %g, total %g", p.LabelA, q, c.Contributions, c.Remainder, sum, c.Total)
			}
		}
		// At fixed N* and first order the amplitude sets the energy scale
		// only: n_s, r, alpha_s, n_t and N* do not depend on it
		// (Liddle & Lyth 2000, "Cosmological Inflation and Large-Scale
		// Structure", eqs. 3.38-3.41: n_s, r at first order are functions
		// of epsilon_V and eta_V at phi*, fixed by N*).
		for _, q := range []string{"n_s", "r", "alpha_s", "n_t", "N_star", "delta_chi2"} {
			if c := p.Changes[q]; c.Contributions[iAs] != 0 {
				t.Errorf("%s %s: A_s contributes %g, want exactly 0", p.LabelA, q, c.Contributions[iAs])
			}
		}
		if c := p.Changes["energy_scale_GeV"]; c.Contributions[iAs] == 0 {
			t.Errorf("%s: A_s contributes nothing to the energy scale", p.LabelA)
		}
		if c := p.Changes["n_s"]; c.Total == 0 || c.MainCause == "" || c.Share <= 0 {
			t.Errorf("%s: n_s change %+v: want a main cause with a positive share", p.LabelA, c)
		}
	}

	// Swapping A and B flips every sign.
	back, err := Compare(context.Background(), b, a, evaluator())
	if err != nil {
		t.Fatal(err)
	}
	for k, p := range rep.Pairs {
		q := back.Pairs[k]
		if q.LabelA != p.LabelB {
			t.Fatalf("swapped pair %d is %q, want %q", k, q.LabelA, p.LabelB)
		}
		for name, c := range p.Changes {
			d := q.Changes[name]
			scale := 1e-14 * math.Max(math.Abs(c.A), math.Abs(c.B))
			if d.Total != -c.Total {
				t.Errorf("%s %s: total %g, swapped %g", p.LabelA, name, c.Total, d.Total)
			}
			for i := range c.Contributions {
				if math.Abs(d.Contributions[i]+c.Contributions[i]) > scale {
					t.Errorf("%s %s [%d]: contribution %g, swapped %g", p.LabelA, name, i, c.Contributions[i], d.Contributions[i])
				}
			}
		}
	}
}

// Where an intermediate configuration fails, the pairs it would have given
// say which configuration, carry the total only, and the comparison still
// succeeds.
func TestUnseparatedWhenAnIntermediateFails(t *testing.T) {
	a, b := record(t, "A", propA), record(t, "B", propB)
	real := evaluator()
	failing := func(ctx context.Context, text string) ([]study.Result, error) {
		if strings.Contains(text, "A_s = 0.0000000023") && strings.Contains(text, "N_star = 55") {
			return nil, errors.New("some nodes failed")
		}
		return real(ctx, text)
	}
	rep, err := Compare(context.Background(), a, b, failing)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range rep.Pairs {
		if len(p.Unseparated) == 0 {
			t.Fatalf("%s: separated although configurations failed", p.LabelA)
		}
		c := p.Changes["n_s"]
		if c.Remainder != c.Total || c.Total == 0 || !strings.HasPrefix(c.MainCause, "not separated") {
			t.Errorf("%s: n_s %+v: want the total as remainder and a not-separated cause", p.LabelA, c)
		}
	}
}

// Beyond MaxAttributed differing fields the fields of one entry are
// attributed together; contributions still add up to the total.
func TestGroupingBeyondTheLimit(t *testing.T) {
	var ds []Difference
	for i := 0; i < MaxAttributed+1; i++ {
		ds = append(ds, Difference{Path: "model[" + string(rune('0'+i%3)) + "].p" + string(rune('a'+i)), A: 1.0, B: 2.0})
	}
	as, g, err := group(ds)
	if err != nil || g != ByEntry || len(as) != 3 {
		t.Fatalf("group: %d assumptions by %s (%v): want 3 by entry", len(as), g, err)
	}
	for _, x := range as {
		if len(x.Fields) != 3 || !strings.HasPrefix(x.Fields[0], x.Name+".") {
			t.Errorf("group %s holds %v", x.Name, x.Fields)
		}
	}
	ds = ds[:0]
	for i := 0; i < MaxAttributed+1; i++ {
		ds = append(ds, Difference{Path: "model[" + string(rune('0'+i)) + "].alpha", A: 1.0, B: 2.0})
	}
	if as, g, _ = group(ds); g != BySection || len(as) != 1 || as[0].Name != "model" {
		t.Errorf("9 entries of one section: %d assumptions by %s, want 1 by section", len(as), g)
	}
}

func TestShapleyWeightsSumToOne(t *testing.T) {
	// Every ordering counted once: sum over s of C(n-1, s) w[s] = 1
	// (Shapley 1953, eq. for the value as an average over orderings).
	for n := 1; n <= MaxAttributed; n++ {
		w := shapleyWeights(n)
		sum, binom := 0.0, 1.0
		for s := 0; s < n; s++ {
			sum += binom * w[s]
			binom = binom * float64(n-1-s) / float64(s+1)
		}
		if math.Abs(sum-1) > 1e-14 {
			t.Errorf("n = %d: weights sum to %g", n, sum)
		}
	}
}

// A reheating band's result is compared by its span: moving the pivot
// count by widening w_reh moves N*_max, and is not reported unchanged.
func TestBandsAreCompared(t *testing.T) {
	const bandA = `
[[reheating]]
history = "band"
w_reh_min = 0
w_reh_max = 0.25
n_w = 4
n_T = 4

[[constraint]]
use = "cmb-combined-2025"

[[model]]
family = "starobinsky"
`
	bandB := strings.Replace(bandA, "w_reh_max = 0.25", "w_reh_max = 1", 1)
	a, b := record(t, "A", bandA), record(t, "B", bandB)
	rep, err := Compare(context.Background(), a, b, evaluator())
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Pairs) != 1 || !rep.Pairs[0].Changed() {
		t.Fatalf("band pairs %+v: want one, changed", rep.Pairs)
	}
	c, ok := rep.Pairs[0].Changes["N_star_max"]
	if !ok || c.Total <= 0 || c.MainCause != "reheating[0].w_reh_max" {
		t.Errorf("N*_max %+v: a stiffer w_reh_max must raise the band's largest N*, caused by reheating[0].w_reh_max", c)
	}
}
