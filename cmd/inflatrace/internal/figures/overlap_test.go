package figures

import (
	"fmt"
	"strconv"
	"testing"

	"gonum.org/v1/plot"

	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/study"
)

// manyModels is a study of n models, each at N* = 50 and 60, compared
// with one constraint (predictions as the attractors' closed forms give
// them at large N: n_s = 1 - 2/N, r = 12 alpha / N^2; Kallosh & Linde
// 2013, arXiv:1306.5220).
func manyModels(n int) []study.Result {
	var rows []study.Result
	for k := 0; k < n; k++ {
		alpha := 0.1 * float64(k+1)
		for _, N := range []float64{50, 60} {
			rows = append(rows, study.Result{
				Label: "attractor-" + strconv.Itoa(k+1) + "(alpha=" + strconv.FormatFloat(alpha, 'g', -1, 64) + ") | N*=" + strconv.FormatFloat(N, 'g', -1, 64) + " | set",
				Model: "e-model", Params: map[string]float64{"alpha": alpha}, Method: "first", Reheating: "fixed-efolds",
				NStar: N, Ns: 1 - 2/N, R: 12 * alpha / (N * N),
			})
		}
	}
	return rows
}

// TestKeyIdentifiesThirtyModels: 30 models give 30 key entries with 30
// distinct line styles, plus one marker entry per N*; no two labels of the
// drawn figure overlap, no key entry covers the data and nothing leaves
// the page, on a linear and a log r axis and for r against alpha.
func TestKeyIdentifiesThirtyModels(t *testing.T) {
	rows := manyModels(30)
	curves, marks, err := CurvesAlong(rows, AlongNStar)
	if err != nil {
		t.Fatal(err)
	}
	f := compare.Forecast{Name: "TERN-B", Citation: "invented demo", SigmaR: 1e-3}
	for _, scale := range []Scale{Linear, Log} {
		fig, err := NsR(NsRSpec{Title: "thirty models", RScale: scale, Curves: curves, Markers: marks,
			Constraints: []ConstraintLayer{{Set: upperLimit}}, Forecasts: []ForecastLine{{Forecast: f}}})
		if err != nil {
			t.Fatal(err)
		}
		styles := map[string]bool{}
		lines := 0
		for _, e := range fig.Key {
			if e.Swatch.Kind == SwatchLine {
				lines++
				styles[styleKey(e.Swatch)] = true
			}
		}
		if lines != 30 || len(styles) != 30 {
			t.Errorf("%d model entries with %d distinct styles, want 30 and 30", lines, len(styles))
		}
		if len(marks) != 2 {
			t.Errorf("%d marker entries, want 2 (N* = 50, 60)", len(marks))
		}
		for _, o := range fig.Overlaps() {
			t.Errorf("scale %d: %s", scale, o)
		}
	}
	xy, marks, err := RCurvesAlong(rows, "alpha", 3)
	if err != nil {
		t.Fatal(err)
	}
	fig, err := RAlpha(RAlphaSpec{Title: "thirty models", XScale: Log, Curves: xy, Markers: marks, Forecasts: []ForecastLine{{Forecast: f}}})
	if err != nil {
		t.Fatal(err)
	}
	for _, o := range fig.Overlaps() {
		t.Errorf("r against alpha: %s", o)
	}
}

// TestOverlapsFindsOverlaps: the check is not vacuous. A title wider than
// the page, and crowded tick labels, are found.
func TestOverlapsFindsOverlaps(t *testing.T) {
	long := ""
	for i := 0; i < 40; i++ {
		long += "a very long title "
	}
	fig, err := NsR(NsRSpec{Title: long, Constraints: []ConstraintLayer{{Set: upperLimit}}})
	if err != nil {
		t.Fatal(err)
	}
	if len(fig.Overlaps()) == 0 {
		t.Error("a title wider than the page was not reported")
	}
	// Forty labelled ticks on the n_s axis cannot all fit.
	fig, err = NsR(NsRSpec{Curves: []Curve{{Label: "m", Points: []compare.Point{{Ns: 0.96, R: 0.01}}}}})
	if err != nil {
		t.Fatal(err)
	}
	var ticks []plot.Tick
	for i := 0; i < 40; i++ {
		v := fig.Plot.X.Min + float64(i)/40*(fig.Plot.X.Max-fig.Plot.X.Min)
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', 5, 64)})
	}
	fig.Plot.X.Tick.Marker = plot.ConstantTicks(ticks)
	if len(fig.Overlaps()) == 0 {
		t.Error("forty crowded tick labels were not reported")
	}
}

func styleKey(s Swatch) string {
	r, g, b, a := s.Line.Color.RGBA()
	return strconv.Itoa(int(r)) + "," + strconv.Itoa(int(g)) + "," + strconv.Itoa(int(b)) + "," + strconv.Itoa(int(a)) + "/" + fmt.Sprint(s.Line.Dashes)
}
