package pipeline

import (
	"context"
	"fmt"
	"math"
	"sort"
)

// Replay recomputes a recorded node with its stage as it is now, from the
// recorded parameters and the given outputs of its inputs (in declared
// order), and returns the outputs and their hash. The stage's current
// version may differ from the recorded one; the caller reports that.
func Replay(ctx context.Context, st Stage, rec NodeRecord, inputs []Values) (Values, OutputID, error) {
	spec := st.Spec()
	if spec.Name != rec.Stage {
		return nil, "", fmt.Errorf("replay %s: stage %s given", rec.Key, spec.Name)
	}
	if len(inputs) != len(spec.Inputs) {
		return nil, "", fmt.Errorf("replay %s: %d inputs, stage %s declares %d", rec.Key, len(inputs), spec.Name, len(spec.Inputs))
	}
	out, err := runStage(ctx, st, rec.Params, inputs)
	if err != nil {
		return nil, "", err
	}
	h, _, err := OutputHash(out)
	if err != nil {
		return nil, "", err
	}
	return out, h, nil
}

// Difference describes how two output sets differ.
type Difference struct {
	// Changed names the values that differ (sorted), including those
	// present in only one set.
	Changed []string
	// MaxRel is the largest relative difference |a-b|/max(|a|,|b|) over
	// the floats present in both; MaxAbs the largest absolute one, and
	// Worst the name where MaxRel occurs.
	MaxRel, MaxAbs float64
	Worst          string
	// Structural is set when a value is missing, changes kind or unit, or
	// a string differs: no tolerance makes such sets equal.
	Structural bool
}

// Compare returns how b differs from a.
func Compare(a, b Values) Difference {
	var d Difference
	names := map[string]bool{}
	for n := range a {
		names[n] = true
	}
	for n := range b {
		names[n] = true
	}
	sorted := make([]string, 0, len(names))
	for n := range names {
		sorted = append(sorted, n)
	}
	sort.Strings(sorted)
	for _, n := range sorted {
		va, okA := a[n]
		vb, okB := b[n]
		if okA && okB && va == vb {
			continue
		}
		d.Changed = append(d.Changed, n)
		if !okA || !okB || va.Kind != vb.Kind || va.Kind != KindFloat || va.Unit != vb.Unit {
			d.Structural = true
			continue
		}
		abs := math.Abs(va.Float - vb.Float)
		rel := abs / math.Max(math.Abs(va.Float), math.Abs(vb.Float))
		if abs > d.MaxAbs {
			d.MaxAbs = abs
		}
		if rel > d.MaxRel {
			d.MaxRel, d.Worst = rel, n
		}
	}
	return d
}
