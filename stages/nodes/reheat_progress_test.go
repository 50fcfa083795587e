package nodes

import (
	"context"
	"reflect"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// A band node reports its histories to the progress starter its context
// carries: one report, counting to n_w*n_T, ended once; its outputs are
// those of the same node run without a starter (reporting is output only).
// A node of any other history starts no report.
func TestReheatBandReportsProgress(t *testing.T) {
	sr, rh, cmp := scanParams()
	mp, err := ModelParams("starobinsky", map[string]float64{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	c := runChain(t, mp, sr, rh, cmp)
	band := ReheatParams(HistoryParams{Kind: HistoryBand, Thermal: reheat.DefaultHistory(), TBBNGeV: reheat.DefaultBBNBoundGeV,
		Band: reheat.BandSettings{WMin: 0, WMax: 1.0 / 3, NW: 3, NT: 7}, BandTGeV: reheat.DefaultBBNBoundGeV}, 2.1e-9)

	var starts, ends int
	var last, total int64
	ctx := pipeline.WithProgress(context.Background(), func() (pipeline.ProgressFunc, func()) {
		starts++
		return func(d, tt int64) { last, total = d, tt }, func() { ends++ }
	})
	told, err := Reheat{}.Run(ctx, band, []pipeline.Values{c.slowroll})
	if err != nil {
		t.Fatal(err)
	}
	if starts != 1 || ends != 1 || last != 21 || total != 21 {
		t.Errorf("%d reports started, %d ended, last %d of %d; want 1, 1, 21 of 21", starts, ends, last, total)
	}
	plain, err := Reheat{}.Run(context.Background(), band, []pipeline.Values{c.slowroll})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(told, plain) {
		t.Errorf("a band reporting progress gave other outputs:\n%v\nwant\n%v", told, plain)
	}
	starts, ends = 0, 0
	if _, err := (Reheat{}).Run(ctx, ReheatParams(HistoryParams{Kind: HistoryFixed, N: 55}, 2.1e-9), []pipeline.Values{c.slowroll}); err != nil {
		t.Fatal(err)
	}
	if starts != 0 || ends != 0 {
		t.Errorf("a fixed-efolds node started %d reports", starts)
	}
}
