package slowroll

import (
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// Helpers of the exact-method and second-order tests (prefixed ex to
// keep clear of the other test files' helpers).

func exModel(t testing.TB, family string, p map[string]float64) *model.Model {
	t.Helper()
	f, err := model.Lookup(family)
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func exExact(t testing.TB, m *model.Model, N float64, s *ExactSettings) ExactResult {
	t.Helper()
	r, err := Exact(m, N, s)
	if err != nil {
		t.Fatalf("%s at N = %g: %v", m.Describe(), N, err)
	}
	return r
}

func exSolve(t testing.TB, m *model.Model) *Solution {
	t.Helper()
	sol, err := Solve(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

// exFamily is one built-in model of the accuracy tests: the families and
// parameter sets the exact method is specified for (t-model and e-model
// with 3 alpha = 1..7, Starobinsky, power law p = 2/3, 1, 2, 4, natural
// inflation f = 5..10, quadratic and quartic hilltops).
type exFamily struct {
	family string
	params map[string]float64
}

func exFamilies() []exFamily {
	var fs []exFamily
	for _, a := range []float64{1.0 / 3, 1, 7.0 / 3} {
		fs = append(fs, exFamily{"t-model", map[string]float64{"alpha": a}}, exFamily{"e-model", map[string]float64{"alpha": a}})
	}
	fs = append(fs, exFamily{"starobinsky", nil})
	for _, p := range []float64{2.0 / 3, 1, 2, 4} {
		fs = append(fs, exFamily{"power-law", map[string]float64{"p": p}})
	}
	for _, f := range []float64{5, 7, 10} {
		fs = append(fs, exFamily{"natural", map[string]float64{"f": f}})
	}
	for _, mu := range []float64{10, 20} {
		fs = append(fs, exFamily{"hilltop", map[string]float64{"mu": mu, "p": 2}}, exFamily{"hilltop", map[string]float64{"mu": mu, "p": 4}})
	}
	return fs
}

// exExponential is the power-law-inflation potential V = exp(-lambda phi)
// with lambda = sqrt(2/p), whose attractor has a ∝ t^p (Lucchin &
// Matarrese 1985, PRD 32, 1316), as a test-local model; inflation never
// ends in it.
func exExponential(p float64) *model.Model {
	lam := math.Sqrt(2 / p)
	return &model.Model{
		Family: "test-exponential", Params: map[string]float64{"p": p},
		V:  func(phi num.Jet) num.Jet { return num.Exp(num.Scale(-lam, phi)) },
		Lo: -100, Hi: 400,
	}
}

// exFlowSizes returns the second- and third-order sizes of the slow-roll
// corrections for Hubble-flow parameters h:
// S2 = ε1² + |ε1ε2| + ε2² + |ε2ε3| and
// S3 = |ε2|³ + ε2²|ε3| + |ε2| ε3² + ε1 (|ε2| + |ε3|)² + ε1² |ε2|.
func exFlowSizes(h HubbleFlow) (s2, s3 float64) {
	e1, e2, e3 := math.Abs(h.Eps1), math.Abs(h.Eps2), math.Abs(h.Eps3)
	s2 = e1*e1 + e1*e2 + e2*e2 + e2*e3
	s3 = e2*e2*e2 + e2*e2*e3 + e2*e3*e3 + e1*(e2+e3)*(e2+e3) + e1*e1*e2
	return s2, s3
}
