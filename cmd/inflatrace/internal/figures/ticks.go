package figures

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// decadeTicks marks a logarithmic axis: a labelled major tick at every
// power of ten in range and unlabelled minor ticks at 2..9 times each.
// (gonum's LogTicks truncates log10 of the minimum towards zero, so for a
// minimum of 1e-4 it can start a decade late and leave it unlabelled.)
type decadeTicks struct{}

// Ticks implements plot.Ticker.
func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max > min) {
		return nil
	}
	lo := int(math.Floor(math.Log10(min) + 1e-9))
	hi := int(math.Ceil(math.Log10(max) - 1e-9))
	var ticks []plot.Tick
	labelled := 0
	for e := lo; e <= hi; e++ {
		base := math.Pow10(e)
		for m := 1; m <= 9; m++ {
			v := float64(m) * base
			if v < min*(1-1e-12) || v > max*(1+1e-12) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 {
				t.Label = decadeLabel(e)
				labelled++
			}
			ticks = append(ticks, t)
		}
	}
	// An axis of less than about a decade would show one number or none:
	// label 2 and 5 times each power of ten too (common practice).
	if labelled < 2 {
		for i := range ticks {
			m := ticks[i].Value / math.Pow10(int(math.Floor(math.Log10(ticks[i].Value)+1e-9)))
			if math.Abs(m-2) < 1e-9 || math.Abs(m-5) < 1e-9 {
				ticks[i].Label = strconv.FormatFloat(ticks[i].Value, 'g', 3, 64)
			}
		}
	}
	return ticks
}

// decadeLabel writes 10^e as a journal does: 1 and 10 plainly (and 0.1),
// other powers as $10^{e}$.
func decadeLabel(e int) string {
	switch e {
	case -1, 0, 1:
		return strconv.FormatFloat(math.Pow10(e), 'g', -1, 64)
	}
	return "$10^{" + strconv.Itoa(e) + "}$"
}
