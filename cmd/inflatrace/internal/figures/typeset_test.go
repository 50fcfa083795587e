package figures

import (
	"image/color"
	"reflect"
	"testing"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgimg"
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
		{PlainText(`cost $5 \o/`), []span{{`cost $5 \o/`, false, 0}}},
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

// Greek written as glyph outlines (what a PDF gets, whose text encoding
// has no Greek) covers the same pixels as the same text drawn by the font
// renderer, to within a pixel at 150 dpi: the outlines are the font's own.
func TestOutlinesMatchText(t *testing.T) {
	fnt := font.Font{Typeface: "Liberation", Variant: "Serif", Size: vg.Points(40)}
	face := font.DefaultCache.Lookup(fnt, fnt.Size)
	box := func(draw func(c vg.Canvas)) (x0, y0, x1, y1 int) {
		c := vgimg.NewWith(vgimg.UseWH(200, 80), vgimg.UseDPI(150))
		c.SetColor(color.Black)
		draw(c)
		img := c.Image()
		b := img.Bounds()
		x0, y0, x1, y1 = b.Max.X, b.Max.Y, -1, -1
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				if _, _, _, a := img.At(x, y).RGBA(); a > 0x8000 {
					x0, y0, x1, y1 = min(x0, x), min(y0, y), max(x1, x), max(y1, y)
				}
			}
		}
		return
	}
	at := vg.Point{X: 20, Y: 25}
	a0, b0, c0, d0 := box(func(c vg.Canvas) { c.FillString(face, at, "3αξσ") })
	a1, b1, c1, d1 := box(func(c vg.Canvas) { fillOutlines(c, face, fnt.Size, at, "3αξσ") })
	if c0 < 0 || abs(float64(a0-a1)) > 1 || abs(float64(b0-b1)) > 1 || abs(float64(c0-c1)) > 1 || abs(float64(d0-d1)) > 1 {
		t.Errorf("text ink [%d,%d]-[%d,%d], outlines [%d,%d]-[%d,%d]", a0, b0, c0, d0, a1, b1, c1, d1)
	}
	for s, want := range map[string]bool{"n_s 0.96 [GeV]": true, "é×·": true, "α": false, "∗": false, "€": false} {
		if winAnsi(s) != want {
			t.Errorf("winAnsi(%q) = %v", s, !want)
		}
	}
}
