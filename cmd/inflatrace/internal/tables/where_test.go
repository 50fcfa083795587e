package tables

import (
	"bytes"
	"errors"
	"strings"
	"testing"
)

// TestWhere: conditions on numbers (a ratio as value), text (ignoring
// case), flags and comparison columns of one set, ANDed; the rows kept
// are counted on the compared fixture (four predictions: alpha 1/3 and
// 7/3, N* 50 and 60; Delta chi^2 (i+1)(j+1) for prediction i, set j).
func TestWhere(t *testing.T) {
	for _, c := range []struct {
		layout string
		where  []string
		want   int
	}{
		{Wide, nil, 4},
		{Wide, []string{"param.alpha=1/3"}, 2},           // exact: 1/3 as the study computes it
		{Wide, []string{"param.alpha = 0.3333"}, 0},      // = is exact
		{Wide, []string{"param.alpha>1/3"}, 2},           // 7/3
		{Wide, []string{"N_star<=50"}, 2},                // the two at N* = 50
		{Wide, []string{"model=E-MODEL"}, 4},             // text ignores case
		{Wide, []string{"model_label!=e-model"}, 0},      // ... also with !=
		{Wide, []string{"delta_chi2[orrery-b]<6"}, 2},    // 2, 4 (and 6, 8 not)
		{Wide, []string{"inside_95[orrery-a]=yes"}, 4},   // 1..4 < 6
		{Wide, []string{"inside_95[orrery-b]=no"}, 2},    // 6, 8
		{Wide, []string{"detection_sigma>=5"}, 2},        // one set gives it, so no [set]: r/1e-3 = 11.2, 7.8 for alpha 7/3
		{Wide, []string{"r<0.01", "param.alpha=7/3"}, 1}, // ANDed: r = 0.0112, 0.00778 at N* = 50, 60
		{Wide, []string{"history=N*=60"}, 2},             // the value may hold an operator character
		{Long, nil, 12},
		{Long, []string{"constraint=orrery-a"}, 4},
		{Long, []string{"delta_chi2>3"}, 4}, // 4, 6, 8 (set b) and 4 (set a, prediction 4)
		{Long, []string{"detection_sigma>0"}, 4},
	} {
		var b bytes.Buffer
		if err := Write(&b, compared(), Options{Format: CSV, Layout: c.layout, Columns: []string{"params"}, Where: c.where}); err != nil {
			t.Errorf("%s %q: %v", c.layout, c.where, err)
			continue
		}
		if got := len(csvRecords(t, b.String())) - 1; got != c.want {
			t.Errorf("%s %q: %d rows, want %d", c.layout, c.where, got, c.want)
		}
	}
}

// TestWhereErrors: bad syntax, unknown columns, a set-less comparison
// column with several sets, a set in the long layout, a non-number for a
// numeric column, an ordering of text or flags: each an *OptionError of
// --where holding the condition.
func TestWhereErrors(t *testing.T) {
	for _, c := range []struct {
		layout, where, msg string
	}{
		{Wide, "r", "want COLUMN OP VALUE"},
		{Wide, "<0.1", "no column"},
		{Wide, "r=<0.1", "not an operator"},
		{Wide, "r!0.1", "not an operator"},
		{Wide, "nope<1", `unknown column "nope"`},
		{Wide, "delta_chi2<1", "2 sets give it a value"},
		{Wide, "delta_chi2[orrery-c]<1", `no set "orrery-c"`},
		{Wide, "delta_chi2[orrery-a<1", "want name[set]"},
		{Wide, "n_s[orrery-a]<1", "only a comparison column"},
		{Long, "delta_chi2[orrery-a]<1", "only in the wide layout"},
		{Wide, "r<small", "not a number"},
		{Wide, "model<e", "is text"},
		{Wide, "inside_95[orrery-a]>no", "use = or !="},
		{Wide, "inside_95[orrery-a]=maybe", "yes or no"},
	} {
		err := Write(&bytes.Buffer{}, compared(), Options{Format: CSV, Layout: c.layout, Where: []string{c.where}})
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Option != "--where" || oe.Value != c.where || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s --where %q: %v, want --where error saying %q", c.layout, c.where, err, c.msg)
		}
	}
}

// TestSort: ascending, descending, several keys, stability (equal keys
// keep the run's order), missing values last in either direction, and
// errors naming --sort.
func TestSort(t *testing.T) {
	col := func(sort []string, layout string) []string {
		recs := csvRecords(t, write(t, compared(), Options{Format: CSV, Layout: layout, Columns: []string{"row"}, Sort: sort}))
		var out []string
		for _, r := range recs[1:] {
			out = append(out, r[0])
		}
		return strings.Split(strings.Join(out, " "), " ")
	}
	for _, c := range []struct {
		layout string
		sort   []string
		want   string
	}{
		{Wide, nil, "1 4 7 10"},
		{Wide, []string{"-row"}, "10 7 4 1"},
		{Wide, []string{"N_star"}, "1 7 4 10"},                  // stable: alpha order kept within N*
		{Wide, []string{"-N_star", "-param.alpha"}, "10 4 7 1"}, // then alpha descending
		{Wide, []string{"-delta_chi2[orrery-b]"}, "10 7 4 1"},
		// Rows 1, 2, 4, 5, 7, 8, 10, 11 have Delta chi^2 1, 2, 2, 4, 3, 6, 4, 8;
		// the forecasts' rows (missing) come last in the run's order.
		{Long, []string{"-delta_chi2", "row"}, "11 8 5 10 7 2 4 1 3 6 9 12"},
		{Long, []string{"delta_chi2", "row"}, "1 2 4 7 5 10 8 11 3 6 9 12"},
	} {
		if got := strings.Join(col(c.sort, c.layout), " "); got != c.want {
			t.Errorf("%s --sort %v: %s, want %s", c.layout, c.sort, got, c.want)
		}
	}
	for _, bad := range []string{"-", "nope", "delta_chi2"} {
		err := Write(&bytes.Buffer{}, compared(), Options{Format: CSV, Sort: []string{bad}})
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Option != "--sort" || oe.Value != bad {
			t.Errorf("--sort %q: %v", bad, err)
		}
	}
}
