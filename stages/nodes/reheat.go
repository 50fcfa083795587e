package nodes

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/reheat"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// Reheating histories, as named in configurations and node parameters.
const (
	HistoryFixed       = "fixed-efolds"  // N* given
	HistoryInstant     = "instantaneous" // radiation from the end of inflation
	HistoryTemperature = "temperature"   // constant w_reh until T_reh
	HistoryDuration    = "duration"      // constant w_reh for N_reh e-folds
	HistoryKination    = "kination"      // w_reh = 1 until T_reh
	HistoryBand        = "band"          // a sweep over w_reh and T_reh
)

// Histories lists the known histories.
var Histories = []string{HistoryFixed, HistoryInstant, HistoryTemperature, HistoryDuration, HistoryKination, HistoryBand}

// Reheat is the reheating-matching stage: it fixes N* (given, or from the
// expansion history after inflation, solved self-consistently), evaluates
// the observables there and normalises the potential to A_s. A band
// history reports the span of N*, n_s and r over a sweep of histories.
type Reheat struct{}

// reheatSpec is the stage's declaration, built once (a scan adds a node of
// each stage per model point).
var reheatSpec = Reheat{}.spec()

// Spec declares the stage. The declaration is shared: callers must not
// modify its slices.
func (Reheat) Spec() pipeline.Spec { return reheatSpec }

func (Reheat) spec() pipeline.Spec {
	opt := func(name, unit string) pipeline.ParamSpec {
		return pipeline.ParamSpec{Name: name, Kind: pipeline.KindFloat, Unit: unit, Optional: true}
	}
	return pipeline.Spec{
		Name: ReheatStage, Version: ReheatVersion, Inputs: []string{SlowRollStage},
		Params: []pipeline.ParamSpec{
			{Name: "history", Kind: pipeline.KindString},
			{Name: "A_s", Kind: pipeline.KindFloat, Unit: pipeline.UnitNone},
			opt("N_star", pipeline.UnitNone),
			opt("k_pivot", pipeline.UnitPerMpc),
			opt("T_0", pipeline.UnitKelvin),
			opt("g_s0", pipeline.UnitNone),
			opt("g_reh", pipeline.UnitNone),
			opt("g_s_reh", pipeline.UnitNone),
			opt("w_reh", pipeline.UnitNone),
			opt("T_reh", pipeline.UnitGeV),
			opt("N_reh", pipeline.UnitNone),
			opt("T_bbn", pipeline.UnitGeV),
			opt("w_min", pipeline.UnitNone),
			opt("w_max", pipeline.UnitNone),
			opt("n_w", pipeline.UnitNone),
			opt("n_T", pipeline.UnitNone),
			opt("T_min", pipeline.UnitGeV),
		},
	}
}

// HistoryParams are the settings of one reheating history as node
// parameters; the zero values of the optional fields are left out.
type HistoryParams struct {
	Kind     string
	N        float64        // fixed-efolds
	Thermal  reheat.History // every history but fixed-efolds
	W        float64        // temperature, duration
	TRehGeV  float64        // temperature, kination
	NReh     float64        // duration
	TBBNGeV  float64        // the nucleosynthesis bound flagged against
	Band     reheat.BandSettings
	BandTGeV float64 // band: lowest T_reh [GeV]
}

// ReheatParams returns the reheat node's parameters: only what influences
// the history, so that changing one input recomputes only the nodes it
// affects.
func ReheatParams(h HistoryParams, As float64) pipeline.Values {
	f := func(x float64, unit string) pipeline.Value { return pipeline.Float(x, unit) }
	vs := pipeline.Values{"history": pipeline.String(h.Kind), "A_s": f(As, pipeline.UnitNone)}
	if h.Kind == HistoryFixed {
		vs["N_star"] = f(h.N, pipeline.UnitNone)
		return vs
	}
	putThermal(vs, h.Thermal)
	vs["T_bbn"] = f(h.TBBNGeV, pipeline.UnitGeV)
	switch h.Kind {
	case HistoryTemperature:
		vs["w_reh"], vs["T_reh"] = f(h.W, pipeline.UnitNone), f(h.TRehGeV, pipeline.UnitGeV)
	case HistoryDuration:
		vs["w_reh"], vs["N_reh"] = f(h.W, pipeline.UnitNone), f(h.NReh, pipeline.UnitNone)
	case HistoryKination:
		vs["T_reh"] = f(h.TRehGeV, pipeline.UnitGeV)
	case HistoryBand:
		vs["w_min"], vs["w_max"] = f(h.Band.WMin, pipeline.UnitNone), f(h.Band.WMax, pipeline.UnitNone)
		vs["n_w"], vs["n_T"] = f(float64(h.Band.NW), pipeline.UnitNone), f(float64(h.Band.NT), pipeline.UnitNone)
		vs["T_min"] = f(h.BandTGeV, pipeline.UnitGeV)
	}
	return vs
}

