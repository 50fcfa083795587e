package edit

import (
	"strings"
	"testing"
)

// base is a small study with comments, a multi-line array, two models and
// no [slow_roll] table.
const base = `# a study   (this comment must survive)
title = "base"

[[reheating]]
history = "fixed-efolds"
N_star = [50,   # first
  55, 60]         # a multi-line list

[[constraint]]
use = "cmb-combined-2025"   # shipped

[[model]]
family = "e-model"   # the E-model
alpha = ["1/3", 1]
n = 1

# the second model
[[model]]
family = "starobinsky"
`

func TestApply(t *testing.T) {
	tests := []struct {
		name  string
		edits []Edit
		want  string // the whole expected text
	}{
		{"set existing key, comment kept at its column",
			[]Edit{{Kind: Set, Path: "model[0].family", Value: "t-model"}},
			strings.Replace(base, `family = "e-model"   # the E-model`, `family = "t-model"   # the E-model`, 1)},
		{"set key in the second entry",
			[]Edit{{Kind: Set, Path: "model[1].family", Value: `"higgs"`}},
			strings.Replace(base, `family = "starobinsky"`, `family = "higgs"`, 1)},
		{"set absent key: a line at the end of its entry",
			[]Edit{{Kind: Set, Path: "model[1].label", Value: "Staro"}},
			strings.Replace(base, "family = \"starobinsky\"\n", "family = \"starobinsky\"\nlabel = \"Staro\"\n", 1)},
		{"set replaces a multi-line array whole",
			[]Edit{{Kind: Set, Path: "reheating[0].N_star", Value: "60"}},
			strings.Replace(base, "N_star = [50,   # first\n  55, 60]         # a multi-line list\n", "N_star = 60\n", 1)},
		{"set a list value",
			[]Edit{{Kind: Set, Path: "model[0].alpha", Value: `["1/3", 1, "7/3"]`}},
			strings.Replace(base, `alpha = ["1/3", 1]`, `alpha = ["1/3", 1, "7/3"]`, 1)},
		{"set in a missing plain table creates it at the end",
			[]Edit{{Kind: Set, Path: "slow_roll.method", Value: "exact"}},
			base + "\n[slow_roll]\nmethod = \"exact\"\n"},
		{"set then set again in the created table",
			[]Edit{{Kind: Set, Path: "slow_roll.method", Value: "exact"}, {Kind: Set, Path: "slow_roll.end", Value: "epsilon_H=1"}},
			base + "\n[slow_roll]\nmethod = \"exact\"\nend = \"epsilon_H=1\"\n"},
		{"set a top-level key",
			[]Edit{{Kind: Set, Path: "description", Value: "revised"}},
			strings.Replace(base, "title = \"base\"\n", "title = \"base\"\ndescription = \"revised\"\n", 1)},
		{"add an entry after the last of its array",
			[]Edit{{Kind: Add, Path: "model", Value: `{family="t-model", alpha=7, label = "T, 7"}`}},
			base + "\n[[model]]\nfamily = \"t-model\"\nalpha = 7\nlabel = \"T, 7\"\n"},
		{"add an entry to a middle array",
			[]Edit{{Kind: Add, Path: "constraint", Value: `{use = "planck2018-bk18"}`}},
			strings.Replace(base, "use = \"cmb-combined-2025\"   # shipped\n", "use = \"cmb-combined-2025\"   # shipped\n\n[[constraint]]\nuse = \"planck2018-bk18\"\n", 1)},
		{"drop a key",
			[]Edit{{Kind: Drop, Path: "model[0].n"}},
			strings.Replace(base, "n = 1\n", "", 1)},
		{"drop an entry: the comment after the previous entry stays",
			[]Edit{{Kind: Drop, Path: "model[1]"}},
			strings.Replace(base, "[[model]]\nfamily = \"starobinsky\"\n", "", 1)},
		{"drop the first entry: the next becomes model[0]",
			[]Edit{{Kind: Drop, Path: "model[0]"}, {Kind: Set, Path: "model[0].alpha", Value: "2"}},
			strings.Replace(base, "\n[[model]]\nfamily = \"e-model\"   # the E-model\nalpha = [\"1/3\", 1]\nn = 1\n", "", 1) + "alpha = 2\n"},
		{"drop a multi-line key",
			[]Edit{{Kind: Drop, Path: "reheating[0].N_star"}},
			strings.Replace(base, "N_star = [50,   # first\n  55, 60]         # a multi-line list\n", "", 1)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Apply([]byte(base), tc.edits)
			if err != nil {
				t.Fatal(err)
			}
			if string(got) != tc.want {
				t.Errorf("got\n%s\nwant\n%s", got, tc.want)
			}
		})
	}
}

