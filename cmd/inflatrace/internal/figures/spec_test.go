package figures

import (
	"math"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// TestDecadeTicks: on [1e-4, 0.1] a labelled tick at each power of ten
// and unlabelled ones at 2..9 times each: 3 decades x 9 + 1 = 28 ticks.
// On [2.5e-3, 0.03] only 0.01 is a power of ten in range, so 0.005 and
// 0.02 are labelled too.
func TestDecadeTicks(t *testing.T) {
	ticks := decadeTicks{}.Ticks(1e-4, 0.1)
	if len(ticks) != 28 {
		t.Errorf("%d ticks, want 28", len(ticks))
	}
	var labels []string
	for _, tk := range ticks {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	if got := strings.Join(labels, " "); got != "$10^{-4}$ $10^{-3}$ $10^{-2}$ 0.1" {
		t.Errorf("labels %q", got)
	}
	ticks = decadeTicks{}.Ticks(2.5e-3, 0.03)
	labels = nil
	for _, tk := range ticks {
		if tk.Value < 2.5e-3 || tk.Value > 0.03 {
			t.Errorf("tick %g out of range", tk.Value)
		}
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	// Less than two decades' labels: 2 and 5 times a power are labelled
	// too, so the axis carries numbers to read it by.
	if strings.Join(labels, " ") != "0.005 $10^{-2}$ 0.02" || len(ticks) != 10 {
		t.Errorf("ticks %v", ticks)
	}
}

// TestNsRRanges: fitted ranges hold the content, so nothing is clipped
// (r from 0 on a linear axis; on a log one from the smallest r over 1.5
// to the largest times 1.5, however small r is); given ranges are kept
// and the points outside them counted.
func TestNsRRanges(t *testing.T) {
	curve := []Curve{{Points: []compare.Point{{Ns: 0.95, R: 0.08}, {Ns: 0.97, R: 0.002}}}}
	f, err := NsR(NsRSpec{Constraints: []ConstraintLayer{{Set: upperLimit}}, Curves: curve})
	if err != nil {
		t.Fatal(err)
	}
	p := f.Plot
	// The 95% ellipse of the upper limit spans n_s = 0.9649 ± sqrt(6.18) 0.0042.
	half := math.Sqrt(compare.Chi2Level(compare.P95)) * 0.0042
	if p.Y.Min != 0 || p.Y.Max < 0.08 || p.X.Min > 0.9649-half || p.X.Max < 0.97 || f.Clipped != 0 {
		t.Errorf("linear ranges x [%g, %g] y [%g, %g], %d clipped", p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, f.Clipped)
	}
	for _, small := range []float64{0.002, 1e-7} {
		c := []Curve{{Points: []compare.Point{{Ns: 0.95, R: 0.08}, {Ns: 0.97, R: small}}}}
		f, err = NsR(NsRSpec{RScale: Log, Curves: c})
		if err != nil {
			t.Fatal(err)
		}
		if p := f.Plot; math.Abs(p.Y.Min-small/1.5) > 1e-15 || p.Y.Max < 0.08*1.5 || f.Clipped != 0 {
			t.Errorf("log r range [%g, %g] for r down to %g, %d clipped", p.Y.Min, p.Y.Max, small, f.Clipped)
		}
	}
	f, err = NsR(NsRSpec{RScale: Log, NsRange: [2]float64{0.95, 0.98}, RRange: [2]float64{1e-2, 0.05}, Curves: curve})
	if err != nil {
		t.Fatal(err)
	}
	if p := f.Plot; p.X.Min != 0.95 || p.X.Max != 0.98 || p.Y.Min != 1e-2 || p.Y.Max != 0.05 || f.Clipped != 2 {
		t.Errorf("given ranges not kept: x [%g, %g] y [%g, %g], %d clipped (want 2)", p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, f.Clipped)
	}
}

// otherConstraint is a Constraint of a type figures cannot contour.
type otherConstraint struct{ compare.Gaussian }

// TestSpecErrors: malformed specs are refused with a message naming the
// problem.
func TestSpecErrors(t *testing.T) {
	pt := []compare.Point{{Ns: 0.96, R: 0.01}}
	two := []compare.Point{{Ns: 0.96, R: 0.01}, {Ns: 0.965, R: 0.005}}
	for _, c := range []struct {
		name string
		spec NsRSpec
		msg  string
	}{
		{"bad scale", NsRSpec{RScale: 7}, "unknown r scale"},
		{"reversed range", NsRSpec{NsRange: [2]float64{0.98, 0.95}}, "want min < max"},
		{"log range from 0", NsRSpec{RScale: Log, RRange: [2]float64{0, 0.1}}, "want min > 0"},
		{"small grid", NsRSpec{Grid: 3}, "at least 10"},
		{"markers", NsRSpec{Curves: []Curve{{Label: "c", Points: two, Markers: []Marker{MarkerRing}}}}, "1 markers for 2 points"},
		{"NaN", NsRSpec{Curves: []Curve{{Label: "c", Points: []compare.Point{{Ns: math.NaN(), R: 0.01}}}}}, "want finite"},
		{"stripe edges", NsRSpec{Stripes: []Stripe{{Label: "s", Lower: two, Upper: pt}}}, "edges of 2 and 1 points"},
		{"stripe both", NsRSpec{Stripes: []Stripe{{Label: "s", Lower: two, Upper: two, Path: two}}}, "not both"},
		{"stripe path", NsRSpec{Stripes: []Stripe{{Label: "s", Path: pt}}}, "at least 2 points"},
		{"no set", NsRSpec{Constraints: []ConstraintLayer{{}}}, "without a constraint set"},
		{"other type", NsRSpec{Constraints: []ConstraintLayer{{Set: otherConstraint{upperLimit}}}}, "no contours for a figures.otherConstraint"},
	} {
		_, err := NsR(c.spec)
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.msg)
		}
	}
	f := compare.Forecast{Name: "f", Citation: "c", SigmaR: 1e-3}
	for _, c := range []struct {
		name string
		spec RAlphaSpec
		msg  string
	}{
		{"lengths", RAlphaSpec{Curves: []XYCurve{{Label: "c", X: []float64{1, 2}, R: []float64{0.01}}}}, "2 x values for 1 r values"},
		{"forecast", RAlphaSpec{Forecasts: []ForecastLine{{Forecast: compare.Forecast{Name: "f", Citation: "c"}}}}, "sigma(r) = 0"},
		{"multiple", RAlphaSpec{Forecasts: []ForecastLine{{Forecast: f, K: -2}}}, "K = -2"},
		{"log x from 0", RAlphaSpec{XScale: Log, XRange: [2]float64{0, 10}}, "want min > 0"},
	} {
		_, err := RAlpha(c.spec)
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.msg)
		}
	}
}

// TestForecastLabel: the default key text names the experiment and
// states the rule with its multiple and level.
func TestForecastLabel(t *testing.T) {
	if got := forecastLabel("X", 3, 1.5e-3); got != `X: detects $r$ at 3$\sigma$ above $r$ = 3$\sigma(r)$ = 0.0015` {
		t.Errorf("got %q", got)
	}
}