func need(params pipeline.Values, history string, names ...string) ([]float64, error) {
	out := make([]float64, len(names))
	for i, n := range names {
		v, err := params.Num(n)
		if err != nil {
			return nil, fmt.Errorf("history %s: %w", history, err)
		}
		out[i] = v
	}
	return out, nil
}

// putThermal records the thermal history's parameters (k_pivot, T_0,
// g_s0, g_reh, g_s_reh), which thermalFrom reads back.
func putThermal(vs pipeline.Values, h reheat.History) {
	vs["k_pivot"] = pipeline.Float(h.PivotPerMpc, pipeline.UnitPerMpc)
	vs["T_0"] = pipeline.Float(h.T0K, pipeline.UnitKelvin)
	vs["g_s0"] = pipeline.Float(h.GS0, pipeline.UnitNone)
	vs["g_reh"] = pipeline.Float(h.GReh, pipeline.UnitNone)
	vs["g_s_reh"] = pipeline.Float(h.GSReh, pipeline.UnitNone)
}

// thermalFrom reads the parameters putThermal records.
func thermalFrom(params pipeline.Values, history string) (reheat.History, error) {
	v, err := need(params, history, "k_pivot", "T_0", "g_s0", "g_reh", "g_s_reh")
	if err != nil {
		return reheat.History{}, err
	}
	return reheat.History{PivotPerMpc: v[0], T0K: v[1], GS0: v[2], GReh: v[3], GSReh: v[4]}, nil
}

func thermal(params pipeline.Values, history string) (reheat.History, float64, error) {
	h, err := thermalFrom(params, history)
	if err != nil {
		return reheat.History{}, 0, err
	}
	v, err := need(params, history, "T_bbn")
	if err != nil {
		return reheat.History{}, 0, err
	}
	return h, v[0], h.Check()
}

// Run matches the solution to the reheating history. A band reports its
// histories to the context's progress starter (pipeline.WithProgress).
func (Reheat) Run(ctx context.Context, params pipeline.Values, inputs []pipeline.Values) (pipeline.Values, error) {
	in, err := onlyInput(ReheatStage, inputs)
	if err != nil {
		return nil, err
	}
	As, _ := params.Num("A_s")
	if !(As > 0) {
		return nil, fmt.Errorf("A_s = %g, want > 0", As)
	}
	history, _ := params.Text("history")
	var progress pipeline.ProgressFunc
	if history == HistoryBand {
		var end func()
		progress, end = pipeline.Progress(ctx)
		defer end()
	}
	out, err := reheatOutputs(params, in, As, history, progress)
	if err != nil {
		return nil, err
	}
	// The model's specification is carried forward so that the outputs,
	// and so the keys below, of two models that happen to predict the same
	// numbers stay distinct: each result's lineage is then unambiguous.
	carrySpec(in, out)
	return out, nil
}

