package reheat

import (
	"errors"
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// BandSettings describe a sweep over reheating histories.
type BandSettings struct {
	// WMin and WMax bound the equation of state of reheating (defaults 0
	// and 1/3: matter-like to radiation-like); NW values are taken,
	// evenly spaced, both ends included (default 100).
	WMin, WMax float64
	NW         int
	// TMin is the lowest reheating temperature [M_p] (default the BBN
	// bound); NT temperatures are taken, evenly spaced in log T, from TMin
	// up to the instantaneous maximum, which is the last (default 100).
	TMin float64
	NT   int
	// Progress, when not nil, is told after each history how many of the
	// NW*NT histories have been tried (those above the maximum
	// temperature included). It does not change the result.
	Progress func(done, total int64)
}

func (b BandSettings) withDefaults() BandSettings {
	if b.WMin == 0 && b.WMax == 0 {
		b.WMax = 1.0 / 3
	}
	if b.NW <= 0 {
		b.NW = 100
	}
	if b.NT <= 0 {
		b.NT = 100
	}
	if b.TMin <= 0 {
		b.TMin = DefaultBBNBoundGeV / ReducedPlanckGeV
	}
	return b
}

// Extreme is one end of a band: the history that produces it.
type Extreme struct {
	W, T float64 // equation of state and reheating temperature [M_p]
	Pred Prediction
}

// BandResult is the span of predictions over a band of histories: the
// stripe a model draws in the n_s-r plane.
type BandResult struct {
	NMin, NMax   Extreme // the histories giving the smallest and largest N*
	NsMin, NsMax float64
	RMin, RMax   float64
	TMax         float64 // instantaneous-reheating temperature [M_p]
	Points       int     // histories evaluated
}

// Band sweeps the equation of state and the reheating temperature of the
// era between the end of inflation and radiation domination, solving N*
// self-consistently for each history (Match), and reports the span of N*,
// n_s and r. Each solve starts from its neighbour's N*, in a fixed order,
// so the result is deterministic.
func Band(ev Evaluator, h History, b BandSettings) (BandResult, error) {
	b = b.withDefaults()
	if !(b.WMin > -1.0/3) || b.WMax > 1 || b.WMin > b.WMax {
		return BandResult{}, fmt.Errorf("band: w_reh in [%g, %g]: want -1/3 < w_min <= w_max <= 1", b.WMin, b.WMax)
	}
	inst, err := Match(ev, h, Era{Kind: EraInstant}, 55)
	if err != nil {
		return BandResult{}, fmt.Errorf("band: instantaneous reheating: %w", err)
	}
	if b.TMin >= inst.TMax {
		return BandResult{}, fmt.Errorf("band: T_min = %.4g GeV is not below T_max = %.4g GeV", GeV(b.TMin), GeV(inst.TMax))
	}
	res := BandResult{TMax: inst.TMax, NsMin: math.Inf(1), NsMax: math.Inf(-1), RMin: math.Inf(1), RMax: math.Inf(-1)}
	res.NMin.Pred.N, res.NMax.Pred.N = math.Inf(1), math.Inf(-1)
	start := inst.N
	total := int64(b.NW) * int64(b.NT)
	for i := 0; i < b.NW; i++ {
		w := b.WMin
		switch {
		case i == b.NW-1:
			w = b.WMax // exactly, not up to rounding
		case b.NW > 1:
			w = b.WMin + (b.WMax-b.WMin)*float64(i)/float64(b.NW-1)
		}
		for j := 0; j < b.NT; j++ {
			era := Era{Kind: EraInstant}
			T := inst.TMax
			if j < b.NT-1 {
				T = b.TMin * detmath.Pow(inst.TMax/b.TMin, float64(j)/float64(b.NT-1))
				era = Era{Kind: EraTemperature, W: w, T: T}
			}
			pr, err := Match(ev, h, era, start)
			if b.Progress != nil {
				b.Progress(int64(i)*int64(b.NT)+int64(j)+1, total)
			}
			if errors.Is(err, ErrAboveMaximum) {
				continue // T_max moved with N*: this T is no longer reachable
			}
			if err != nil {
				return res, fmt.Errorf("band: w_reh = %g, T_reh = %.4g GeV: %w", w, GeV(T), err)
			}
			start = pr.N
			res.Points++
			if pr.N < res.NMin.Pred.N {
				res.NMin = Extreme{W: w, T: T, Pred: pr}
			}
			if pr.N > res.NMax.Pred.N {
				res.NMax = Extreme{W: w, T: T, Pred: pr}
			}
			res.NsMin, res.NsMax = math.Min(res.NsMin, pr.Obs.Ns), math.Max(res.NsMax, pr.Obs.Ns)
			res.RMin, res.RMax = math.Min(res.RMin, pr.Obs.R), math.Max(res.RMax, pr.Obs.R)
		}
	}
	if res.Points == 0 {
		return res, errors.New("band: no history in the band could be matched")
	}
	return res, nil
}
