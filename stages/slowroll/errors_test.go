package slowroll

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/num"
)

// handModel builds a canonical model directly from a potential.
func handModel(name string, v func(num.Jet) num.Jet, lo, hi float64) *model.Model {
	return &model.Model{Family: name, Params: map[string]float64{}, V: v, Lo: lo, Hi: hi}
}

func square(phi num.Jet) num.Jet { return num.Mul(phi, phi) }

// TestRangeErrors: ranges where inflation does not behave are refused with
// a RangeError saying why (architecture habit 3: typed errors carrying the
// offending values).
func TestRangeErrors(t *testing.T) {
	pl := mustModel(t, "power-law", map[string]float64{"p": 2})
	never, err := pl.WithRange(5, 20) // epsilon_V = 2/phi^2 <= 0.08 there
	if err != nil {
		t.Fatal(err)
	}
	noInflation, err := pl.WithRange(0.01, 1) // epsilon_V >= 2 there
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name  string
		m     *model.Model
		words []string
	}{
		{"phi^2 on (5, 20)", never, []string{"inflation never ends", "epsilon_V < 1 everywhere", "5 < phi < 20"}},
		{"phi^2 on (0.01, 1)", noInflation, []string{"inflation never happens", "epsilon_V > 1"}},
		{"phi^2 on (-20, 20): two ends", handModel("sym", square, -20, 20), []string{"several separate ends"}},
		{"phi^2 - 1: negative potential", handModel("neg", func(p num.Jet) num.Jet { return num.AddConst(square(p), -1) }, 0, 10), []string{"<= 0"}},
		{"phi^-2: the field rolls into inflation", handModel("runaway", func(p num.Jet) num.Jet { return num.Recip(square(p)) }, 0.5, 10), []string{"no end of inflation"}},
	}
	for _, c := range cases {
		_, err := Solve(c.m, nil)
		var re *RangeError
		if !errors.As(err, &re) {
			t.Errorf("%s: error %v, want a RangeError", c.name, err)
			continue
		}
		for _, w := range c.words {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", c.name, err, w)
			}
		}
	}
}

// TestTooManyEfolds: phi^2 on (1, 20) holds N(20) = (400 - 2)/4 = 99.5
// e-folds (N = phi^2/4 - 1/2, textbook); 99 can be asked for, 150 not.
func TestTooManyEfolds(t *testing.T) {
	m, err := mustModel(t, "power-law", map[string]float64{"p": 2}).WithRange(1, 20)
	if err != nil {
		t.Fatal(err)
	}
	sol, err := Solve(m, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := sol.Evaluate(99); err != nil {
		t.Errorf("N = 99 of 99.5 available: %v", err)
	}
	_, _, err = sol.Evaluate(150)
	var re *RangeError
	if !errors.As(err, &re) || !strings.Contains(err.Error(), "e-folds") || !strings.Contains(err.Error(), "150 requested") {
		t.Fatalf("N = 150: error %v, want a RangeError about e-folds", err)
	}
	// The message reports what is available: 99.5 to its 4 printed digits.
	if !strings.Contains(err.Error(), "only 99.5") {
		t.Errorf("error %q should say that only 99.5 e-folds are available", err)
	}
	for _, N := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := sol.PhiAt(N); err == nil || !strings.Contains(err.Error(), "want a finite N >= 0") {
			t.Errorf("PhiAt(%g): error %v", N, err)
		}
	}
	if phi, err := sol.PhiAt(0); err != nil || phi != sol.End.Phi {
		t.Errorf("PhiAt(0) = %g, %v; want the end %g", phi, err, sol.End.Phi)
	}
}
