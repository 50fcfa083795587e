package infer

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"sync"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num/detmath"
	"github.com/inflatrace/inflatrace/stages/reheat"
	"github.com/inflatrace/inflatrace/stages/slowroll"
)

// PriorKind is the shape of a one-dimensional prior.
type PriorKind int

// The priors a study can state.
const (
	Fixed      PriorKind = iota // the value, not integrated over
	Uniform                     // uniform on [Lo, Hi]
	LogUniform                  // uniform in ln x on [Lo, Hi], 0 < Lo < Hi
)

// Prior is the prior of one parameter.
type Prior struct {
	Name   string
	Kind   PriorKind
	Value  float64 // for Fixed
	Lo, Hi float64 // for Uniform and LogUniform
}

// Check refuses a malformed prior, naming the parameter.
func (p Prior) Check() error {
	switch p.Kind {
	case Fixed:
		if math.IsNaN(p.Value) || math.IsInf(p.Value, 0) {
			return fmt.Errorf("prior of %s: fixed value %g is not finite", p.Name, p.Value)
		}
	case Uniform, LogUniform:
		if !(p.Lo < p.Hi) || math.IsInf(p.Lo, 0) || math.IsInf(p.Hi, 0) {
			return fmt.Errorf("prior of %s: range [%g, %g] is empty or not finite", p.Name, p.Lo, p.Hi)
		}
		if p.Kind == LogUniform && !(p.Lo > 0) {
			return fmt.Errorf("prior of %s: a log-uniform range needs a positive lower end, found %g", p.Name, p.Lo)
		}
	default:
		return fmt.Errorf("prior of %s: unknown kind %d", p.Name, p.Kind)
	}
	return nil
}

// At maps a prior coordinate u in [0, 1] to the parameter.
func (p Prior) At(u float64) float64 {
	switch p.Kind {
	case Uniform:
		return p.Lo + float64(u*(p.Hi-p.Lo))
	case LogUniform:
		return detmath.Exp(detmath.Log(p.Lo) + float64(u*(detmath.Log(p.Hi)-detmath.Log(p.Lo))))
	}
	return p.Value
}

// free reports whether the prior is integrated over.
func (p Prior) free() bool { return p.Kind != Fixed }

// Problem is the inference of one model family against one likelihood
// with an unknown reheating history, at first order in slow roll.
//
// The reheating era has a constant equation of state w_reh (prior W; its
// range within -1/3 < w_reh <= 1) and ends at a temperature T_reh whose
// prior is log-uniform between TLoGeV (the BBN bound by default) and the
// instantaneous maximum T_max of the point, which depends on the model's
// parameters: it is integrated over as a coordinate u_T of [0, 1],
// ln T_reh = ln T_lo + u_T (ln T_max - ln T_lo), so the prior is
// uniform in u_T whatever T_max. With w_reh = 1/3 the era is radiation
// and T_reh changes nothing.
type Problem struct {
	Family  string
	Params  []Prior // the family's parameters (those not given take their default)
	W       Prior
	TLoGeV  float64 // default reheat.DefaultBBNBoundGeV
	As      float64 // scalar amplitude the potential is normalised to
	History reheat.History
	Like    Likelihood
	// NReh, when set, replaces the T_reh prior by one on the e-folds of
	// reheating (fixed or uniform; a point whose T_reh falls below TLoGeV
	// has zero likelihood). NStar, when set, replaces the reheating
	// history by a prior on N* itself (W, TLoGeV and NReh are then unused).
	NReh, NStar *Prior
}

// Likelihood is what an inference needs of a constraint set: -2 ln of the
// likelihood of (n_s, r) relative to its peak (compare.Constraint's
// DeltaChi2).
type Likelihood interface {
	DeltaChi2(ns, r float64) float64
}

// Product is the likelihood of independent constraint sets: the product
// of theirs (the sum of their Delta chi^2).
type Product []Likelihood