func reheatOutputs(params, in pipeline.Values, As float64, history string, progress pipeline.ProgressFunc) (pipeline.Values, error) {
	nMax := 100.0 // room for the matched N* of any history
	if history == HistoryFixed {
		if N, err := params.Num("N_star"); err == nil {
			nMax = N
		}
	}
	ev, check, err := evaluator(in, reheat.Normalisation{As: As}, nMax)
	if err != nil {
		return nil, err
	}
	if history == HistoryFixed {
		v, err := need(params, history, "N_star")
		if err != nil {
			return nil, err
		}
		pr, err := ev.At(v[0])
		if err != nil {
			return nil, err
		}
		if err := check(pr); err != nil {
			return nil, err
		}
		out := predictionValues(pr, 2+specCount(in))
		out["reheating"] = pipeline.String(history)
		out["A_s"] = params["A_s"]
		return out, nil
	}
	h, tbbn, err := thermal(params, history)
	if err != nil {
		return nil, err
	}
	inGeV := func(x float64) float64 { return x / reheat.ReducedPlanckGeV }
	var era reheat.Era
	switch history {
	case HistoryInstant:
		era = reheat.Era{Kind: reheat.EraInstant}
	case HistoryTemperature:
		v, err := need(params, history, "w_reh", "T_reh")
		if err != nil {
			return nil, err
		}
		era = reheat.Era{Kind: reheat.EraTemperature, W: v[0], T: inGeV(v[1])}
	case HistoryDuration:
		v, err := need(params, history, "w_reh", "N_reh")
		if err != nil {
			return nil, err
		}
		era = reheat.Era{Kind: reheat.EraEfolds, W: v[0], NReh: v[1]}
	case HistoryKination:
		v, err := need(params, history, "T_reh")
		if err != nil {
			return nil, err
		}
		era = reheat.Era{Kind: reheat.EraTemperature, W: 1, T: inGeV(v[0])}
	case HistoryBand:
		v, err := need(params, history, "w_min", "w_max", "n_w", "n_T", "T_min")
		if err != nil {
			return nil, err
		}
		b, err := reheat.Band(ev, h, reheat.BandSettings{WMin: v[0], WMax: v[1], NW: int(v[2]), NT: int(v[3]), TMin: inGeV(v[4]), Progress: progress})
		if err != nil {
			return nil, err
		}
		for _, end := range []reheat.Prediction{b.NMin.Pred, b.NMax.Pred} {
			if err := check(end); err != nil {
				return nil, fmt.Errorf("band edge: %w", err)
			}
		}
		return bandValues(b, params), nil
	default:
		return nil, fmt.Errorf("unknown reheating history %q (known: %s)", history, strings.Join(Histories, ", "))
	}
	pr, err := reheat.Match(ev, h, era, 55)
	if err != nil {
		return nil, err
	}
	if err := check(pr); err != nil {
		return nil, err
	}
	out := predictionValues(pr, 7+specCount(in))
	out["reheating"] = pipeline.String(history)
	out["A_s"] = params["A_s"]
	out["T_reh_GeV"] = pipeline.Float(reheat.GeV(pr.TReh), pipeline.UnitGeV)
	out["T_max_GeV"] = pipeline.Float(reheat.GeV(pr.TMax), pipeline.UnitGeV)
	out["N_reh"] = pipeline.Float(pr.NReh, pipeline.UnitNone)
	out["w_reh"] = pipeline.Float(pr.W, pipeline.UnitNone)
	out["below_bbn"] = pipeline.String(yesNo(reheat.GeV(pr.TReh) < tbbn))
	return out, nil
}

// predictionValues encodes a normalised prediction, in a map with room
// for extra more values (the history's and the model's specification,
// which the callers add: a map sized for what it will hold is built once,
// where one sized by a round guess is twice as large or grows).
func predictionValues(pr reheat.Prediction, extra int) pipeline.Values {
	vs := make(pipeline.Values, 15+extra)
	vs["N_star"] = pipeline.Float(pr.N, pipeline.UnitNone)
	vs["phi_star"] = pipeline.Float(pr.Point.Phi, pipeline.UnitMp)
	vs["phi_end"] = pipeline.Float(pr.PhiEnd, pipeline.UnitMp) // the end N* is counted from
	vs["epsilon_V"] = pipeline.Float(pr.Point.Epsilon, pipeline.UnitNone)
	vs["eta_V"] = pipeline.Float(pr.Point.Eta, pipeline.UnitNone)
	vs["xi2_V"] = pipeline.Float(pr.Point.Xi2, pipeline.UnitNone)
	vs["n_s"] = pipeline.Float(pr.Obs.Ns, pipeline.UnitNone)
	vs["r"] = pipeline.Float(pr.Obs.R, pipeline.UnitNone)
	vs["alpha_s"] = pipeline.Float(pr.Obs.AlphaS, pipeline.UnitNone)
	vs["n_t"] = pipeline.Float(pr.Obs.Nt, pipeline.UnitNone)
	vs["V0"] = pipeline.Float(pr.Scale.V0, pipeline.UnitMp4)
	vs["V0_quarter_GeV"] = pipeline.Float(reheat.QuarterGeV(pr.Scale.V0), pipeline.UnitGeV)
	vs["energy_scale_GeV"] = pipeline.Float(reheat.QuarterGeV(pr.Scale.Vstar), pipeline.UnitGeV)
	vs["H_star_GeV"] = pipeline.Float(reheat.GeV(pr.Scale.Hstar), pipeline.UnitGeV)
	vs["rho_end_quarter_GeV"] = pipeline.Float(reheat.QuarterGeV(pr.Scale.RhoEnd), pipeline.UnitGeV)
	return vs
}

