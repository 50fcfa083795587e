package slowroll

import (
	"errors"
	"math"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
)

// TestCheckPivot: the check passes the pivot PhiAt returns and refuses a
// field on the wrong side of the end, beyond the range, or with another
// e-fold count. For phi^2 the count is N = (phi^2 - phi_end^2)/4 with
// phi_end = sqrt(2) (Liddle & Lyth 2000, Cosmological Inflation and
// Large-Scale Structure, eq. 3.50 for V ∝ phi^p with p = 2; from memory),
// so phi at N = 55 is sqrt(222) exactly.
func TestCheckPivot(t *testing.T) {
	f, err := model.Lookup("power-law")
	if err != nil {
		t.Fatal(err)
	}
	m, err := f.New(map[string]float64{"p": 2})
	if err != nil {
		t.Fatal(err)
	}
	sol, err := Solve(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	phi, err := sol.PhiAt(55)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(phi-math.Sqrt(222)) > 1e-10 {
		t.Fatalf("phi(55) = %.15g, want sqrt(222) = %.15g", phi, math.Sqrt(222))
	}
	if err := sol.CheckPivot(phi, PivotCheck{Target: 55}); err != nil {
		t.Errorf("the true pivot: %v", err)
	}
	for _, c := range []struct {
		what string
		phi  float64
		n    float64
	}{
		{"inside the end", 1.0, 55},
		{"at the end", sol.End.Phi, 55},
		{"beyond the range", m.Hi + 1, 55},
		{"another count (1e-6 e-folds off)", math.Sqrt(222 + 4e-6), 55},
		{"not a number", math.NaN(), 55},
	} {
		var ce *ConsistencyError
		if err := sol.CheckPivot(c.phi, PivotCheck{Target: c.n}); !errors.As(err, &ce) {
			t.Errorf("%s: phi = %g passes (%v)", c.what, c.phi, err)
		}
	}
	if err := CheckObservables("x", 55, Observables{Ns: math.NaN()}); err == nil {
		t.Error("NaN n_s passes")
	}
	if err := CheckObservables("x", 55, Observables{Ns: 0.96, R: -1e-3}); err == nil {
		t.Error("negative r passes")
	}
}