// Every line the edit does not touch is kept byte for byte, in order.
func TestUntouchedLinesKept(t *testing.T) {
	got, err := SetValue([]byte(base), "model[0].n", "2")
	if err != nil {
		t.Fatal(err)
	}
	a, b := strings.Split(base, "\n"), strings.Split(string(got), "\n")
	if len(a) != len(b) {
		t.Fatalf("%d lines, want %d", len(b), len(a))
	}
	changed := 0
	for i := range a {
		if a[i] != b[i] {
			changed++
			if a[i] != "n = 1" || b[i] != "n = 2" {
				t.Errorf("line %d: %q became %q", i+1, a[i], b[i])
			}
		}
	}
	if changed != 1 {
		t.Errorf("%d lines changed, want 1", changed)
	}
}

func TestErrors(t *testing.T) {
	tests := []struct {
		name string
		edit Edit
		want []string // substrings of the error
	}{
		{"entry out of range lists the entries", Edit{Kind: Set, Path: "model[2].alpha", Value: "1"}, []string{"model[2].alpha", "2 [[model]] entries", "model[0] to model[1]"}},
		{"array without index", Edit{Kind: Set, Path: "reheating.N_star", Value: "60"}, []string{"reheating.N_star", "array of tables", "reheating[0]"}},
		{"unknown array lists the arrays", Edit{Kind: Set, Path: "forecast[0].use", Value: "litebird"}, []string{"forecast[0].use", "no [[forecast]]", "model[0] to model[1]", "constraint[0]"}},
		{"drop missing key lists the keys", Edit{Kind: Drop, Path: "model[0].beta"}, []string{"model[0].beta", "no key beta", "family, alpha, n"}},
		{"drop missing entry", Edit{Kind: Drop, Path: "model[5]"}, []string{"model[5]", "model[0] to model[1]"}},
		{"malformed path", Edit{Kind: Set, Path: "model[x].alpha", Value: "1"}, []string{"model[x].alpha", "not a key path"}},
		{"set on an entry", Edit{Kind: Set, Path: "model[0]", Value: "1"}, []string{"model[0]", "names an entry"}},
		{"bad TOML value", Edit{Kind: Set, Path: "model[0].alpha", Value: "[1, 2"}, []string{"model[0].alpha", "not TOML"}},
		{"add to an unknown array", Edit{Kind: Add, Path: "modell", Value: "{family = \"starobinsky\"}"}, []string{"modell", "model, reheating, constraint, forecast"}},
		{"add a non-table", Edit{Kind: Add, Path: "model", Value: "3"}, []string{"model", "inline table"}},
		{"set a key that is a table", Edit{Kind: Set, Path: "slow_roll", Value: "1"}, []string{"slow_roll"}},
	}
	doc := base + "\n[slow_roll]\nmethod = \"first\"\n"
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Apply([]byte(doc), []Edit{tc.edit})
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not contain %q", err, w)
				}
			}
		})
	}
}

func TestParseFlag(t *testing.T) {
	tests := []struct {
		kind      Kind
		arg       string
		path, val string
		bad       bool
	}{
		{Set, "slow_roll.end=epsilon_H=1", "slow_roll.end", "epsilon_H=1", false},
		{Set, " model[0].alpha = 7 ", "model[0].alpha", "7", false},
		{Add, `model={family="t-model", alpha=7}`, "model", `{family="t-model", alpha=7}`, false},
		{Drop, "model[3]", "model[3]", "", false},
		{Set, "noequals", "", "", true},
		{Set, "=3", "", "", true},
	}
	for _, tc := range tests {
		e, err := ParseFlag(tc.kind, tc.arg)
		if (err != nil) != tc.bad {
			t.Errorf("%q: error %v, want error %v", tc.arg, err, tc.bad)
			continue
		}
		if !tc.bad && (e.Path != tc.path || e.Value != tc.val || e.Kind != tc.kind) {
			t.Errorf("%q: got %+v", tc.arg, e)
		}
	}
}