// bandValues encodes a band: the span of N*, n_s and r and the histories
// at the ends of the N* span.
func bandValues(b reheat.BandResult, params pipeline.Values) pipeline.Values {
	f := func(x float64) pipeline.Value { return pipeline.Float(x, pipeline.UnitNone) }
	return pipeline.Values{
		"reheating":               pipeline.String(HistoryBand),
		"A_s":                     params["A_s"],
		"band_points":             f(float64(b.Points)),
		"N_star_min":              f(b.NMin.Pred.N),
		"N_star_max":              f(b.NMax.Pred.N),
		"n_s_min":                 f(b.NsMin),
		"n_s_max":                 f(b.NsMax),
		"r_min":                   f(b.RMin),
		"r_max":                   f(b.RMax),
		"w_at_N_star_min":         f(b.NMin.W),
		"w_at_N_star_max":         f(b.NMax.W),
		"T_reh_at_N_star_min_GeV": pipeline.Float(reheat.GeV(b.NMin.T), pipeline.UnitGeV),
		"T_reh_at_N_star_max_GeV": pipeline.Float(reheat.GeV(b.NMax.T), pipeline.UnitGeV),
		"T_max_GeV":               pipeline.Float(reheat.GeV(b.TMax), pipeline.UnitGeV),
		"n_s_at_N_star_min":       f(b.NMin.Pred.Obs.Ns),
		"n_s_at_N_star_max":       f(b.NMax.Pred.Obs.Ns),
		"r_at_N_star_min":         f(b.NMin.Pred.Obs.R),
		"r_at_N_star_max":         f(b.NMax.Pred.Obs.R),
	}
}

// evaluator returns the prediction at N for the slow-roll node's method,
// and the self-consistency check every prediction of it must pass before
// it is reported (slowroll.CheckPivot with the e-fold count the method
// solves, and finite observables and scales).
//
// The exact method integrates the background far enough back for pivots
// up to nMax e-folds before the end.
func evaluator(in pipeline.Values, n reheat.Normalisation, nMax float64) (reheat.Evaluator, func(reheat.Prediction) error, error) {
	sol, err := solutionFrom(in)
	if err != nil {
		return nil, nil, err
	}
	sp := decodeSlowRoll(in)
	checkWith := func(c func(N float64) slowroll.PivotCheck) func(reheat.Prediction) error {
		return func(pr reheat.Prediction) error {
			// The model's description names it in an error only: written
			// on demand (it costs more than the checks that pass).
			name := sol.Model.Describe
			if !(pr.N > 0) || !finite(pr.N) {
				return &slowroll.ConsistencyError{Model: name(), N: pr.N, Msg: fmt.Sprintf("N* = %g", pr.N)}
			}
			if err := sol.CheckPivot(pr.Point.Phi, c(pr.N)); err != nil {
				return err
			}
			if err := sol.CheckObservables(pr.N, pr.Obs); err != nil {
				return err
			}
			for _, v := range [...]struct {
				what string
				x    float64
			}{{"V0", pr.Scale.V0}, {"V*", pr.Scale.Vstar}, {"H*", pr.Scale.Hstar}, {"rho_end", pr.Scale.RhoEnd}} {
				if !(v.x > 0) || !finite(v.x) {
					return &slowroll.ConsistencyError{Model: name(), Phi: pr.Point.Phi, N: pr.N, Msg: fmt.Sprintf("%s = %g after normalisation to A_s", v.what, v.x)}
				}
			}
			return nil
		}
	}
	switch sp.Method {
	case MethodFirst:
		var cal *slowroll.EndCalibration
		if sp.End == EndEpsilonHOne {
			if cal, err = calibration(in); err != nil {
				return nil, nil, err
			}
		}
		check := checkWith(func(N float64) slowroll.PivotCheck {
			if cal != nil {
				N -= reheat.FirstOrderEndShift(cal)
			}
			return slowroll.PivotCheck{Target: N}
		})
		return reheat.FirstOrder{Sol: sol, Norm: n, Cal: cal}, check, nil
	case MethodSecond:
		cal, err := calibration(in)
		if err != nil {
			return nil, nil, err
		}
		check := checkWith(func(N float64) slowroll.PivotCheck {
			return slowroll.PivotCheck{Target: N - cal.DeltaN, Shift: sol.EfoldShift}
		})
		return reheat.SecondOrder{Sol: sol, Cal: cal, Norm: n}, check, nil
	case MethodExact:
		es, err := slowroll.SolveExact(sol.Model, nMax, sp.exactSettings())
		if err != nil {
			return nil, nil, err
		}
		// The exact pivot is where the exact background has N e-folds left;
		// the first-order count is no independent measure of that, so the
		// check is the range, epsilon_V and finiteness only.
		check := checkWith(func(N float64) slowroll.PivotCheck { return slowroll.PivotCheck{Target: N, RelTol: -1} })
		return reheat.Exact{Sol: es, Norm: n}, check, nil
	}
	return nil, nil, fmt.Errorf("slow-roll method %q has no evaluator", sp.Method)
}

// calibration reads the end calibration a slow-roll node recorded.
func calibration(in pipeline.Values) (*slowroll.EndCalibration, error) {
	v, err := need(in, "end calibration", "cal_phi", "cal_N_exact", "cal_delta_N", "phi_end_exact")
	if err != nil {
		return nil, err
	}
	return &slowroll.EndCalibration{Phi: v[0], NExact: v[1], DeltaN: v[2], PhiEnd: v[3]}, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