// DeltaChi2 implements Likelihood.
func (p Product) DeltaChi2(ns, r float64) float64 {
	var s float64
	for _, l := range p {
		s += l.DeltaChi2(ns, r)
	}
	return s
}

// Derived are the quantities every node records, in this order after the
// free parameters: w_reh, log10 T_reh [GeV], N_reh, N*, n_s, r.
var Derived = []string{"w_reh", "log10_T_reh_GeV", "N_reh", "N_star", "n_s", "r"}

// Coordinates names the cube's coordinates of p, in order: the free
// parameters, then w_reh if free, then u_T.
func (p Problem) Coordinates() []string {
	var out []string
	for _, q := range p.Params {
		if q.free() {
			out = append(out, q.Name)
		}
	}
	if p.W.free() {
		out = append(out, "w_reh")
	}
	return append(out, "u_T")
}

// Integrand returns the cube's integrand of p (the likelihood at each
// point of the prior) and its dimension. Each node's derived values are
// the free parameters' values, then Derived. A point where the model
// cannot be evaluated (no end of inflation, a reheating temperature
// above what the point allows) has zero likelihood; a malformed problem
// is an error.
func (p Problem) Integrand() (Integrand, int, error) {
	fam, err := model.Lookup(p.Family)
	if err != nil {
		return nil, 0, err
	}
	for _, q := range append(append([]Prior(nil), p.Params...), p.W) {
		if err := q.Check(); err != nil {
			return nil, 0, err
		}
	}
	if p.W.free() && !(p.W.Lo > -1.0/3 && p.W.Hi <= 1) {
		return nil, 0, fmt.Errorf("prior of w_reh: [%g, %g] leaves -1/3 < w_reh <= 1", p.W.Lo, p.W.Hi)
	}
	if !p.W.free() && !(p.W.Value > -1.0/3 && p.W.Value <= 1) {
		return nil, 0, fmt.Errorf("w_reh = %g: reheating needs -1/3 < w_reh <= 1", p.W.Value)
	}
	if p.Like == nil {
		return nil, 0, errors.New("inference needs a likelihood (a constraint set)")
	}
	for _, q := range []*Prior{p.NReh, p.NStar} {
		if q == nil {
			continue
		}
		if err := q.Check(); err != nil {
			return nil, 0, err
		}
		if q.Kind == LogUniform {
			return nil, 0, fmt.Errorf("prior of %s: a value or a uniform range", q.Name)
		}
		lo := q.Value
		if q.free() {
			lo = q.Lo
		}
		if !(lo >= 0) {
			return nil, 0, fmt.Errorf("prior of %s: %g e-folds, want >= 0", q.Name, lo)
		}
	}
	if p.NReh != nil && p.NStar != nil {
		return nil, 0, errors.New("a prior on N_reh or on N*, not both")
	}
	tlo := p.TLoGeV
	if tlo == 0 {
		tlo = reheat.DefaultBBNBoundGeV
	}
	if !(tlo > 0) {
		return nil, 0, fmt.Errorf("T_reh lower bound %g GeV: want > 0", tlo)
	}
	norm := reheat.Normalisation{As: p.As}
	free := 0
	for _, q := range p.Params {
		if q.free() {
			free++
		}
	}
	dims := free
	switch {
	case p.NStar != nil:
		if p.NStar.free() {
			dims++
		}
	case p.NReh != nil:
		if p.NReh.free() {
			dims++
		}
		if p.W.free() {
			dims++
		}
	default:
		dims++ // u_T
		if p.W.free() {
			dims++
		}
	}
	if dims == 0 {
		return nil, 0, errors.New("nothing to infer: every prior is fixed")
	}
	// The slow-roll solution and its instantaneous maximum depend on the
	// model's parameters only: kept per point of the parameters (nodes
	// share them along the other coordinates).
	type solved struct {
		sol  *slowroll.Solution
		tmax float64 // [M_p]
		err  error
	}
	var mu sync.Mutex
	sols := map[string]*solved{}
	solve := func(params map[string]float64, key string) *solved {
		mu.Lock()
		s, ok := sols[key]
		mu.Unlock()
		if ok {
			return s
		}
		s = &solved{}
		m, err := fam.New(params)
		if err == nil {
			s.sol, err = slowroll.Solve(m, nil)
		}
		if err == nil {
			var pr reheat.Prediction
			if pr, err = reheat.Instant(s.sol, p.History, norm); err == nil {
				s.tmax = pr.TReh
			}
		}
		s.err = err
		mu.Lock()
		sols[key] = s
		mu.Unlock()
		return s
	}
	lnTlo := detmath.Log(tlo / reheat.ReducedPlanckGeV)
	f := func(u []float64) (float64, []float64, error) {
		params := make(map[string]float64, len(p.Params))
		der := make([]float64, 0, free+len(Derived))
		key := ""
		i := 0
		for _, q := range p.Params {
			v := q.Value
			if q.free() {
				v = q.At(u[i])
				i++
				der = append(der, v)
			}
			params[q.Name] = v
			key += strconv.FormatUint(math.Float64bits(v), 16) + ","
		}
		nan := math.NaN()
		s := solve(params, key)
		if p.NStar != nil {
			N := p.NStar.Value
			if p.NStar.free() {
				N = p.NStar.At(u[i])
			}
			if s.err != nil {
				return math.Inf(-1), append(der, nan, nan, nan, N, nan, nan), nil
			}
			pr, err := reheat.AtEfolds(s.sol, N, norm)
			if err != nil {
				return math.Inf(-1), append(der, nan, nan, nan, N, nan, nan), nil
			}
			return -0.5 * p.Like.DeltaChi2(pr.Obs.Ns, pr.Obs.R), append(der, nan, nan, nan, pr.N, pr.Obs.Ns, pr.Obs.R), nil
		}
		w := p.W.Value
		if p.W.free() {
			w = p.W.At(u[i])
			i++
		}
		if p.NReh != nil {
			n := p.NReh.Value
			if p.NReh.free() {
				n = p.NReh.At(u[i])
			}
			if s.err != nil {
				return math.Inf(-1), append(der, w, nan, n, nan, nan, nan), nil
			}
			pr, err := reheat.Match(reheat.FirstOrder{Sol: s.sol, Norm: norm}, p.History, reheat.Era{Kind: reheat.EraEfolds, W: w, NReh: n}, 55)
			if err != nil || pr.TReh < tlo/reheat.ReducedPlanckGeV {
				return math.Inf(-1), append(der, w, nan, n, nan, nan, nan), nil
			}
			return -0.5 * p.Like.DeltaChi2(pr.Obs.Ns, pr.Obs.R), append(der, w, detmath.Log10(reheat.GeV(pr.TReh)), pr.NReh, pr.N, pr.Obs.Ns, pr.Obs.R), nil
		}
		uT := u[i]
		if s.err != nil || !(s.tmax > 0) {
			return math.Inf(-1), append(der, w, math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()), nil
		}
		lnTmax := detmath.Log(s.tmax)
		if lnTmax <= lnTlo {
			return math.Inf(-1), append(der, w, math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()), nil
		}
		T := detmath.Exp(lnTlo + float64(uT*(lnTmax-lnTlo)))
		pr, err := reheat.Match(reheat.FirstOrder{Sol: s.sol, Norm: norm}, p.History, reheat.Era{Kind: reheat.EraTemperature, W: w, T: math.Min(T, s.tmax)}, 55)
		if err != nil {
			return math.Inf(-1), append(der, w, math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()), nil
		}
		lnL := -0.5 * p.Like.DeltaChi2(pr.Obs.Ns, pr.Obs.R)
		return lnL, append(der, w, detmath.Log10(reheat.GeV(pr.TReh)), pr.NReh, pr.N, pr.Obs.Ns, pr.Obs.R), nil
	}
	return f, dims, nil
}
