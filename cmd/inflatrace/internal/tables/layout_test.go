package tables

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/stages/study"
)

// compared is an invented study of the demo scenario as a run records it:
// four predictions (alpha = 1/3 and 7/3 at N* = 50 and 60, with the
// large-N attractor values n_s = 1 - 2/N, r = 12 alpha/N^2), each compared
// with two invented constraint sets and the invented TERN-B forecast, in
// a run's order (per prediction: the sets, then the forecast).
func compared() []study.Result {
	var out []study.Result
	preds := []struct {
		alphaText, history string
		a, n               float64
	}{
		{"1/3", "N*=50", 1.0 / 3, 50},
		{"1/3", "N*=60", 1.0 / 3, 60},
		{"7/3", "N*=50", 7.0 / 3, 50},
		{"7/3", "N*=60", 7.0 / 3, 60},
	}
	for i, p := range preds {
		base := study.Result{
			Model: "e-model", Params: map[string]float64{"alpha": p.a, "n": 1}, Method: "first", Reheating: "fixed-efolds",
			NStar: p.n, Ns: 1 - 2/p.n, R: 12 * p.a / (p.n * p.n), AlphaS: -2 / (p.n * p.n), Nt: -1.5 * p.a / (p.n * p.n),
		}
		label := "E-model(alpha=" + p.alphaText + ", n=1) | " + p.history
		for j, c := range []string{"orrery-a", "orrery-b"} {
			r := base
			r.Label, r.Constraint, r.Key = label+" | "+c, c, "h1:"+strconv.Itoa(10*i+j)
			d := float64(i+1) * float64(j+1)
			ns := math.Sqrt(d)
			in := d < 6
			r.DeltaChi2, r.NSigma, r.Inside95 = &d, &ns, &in
			out = append(out, r)
		}
		r := base
		r.Label, r.Constraint, r.Key = label+" | forecast tern-b", "tern-b", "h1:f"+strconv.Itoa(i)
		s := base.R / 1e-3
		det := s >= 5
		r.DetectionSigma, r.Detected5Sigma = &s, &det
		out = append(out, r)
	}
	return out
}

func csvRecords(t *testing.T, out string) [][]string {
	t.Helper()
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatalf("CSV: %v\n%s", err, out)
	}
	return recs
}

// TestWideRowsPerPrediction: the wide layout has one row per prediction,
// the long one a row per result: with two constraint sets and a forecast,
// a third as many (and half as many with the two sets alone); every
// prediction's Delta chi^2 for each set in the wide table equals the
// long table's value for that pair (a property that fails if results are
// paired with the wrong prediction or set).
func TestWideRowsPerPrediction(t *testing.T) {
	rows := compared()
	long := csvRecords(t, write(t, rows, Options{Format: CSV, Layout: Long}))
	wide := csvRecords(t, write(t, rows, Options{Format: CSV}))
	if len(long)-1 != len(rows) || len(wide)-1 != len(rows)/3 {
		t.Fatalf("long %d rows, wide %d rows, for %d results of 3 sets", len(long)-1, len(wide)-1, len(rows))
	}
	var sets []study.Result
	for _, r := range rows {
		if r.DetectionSigma == nil {
			sets = append(sets, r)
		}
	}
	if n := len(csvRecords(t, write(t, sets, Options{Format: CSV}))) - 1; n != len(sets)/2 {
		t.Errorf("two sets: %d wide rows for %d results, want half", n, len(sets))
	}
	head := wide[0]
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	wantHead := []string{"row", "model_label", "model", "params", "history", "N_star", "n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "H_star_GeV",
		"delta_chi2[orrery-a]", "n_sigma[orrery-a]", "inside_95[orrery-a]",
		"delta_chi2[orrery-b]", "n_sigma[orrery-b]", "inside_95[orrery-b]", "detection_sigma[tern-b]"}
	if strings.Join(head, ",") != strings.Join(wantHead, ",") {
		t.Errorf("wide header\n got  %v\n want %v", head, wantHead)
	}
	lcol := map[string]int{}
	for i, h := range long[0] {
		lcol[h] = i
	}
	for _, l := range long[1:] {
		set := l[lcol["constraint"]]
		name := "delta_chi2[" + set + "]"
		if set == "tern-b" {
			name = "detection_sigma[tern-b]"
		}
		found := 0
		for _, w := range wide[1:] {
			if w[col["params"]] == l[lcol["params"]] && w[col["history"]] == l[lcol["history"]] {
				found++
				v := l[lcol["delta_chi2"]]
				if set == "tern-b" {
					v = l[lcol["detection_sigma"]]
				}
				if w[col[name]] != v {
					t.Errorf("%s %s %s: wide %q, long %q", l[lcol["params"]], l[lcol["history"]], name, w[col[name]], v)
				}
			}
		}
		if found != 1 {
			t.Errorf("%s %s: %d wide rows", l[lcol["params"]], l[lcol["history"]], found)
		}
	}
	// The row number is that of the prediction's first result.
	for k, w := range wide[1:] {
		if w[0] != strconv.Itoa(3*k+1) {
			t.Errorf("wide row %d numbered %s, want %d", k+1, w[0], 3*k+1)
		}
	}
}

