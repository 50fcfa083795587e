package slowroll

import (
	"errors"
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
)

// closedFormModels are models of the families with a closed-form e-fold
// count and end (model.Model.Efolds, EpsilonEnd), over their parameters.
func closedFormModels(t *testing.T) []*model.Model {
	var ms []*model.Model
	for _, alpha := range []float64{1e-3, 1e-1, 1, 10, 1e3} {
		for _, n := range []float64{0.5, 1, 2} {
			ms = append(ms, mustModel(t, "e-model", map[string]float64{"alpha": alpha, "n": n}),
				mustModel(t, "t-model", map[string]float64{"alpha": alpha, "n": n}))
		}
	}
	ms = append(ms, mustModel(t, "starobinsky", nil), mustModel(t, "power-law", map[string]float64{"p": 2}),
		mustModel(t, "power-law", map[string]float64{"p": 2.0 / 3}), mustModel(t, "exponential-plateau", map[string]float64{"q": 1}))
	return ms
}

// withoutClosedForms returns a copy of m with no closed forms: the end is
// then found by scanning the range and the e-folds are integrated.
func withoutClosedForms(m *model.Model) *model.Model {
	c := *m
	c.Efolds, c.EpsilonEnd = nil, nil
	return &c
}

// TestClosedFormEndIsTheScannedEnd: FindEnd from a model's closed-form end
// gives the end the scan of the range gives (FindEndWhere), to the bit
// (both are the sign change of epsilon_V - 1 that num.Polish narrows to
// adjacent floats), with the same direction and V.
func TestClosedFormEndIsTheScannedEnd(t *testing.T) {
	for _, m := range closedFormModels(t) {
		got, err := FindEnd(m, nil)
		if err != nil {
			t.Errorf("%s: %v", m.Describe(), err)
			continue
		}
		want, err := FindEndWhere(withoutClosedForms(m), EpsilonVCondition, nil)
		if err != nil {
			t.Errorf("%s scanned: %v", m.Describe(), err)
			continue
		}
		if got != want {
			t.Errorf("%s: end %+v, scanned %+v", m.Describe(), got, want)
		}
	}
}

// TestClosedFormEndRefused: a closed-form end that is not where
// epsilon_V = 1 (off by 1e-6 of the field, or outside the range) is not
// taken: FindEnd scans and finds the true end.
func TestClosedFormEndRefused(t *testing.T) {
	m := mustModel(t, "e-model", map[string]float64{"alpha": 1})
	want, err := FindEndWhere(withoutClosedForms(m), EpsilonVCondition, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, wrong := range []float64{want.Phi * (1 + 1e-6), m.Hi * 2, -1} {
		c := *m
		c.EpsilonEnd = func() float64 { return wrong }
		got, err := FindEnd(&c, nil)
		if err != nil || got != want {
			t.Errorf("closed form %g: end %+v (%v), want %+v", wrong, got, err, want)
		}
	}
}

// TestClosedFormEfoldsAgreeWithQuadrature: PhiAt and Near on the closed
// form agree with PhiAt on the quadrature of V/V' (the model without its
// closed forms) to 1e-10 relative in phi (both solve N(phi) = N to 1e-12
// relative; the quadrature's own tolerance is 1e-12), and Near's count is
// the closed form's N(phi) from the end.
func TestClosedFormEfoldsAgreeWithQuadrature(t *testing.T) {
	for _, m := range closedFormModels(t) {
		sol, err := Solve(m, nil)
		if err != nil {
			t.Fatalf("%s: %v", m.Describe(), err)
		}
		ref := &Solution{Model: withoutClosedForms(m), End: sol.End}
		for _, N := range []float64{1, 20, 55, 70} {
			phi, err := sol.PhiAt(N)
			if err != nil {
				t.Errorf("%s: PhiAt(%g): %v", m.Describe(), N, err)
				continue
			}
			want, err := ref.PhiAt(N)
			if err != nil {
				t.Errorf("%s: PhiAt(%g) by quadrature: %v", m.Describe(), N, err)
				continue
			}
			if !within(phi, want, 1e-10, 0) {
				t.Errorf("%s: phi(N = %g) = %.15g, by quadrature %.15g", m.Describe(), N, phi, want)
			}
			x, n, err := sol.Near(N)
			if err != nil {
				t.Errorf("%s: Near(%g): %v", m.Describe(), N, err)
				continue
			}
			if full := m.Efolds(sol.End.Phi, x); !within(n, full, 1e-12, 1e-13) || !within(n, N, 0.5, 0) {
				t.Errorf("%s: Near(%g) = (%g, %.15g), N(phi) from the end %.15g", m.Describe(), N, x, n, full)
			}
		}
	}
}

// TestCheckPivotCatchesWrongClosedForm: a closed-form count off by 1e-6
// of itself moves the pivot PhiAt returns; the independent quadrature of
// CheckPivot refuses it (its tolerance is 1e-8), while the right closed
// form passes.
func TestCheckPivotCatchesWrongClosedForm(t *testing.T) {
	for _, m := range closedFormModels(t) {
		wrong := *m
		wrong.Efolds = func(a, b float64) float64 { return (1 + 1e-6) * m.Efolds(a, b) }
		for _, c := range []struct {
			m    *model.Model
			pass bool
		}{{m, true}, {&wrong, false}} {
			sol, err := Solve(c.m, nil)
			if err != nil {
				t.Fatal(err)
			}
			phi, err := sol.PhiAt(55)
			if err != nil {
				t.Fatal(err)
			}
			err = sol.CheckPivot(phi, PivotCheck{Target: 55})
			var ce *ConsistencyError
			if c.pass && err != nil {
				t.Errorf("%s: the right closed form fails the check: %v", m.Describe(), err)
			}
			if !c.pass && !errors.As(err, &ce) {
				t.Errorf("%s: a closed form 1e-6 off passes the check (%v)", m.Describe(), err)
			}
		}
	}
}

// TestNearDeterministic: Near is a function of N alone, whatever was
// asked before (property): the same N after others gives the same bits.
func TestNearDeterministic(t *testing.T) {
	m := mustModel(t, "e-model", map[string]float64{"alpha": 1})
	cold, _ := Solve(m, nil)
	x0, n0, err := cold.Near(55)
	if err != nil {
		t.Fatal(err)
	}
	warm, _ := Solve(m, nil)
	for _, N := range []float64{70, 3, 120, 54.9} {
		if _, _, err := warm.Near(N); err != nil {
			t.Fatal(err)
		}
	}
	if x, n, _ := warm.Near(55); x != x0 || n != n0 || math.IsNaN(x) {
		t.Errorf("Near(55) after other counts: (%v, %v), cold (%v, %v)", x, n, x0, n0)
	}
}
