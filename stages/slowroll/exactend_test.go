package slowroll

import (
	"errors"
	"math"
	"sync"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// TestExactEndConditions: each end condition holds at the located end,
// to the event tolerance (the definitions; common practice):
// epsilon_H = 1 (FlowAt(0).Eps1), epsilon_V = 1 at the same field as the
// slow-roll FindEnd, |eta_V| = 1 for a quartic hilltop with mu = 2 (whose
// slow roll fails through eta, at phi²/18 = epsilon_V < 1, derived here),
// and the given field. The epsilon_V end comes before the epsilon_H one
// (epsilon_H < epsilon_V near the end), so it leaves fewer e-folds; a
// field end at phi = 3 for phi² (before epsilon_V = 1 at sqrt 2) puts the
// pivot further up the potential, where n_s is closer to 1.
func TestExactEndConditions(t *testing.T) {
	m := exModel(t, "e-model", map[string]float64{"alpha": 1})
	es, err := SolveExact(m, 55, nil)
	if err != nil {
		t.Fatal(err)
	}
	if f, err := es.FlowAt(0); err != nil || math.Abs(f.Eps1-1) > 1e-9 {
		t.Errorf("epsilon_H at the end = %.12g (%v), want 1", f.Eps1, err)
	}
	ev, err := SolveExact(m, 55, &ExactSettings{End: EndEpsilonV})
	if err != nil {
		t.Fatal(err)
	}
	sr := exSolve(t, m)
	if p := At(m, ev.PhiEnd()); math.Abs(p.Epsilon-1) > 1e-9 || math.Abs(ev.PhiEnd()-sr.End.Phi) > 1e-9 {
		t.Errorf("epsilon_V end at phi = %.12g (epsilon_V = %.12g), slow-roll end %.12g", ev.PhiEnd(), p.Epsilon, sr.End.Phi)
	}
	if !(ev.NTotal() < es.NTotal()) {
		t.Errorf("epsilon_V end after %.6g e-folds, epsilon_H end after %.6g: want the epsilon_V end first", ev.NTotal(), es.NTotal())
	}

	h := exModel(t, "hilltop", map[string]float64{"mu": 2, "p": 4})
	eta := exExact(t, h, 55, &ExactSettings{End: EndEtaV})
	if p := At(h, eta.PhiEnd); math.Abs(math.Abs(p.Eta)-1) > 1e-9 || !(p.Epsilon < 1) {
		t.Errorf("hilltop |eta_V| end at phi = %.12g: eta_V = %.12g, epsilon_V = %.4g", eta.PhiEnd, p.Eta, p.Epsilon)
	}

	q := exModel(t, "power-law", map[string]float64{"p": 2})
	fe := exExact(t, q, 55, &ExactSettings{End: EndField, EndPhi: 3})
	eh := exExact(t, q, 55, nil)
	if fe.PhiEnd != 3 && math.Abs(fe.PhiEnd-3) > 1e-12 {
		t.Errorf("field end at %.15g, want 3", fe.PhiEnd)
	}
	if !(fe.Ns > eh.Ns) || !(fe.Phi > eh.Phi) {
		t.Errorf("field end at 3: n_s %.6g, phi_* %.6g; epsilon_H end: n_s %.6g, phi_* %.6g", fe.Ns, fe.Phi, eh.Ns, eh.Phi)
	}
}

// exInverseSquare is V = phi^-2, which rolls towards larger phi while
// epsilon_V = 2/phi² falls: epsilon_V = 1 is crossed only by climbing.
func exInverseSquare() *model.Model {
	return &model.Model{Family: "test-inverse-square", V: func(phi num.Jet) num.Jet { return num.PowConst(phi, -2) }, Lo: 0.1, Hi: 10}
}

// exMassive is V = 1 + phi², whose minimum (V = 1) the field overshoots:
// m² = 2 exceeds (9/4)H² = 3/4 there.
func exMassive() *model.Model {
	return &model.Model{Family: "test-massive", V: func(phi num.Jet) num.Jet { return num.AddConst(num.Mul(phi, phi), 1) }, Lo: -50, Hi: 50}
}

// TestExactErrors: models without a prediction give an *InflationError
// of the right kind carrying the values, and bad arguments are errors.
func TestExactErrors(t *testing.T) {
	kindOf := func(err error) (InflationKind, *InflationError) {
		var ie *InflationError
		if errors.As(err, &ie) {
			return ie.Kind, ie
		}
		return 0, nil
	}
	cases := []struct {
		name string
		m    *model.Model
		N    float64
		s    *ExactSettings
		want InflationKind
	}{
		// Power-law inflation: epsilon = 1/p < 1 everywhere.
		{"exponential, epsilon_H end", exExponential(10), 55, nil, NeverEnds},
		// The same with a far field end but a short e-fold budget.
		{"exponential, budget", exExponential(10), 55, &ExactSettings{End: EndField, EndPhi: 300, MaxEfolds: 40}, NeverEnds},
		// lambda = 2: epsilon = 2 everywhere.
		{"steep exponential", exExponential(0.5), 55, &ExactSettings{End: EndField, EndPhi: 300}, NeverStarts},
		{"inverse square", exInverseSquare(), 55, nil, Climbs},
		// phi²: epsilon_H = 1 near phi = sqrt 2, before phi = 0.5.
		{"phi² ended below its end", exModel(t, "power-law", map[string]float64{"p": 2}), 55, &ExactSettings{End: EndField, EndPhi: 0.5}, EndsEarly},
		{"end field outside the range", exModel(t, "power-law", map[string]float64{"p": 2}), 55, &ExactSettings{End: EndField, EndPhi: -1}, BadPotential},
		{"pivot too close to the end", exModel(t, "starobinsky", nil), 5, nil, TooFewEfolds},
	}
	short, err := exModel(t, "e-model", map[string]float64{"alpha": 1}).WithRange(0, 4)
	if err != nil {
		t.Fatal(err)
	}
	cases = append(cases, struct {
		name string
		m    *model.Model
		N    float64
		s    *ExactSettings
		want InflationKind
	}{"range too short", short, 55, nil, TooFewEfolds})
	for _, c := range cases {
		_, err := Exact(c.m, c.N, c.s)
		kind, ie := kindOf(err)
		if kind != c.want {
			t.Errorf("%s: err = %v, want kind %v", c.name, err, c.want)
			continue
		}
		t.Logf("%s: %v", c.name, err)
		if ie.Model != c.m.Describe() || ie.Error() == "" {
			t.Errorf("%s: error names model %q", c.name, ie.Model)
		}
	}
	// Values: the steep exponential starts with epsilon_H = lambda²/2 = 2.
	_, err = Exact(exExponential(0.5), 55, &ExactSettings{End: EndField, EndPhi: 300})
	if _, ie := kindOf(err); ie == nil || math.Abs(ie.EpsilonH-2) > 1e-9 || !(ie.Phi < 300) {
		t.Errorf("steep exponential: %+v, want epsilon_H = 2 at a field below 300", ie)
	}
	// phi² ends early at epsilon_H = 1, i.e. |pi| = sqrt 2, near phi = 1.
	_, err = Exact(exModel(t, "power-law", map[string]float64{"p": 2}), 55, &ExactSettings{End: EndField, EndPhi: 0.5})
	if _, ie := kindOf(err); ie == nil || math.Abs(ie.EpsilonH-1) > 1e-9 || !(ie.Phi > 0.5 && ie.Phi < 1.5) {
		t.Errorf("phi² ending early: %+v", ie)
	}
	// Overshooting a minimum: started at phi = 3 towards a field end on
	// the far side of the minimum of 1 + phi², the field climbs (or
	// stops inflating) before it gets there.
	cfg, _ := (&ExactSettings{End: EndField, EndPhi: -5}).config()
	cfg.maxEfolds = 100
	_, err = integrateBackground(exMassive(), 3, -1, &cfg)
	if kind, _ := kindOf(err); kind != Climbs && kind != EndsEarly {
		t.Errorf("overshooting field: err = %v, want Climbs or EndsEarly", err)
	} else {
		t.Logf("overshooting field: %v", err)
	}
	// Arguments.
	m := exModel(t, "starobinsky", nil)
	for _, s := range []*ExactSettings{{DepthIn: 0.5}, {DepthOut: 2}, {RTol: -1}, {End: EndCondition(9)}, {End: EndField, EndPhi: math.NaN()}} {
		if _, err := Exact(m, 55, s); err == nil {
			t.Errorf("settings %+v accepted", *s)
		}
	}
	for _, N := range []float64{0, -3, math.Inf(1), math.NaN()} {
		if _, err := Exact(m, N, nil); err == nil {
			t.Errorf("N = %g accepted", N)
		}
	}
	es, err := SolveExact(m, 55, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := es.At(es.NTotal() + 1); err == nil {
		t.Error("a pivot before the initial point was accepted")
	} else if kind, _ := kindOf(err); kind != TooFewEfolds {
		t.Errorf("pivot before the start: %v", err)
	}
}

// TestExactSolutionAt: one background serves several pivots: At(N) from
// a solve for NMax = 65 agrees with separate Exact calls (whose
// backgrounds start elsewhere) to 1e-9, FlowAt matches At's Flow, repeated
// calls give identical bits, and concurrent calls equal serial ones
// (properties: warm equals cold, serial equals parallel).
func TestExactSolutionAt(t *testing.T) {
	m := exModel(t, "t-model", map[string]float64{"alpha": 1})
	es, err := SolveExact(m, 65, nil)
	if err != nil {
		t.Fatal(err)
	}
	Ns := []float64{45, 50, 55, 60, 65}
	serial := make([]ExactResult, len(Ns))
	for i, N := range Ns {
		r, err := es.At(N)
		if err != nil {
			t.Fatal(err)
		}
		serial[i] = r
		sep := exExact(t, m, N, nil)
		if math.Abs(r.Ns-sep.Ns) > 1e-9 || math.Abs(r.R/sep.R-1) > 1e-9 || math.Abs(r.AlphaS-sep.AlphaS) > 1e-9 || math.Abs(r.PsV0/sep.PsV0-1) > 1e-9 {
			t.Errorf("N = %g: shared background %+v, separate %+v", N, r, sep)
		}
		f, err := es.FlowAt(N)
		if err != nil || f != r.Flow {
			t.Errorf("N = %g: FlowAt %+v (%v), At's Flow %+v", N, f, err, r.Flow)
		}
		again, _ := es.At(N)
		if again != r {
			t.Errorf("N = %g: repeated At differs", N)
		}
	}
	par := make([]ExactResult, len(Ns))
	var wg sync.WaitGroup
	for i, N := range Ns {
		wg.Add(1)
		go func(i int, N float64) {
			defer wg.Done()
			par[i], _ = es.At(N)
		}(i, N)
	}
	wg.Wait()
	for i := range Ns {
		if par[i] != serial[i] {
			t.Errorf("N = %g: parallel result differs from serial", Ns[i])
		}
	}
	a, b := exExact(t, m, 55, nil), exExact(t, m, 55, nil)
	if a != b {
		t.Error("two identical Exact calls differ")
	}
}