// TestWideGrouping: a prediction listed twice gets two rows; a result
// with no set (a band) has a row of its own; the sets keep their order of
// first appearance; JSON keys are the CSV headers.
func TestWideGrouping(t *testing.T) {
	rows := compared()[:3]
	rows = append(rows, rows...)
	band := study.Result{Label: "E-model(alpha=1/3, n=1) | band w in [0, 1]", Model: "e-model", Params: map[string]float64{"alpha": 1.0 / 3, "n": 1}, Band: &study.Band{NStar: [2]float64{48, 58}}}
	rows = append(rows, band)
	recs := csvRecords(t, write(t, rows, Options{Format: CSV, Columns: []string{"label", "N_star_min", "delta_chi2", "detection_sigma"}}))
	if len(recs) != 4 {
		t.Fatalf("%d rows, want 3 (a prediction twice, a band):\n%v", len(recs)-1, recs)
	}
	if got := strings.Join(recs[0], ","); got != "label,N_star_min,delta_chi2[orrery-a],delta_chi2[orrery-b],detection_sigma[tern-b]" {
		t.Errorf("header %s", got)
	}
	if recs[1][0] != "E-model(alpha=1/3, n=1) | N*=50" || recs[3][1] != "48" || recs[3][2] != "" {
		t.Errorf("rows %v", recs[1:])
	}
	var js []map[string]any
	if err := json.Unmarshal([]byte(write(t, rows, Options{Format: JSON, Columns: []string{"label", "delta_chi2"}})), &js); err != nil {
		t.Fatal(err)
	}
	if len(js) != 3 || js[0]["delta_chi2[orrery-b]"] != 2.0 || js[2]["delta_chi2[orrery-a]"] != nil {
		t.Errorf("JSON %v", js)
	}
}

// TestLongDefaultsCompared: in the long layout by default, the set's name
// and the comparison columns with values are written; detection_sigma
// appears only with a forecast.
func TestLongDefaultsCompared(t *testing.T) {
	head := csvRecords(t, write(t, compared(), Options{Format: CSV, Layout: Long}))[0]
	if got := strings.Join(head[len(head)-5:], ","); got != "constraint,delta_chi2,n_sigma,inside_95,detection_sigma" {
		t.Errorf("long header ends %s", got)
	}
	var sets []study.Result
	for _, r := range compared() {
		if r.DetectionSigma == nil {
			sets = append(sets, r)
		}
	}
	head = csvRecords(t, write(t, sets, Options{Format: CSV, Layout: Long}))[0]
	if head[len(head)-1] != "inside_95" {
		t.Errorf("without a forecast the long header ends %v", head[len(head)-1])
	}
}

// TestExactByDefault: CSV and JSON numbers read back to the identical
// float64 bits without any option, in both layouts; Markdown rounds to
// DefaultDigits.
func TestExactByDefault(t *testing.T) {
	rows := compared()
	for _, layout := range Layouts {
		recs := csvRecords(t, write(t, rows, Options{Format: CSV, Layout: layout, Columns: []string{"n_s", "r", "alpha_s", "n_t", "param.alpha"}}))
		step := 1
		if layout == Wide {
			step = 3
		}
		for k, rec := range recs[1:] {
			r := rows[k*step]
			for i, want := range []float64{r.Ns, r.R, r.AlphaS, r.Nt, r.Params["alpha"]} {
				got, err := strconv.ParseFloat(rec[i], 64)
				if err != nil || math.Float64bits(got) != math.Float64bits(want) {
					t.Errorf("%s row %d column %d: %q, want the bits of %v", layout, k+1, i, rec[i], want)
				}
			}
		}
		var js []map[string]float64
		if err := json.Unmarshal([]byte(write(t, rows, Options{Format: JSON, Layout: layout, Columns: []string{"r", "alpha_s"}})), &js); err != nil {
			t.Fatal(err)
		}
		for k, o := range js {
			r := rows[k*step]
			if math.Float64bits(o["r"]) != math.Float64bits(r.R) || math.Float64bits(o["alpha_s"]) != math.Float64bits(r.AlphaS) {
				t.Errorf("%s JSON row %d: %v", layout, k+1, o)
			}
		}
	}
	md := write(t, rows[:1], Options{Format: Markdown, Columns: []string{"r"}})
	if !strings.Contains(md, "| 0.001600 |") { // 12 (1/3) / 50^2 = 0.0016 to 4 digits
		t.Errorf("Markdown r:\n%s", md)
	}
}
