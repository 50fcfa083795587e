package figures

import (
	"strconv"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/study"
)

// res is a result of model "att" with parameter alpha at a fixed N*,
// labelled as study labels it, compared with constraint c.
func res(alpha, n, ns, r float64, c string) study.Result {
	return study.Result{
		Label:  "att(alpha=" + ftoa(alpha) + ", n=2) | N*=" + ftoa(n) + " | " + c,
		Model:  "alpha-attractor",
		Params: map[string]float64{"alpha": alpha, "n": 2},
		Method: "first", Reheating: "fixed-efolds",
		NStar: n, Ns: ns, R: r, Constraint: c,
	}
}

func ftoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// scan is att at alpha 1, 0.1, 10 (out of order) and N* 50, 60, each
// compared with two constraint sets, plus a failed result and a band.
func scan() []study.Result {
	var rows []study.Result
	for _, n := range []float64{60, 50} {
		for _, a := range []float64{1, 0.1, 10} {
			for _, c := range []string{"A", "B"} {
				rows = append(rows, res(a, n, 1-2/n, 12*a/(n*n), c))
			}
		}
	}
	bad := res(3, 50, 0, 0, "A")
	bad.Error = "inflation never ends"
	band := res(3, 55, 0.96, 0.004, "A")
	band.Band = &study.Band{Points: 10}
	return append(rows, bad, band)
}

// TestCurvesAlongParam: along alpha, one curve per N* (history), points
// ordered by alpha, each prediction once despite two constraint sets,
// failed results and bands left out; both curves are one model, so they
// share a line style and the key names the model (without alpha) once;
// N* is told by the marker shape, N* = 50 first.
func TestCurvesAlongParam(t *testing.T) {
	cs, key, err := CurvesAlong(scan(), "alpha")
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 2 {
		t.Fatalf("%d curves, want 2", len(cs))
	}
	if cs[0].Label != "att(n=2)" || cs[1].Label != "" || cs[0].Style != cs[1].Style {
		t.Errorf("labels %q, %q and styles %d, %d: want the model named once, one style", cs[0].Label, cs[1].Label, cs[0].Style, cs[1].Style)
	}
	for k, n := range []float64{60, 50} {
		c := cs[k]
		if len(c.Points) != 3 || !c.Join {
			t.Fatalf("curve %d: %d points", k, len(c.Points))
		}
		want := MarkerSquare // N* = 60, the second shape
		if n == 50 {
			want = MarkerCircle
		}
		for i, a := range []float64{0.1, 1, 10} {
			if p := (compare.Point{Ns: 1 - 2/n, R: 12 * a / (n * n)}); c.Points[i] != p || c.Markers[i] != want {
				t.Errorf("curve %d point %d = %v marker %d, want %v marker %d", k, i, c.Points[i], c.Markers[i], p, want)
			}
		}
	}
	if len(key) != 2 || key[0].Label != "$N_*$ = 50" || key[0].Marker != MarkerCircle || key[1].Label != "$N_*$ = 60" {
		t.Errorf("marker key %+v", key)
	}
}

// TestCurvesAlongNStar: along N*, one curve per alpha, ordered by N*, a
// style each.
func TestCurvesAlongNStar(t *testing.T) {
	cs, _, err := CurvesAlong(scan(), AlongNStar)
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 3 {
		t.Fatalf("%d curves, want 3", len(cs))
	}
	if cs[0].Label != "att(alpha=1, n=2)" {
		t.Errorf("label %q", cs[0].Label)
	}
	for i, c := range cs {
		if len(c.Points) != 2 || c.Points[0].Ns != 1-2.0/50 || c.Points[1].Ns != 1-2.0/60 || c.Style != i {
			t.Errorf("curve %q points %v style %d, want N* 50 then 60, style %d", c.Label, c.Points, c.Style, i)
		}
		if c.Markers[0] != MarkerCircle || c.Markers[1] != MarkerSquare {
			t.Errorf("markers %v", c.Markers)
		}
	}
	if _, _, err := CurvesAlong(scan(), "beta"); err == nil {
		t.Error("a parameter no result has was accepted")
	}
}

// TestRCurvesAlong: r against 3 alpha.
func TestRCurvesAlong(t *testing.T) {
	cs, _, err := RCurvesAlong(scan(), "alpha", 3)
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 2 {
		t.Fatalf("%d curves", len(cs))
	}
	c := cs[1] // N* = 50
	for i, a := range []float64{0.1, 1, 10} {
		if c.X[i] != 3*a || c.R[i] != 12*a/2500 {
			t.Errorf("point %d = (%g, %g), want (%g, %g)", i, c.X[i], c.R[i], 3*a, 12*a/2500)
		}
	}
	if _, _, err := RCurvesAlong(scan(), AlongNStar, 3); err == nil {
		t.Error("N* accepted as the parameter")
	}
	if _, _, err := RCurvesAlong(scan(), "alpha", 0); err == nil {
		t.Error("factor 0 accepted")
	}
}

// TestStripeFromResults: the N*=50 scan is the lower edge and the N*=60
// scan the upper, by alpha; mismatched scans are refused.
func TestStripeFromResults(t *testing.T) {
	var at50, at60 []study.Result
	for _, r := range scan() {
		if r.Error != "" || r.Band != nil {
			continue
		}
		if r.NStar == 50 {
			at50 = append(at50, r)
		} else {
			at60 = append(at60, r)
		}
	}
	s, err := StripeFromResults("att band", at50, at60, "alpha")
	if err != nil {
		t.Fatal(err)
	}
	a0, a2, n50, n60 := 0.1, 10.0, 50.0, 60.0
	if len(s.Lower) != 3 || len(s.Upper) != 3 || s.Lower[2].R != 12*a2/(n50*n50) || s.Upper[0].R != 12*a0/(n60*n60) {
		t.Errorf("stripe %+v", s)
	}
	if _, err := NsR(NsRSpec{Stripes: []Stripe{s}}); err != nil {
		t.Errorf("stripe not drawable: %v", err)
	}
	if _, err := StripeFromResults("x", at50, at60[:2], "alpha"); err == nil {
		t.Error("edges of different lengths accepted")
	}
	if _, err := StripeFromResults("x", at50, append(at60, at50...), "alpha"); err == nil {
		t.Error("an edge of two curves accepted")
	}
}
