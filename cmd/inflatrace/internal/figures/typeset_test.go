package figures

import (
	"reflect"
	"testing"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// The markup gives the spans a journal's typesetting would (common
// practice: symbols italic, multi-letter sub- and superscripts upright,
// Greek by name; text outside math as written).
func TestParseMarkup(t *testing.T) {
	tests := []struct {
		in   string
		want []span
	}{
		{`$n_s$`, []span{{"n", true, 0}, {"s", true, -1}}},
		{`$N_*$`, []span{{"N", true, 0}, {"*", false, -1}}},
		{`$T_{reh}$ [GeV]`, []span{{"T", true, 0}, {"reh", false, -1}, {" [GeV]", false, 0}}},
		{`$10^{-3}$`, []span{{"10", false, 0}, {"-3", false, 1}}},
		{`$3\alpha$`, []span{{"3α", false, 0}}},
		{`$V_*^{1/4}$`, []span{{"V", true, 0}, {"*", false, -1}, {"1/4", false, 1}}},
		{`$\Delta\chi^2$`, []span{{"Δχ", false, 0}, {"2", false, 1}}},
		{`phi^2 (a_b)`, []span{{"phi^2 (a_b)", false, 0}}},
		{plainText(`cost $5 \o/`), []span{{`cost $5 \o/`, false, 0}}},
		{`$\unknown$`, []span{{`\unknown`, false, 0}}},
	}
	for _, tc := range tests {
		if got := parseMarkup(tc.in); !reflect.DeepEqual(got, tc.want) {
			t.Errorf("parseMarkup(%q) = %+v, want %+v", tc.in, got, tc.want)
		}
	}
}

// A subscript makes a label no wider than its letters at full size, and
// deeper below the baseline than plain text.
func TestTypesetBox(t *testing.T) {
	h := Typeset{Fonts: font.DefaultCache}
	fnt := font.Font{Typeface: "Liberation", Variant: "Serif", Size: vg.Points(10)}
	w1, _, d1 := h.Box(`$n_s$`, fnt)
	w2, _, d2 := h.Box(`ns`, fnt)
	if !(w1 < w2*1.05) || !(d1 > d2) {
		t.Errorf("n_s: width %v depth %v; plain ns: width %v depth %v", w1, d1, w2, d2)
	}
	_, hs, _ := h.Box(`$10^{-3}$`, fnt)
	_, hp, _ := h.Box(`10`, fnt)
	if !(hs > hp) {
		t.Errorf("10^-3 height %v, plain 10 %v: a superscript must rise", hs, hp)
	}
}

// History labels are typeset: symbols in math, powers of ten as such.
func TestHistoryText(t *testing.T) {
	for in, want := range map[string]string{
		"N*=55":                 "$N_*$ = 55",
		"instantaneous":         "instantaneous reheating",
		"w=1/3 T_reh=1e+09 GeV": "$w$ = 1/3, $T_{reh}$ = $10^{9}$ GeV",
		"w=0 T_reh=2.5e+12 GeV": `$w$ = 0, $T_{reh}$ = 2.5$\times$$10^{12}$ GeV`,
		"band w in [0, 1/3]":    "band w in [0, 1/3]",
	} {
		if got := historyText(in); got != want {
			t.Errorf("historyText(%q) = %q, want %q", in, got, want)
		}
	}
}
