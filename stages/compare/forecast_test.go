package compare

import (
	"math"
	"testing"
)

// TestForecast: the detection significance of r is r/sigma(r) (a Gaussian
// likelihood in r with sigma(r) fixed at its r = 0 value; common
// practice): r = 0.003 with sigma(r) = 0.001 is a 3 sigma detection.
func TestForecast(t *testing.T) {
	f := Forecast{Name: "stage-x", Citation: "invented for the test", SigmaR: 1e-3}
	if err := f.Check(); err != nil {
		t.Fatal(err)
	}
	if s := f.Significance(0.003); math.Abs(s-3) > 1e-12 {
		t.Errorf("Significance(0.003) = %g, want 3", s)
	}
	if !f.Detects(0.003, 3) || f.Detects(0.0029, 3) {
		t.Error("Detects at the 3 sigma threshold")
	}
	for _, bad := range []Forecast{
		{Citation: "c", SigmaR: 1e-3},
		{Name: "n", SigmaR: 1e-3},
		{Name: "n", Citation: "c"},
		{Name: "n", Citation: "c", SigmaR: -1},
		{Name: "n", Citation: "c", SigmaR: math.Inf(1)},
		{Name: "n", Citation: "c", SigmaR: math.NaN()},
	} {
		if bad.Check() == nil {
			t.Errorf("Check accepted %+v", bad)
		}
	}
}
