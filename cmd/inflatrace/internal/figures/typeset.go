package figures

import (
	"math"
	"strings"
	"sync"

	"golang.org/x/image/font/sfnt"
	"golang.org/x/image/math/fixed"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgpdf"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// Typeset is a text.Handler for the labels of a physics figure. It writes
// subscripts and superscripts and Greek letters, which
// gonum's plain handler cannot (and its LaTeX handler, in the version we
// use, renders no sub- or superscript at all). The markup is small:
//
//	$...$        math: single Latin letters are symbols (n, r, N, T), words
//	             of two or more letters text ("reh", "end"); all are drawn
//	             upright in the one embedded face (see face)
//	_x, _{...}   subscript (one character, or a group)
//	^x, ^{...}   superscript
//	\alpha ...   Greek letters by name (lower case, and the upper-case
//	             letters that differ from Latin: \Gamma \Delta \Theta
//	             \Lambda \Xi \Pi \Sigma \Phi \Psi \Omega), and \star \times
//	             \pm \sim \le \ge \cdot \infty
//	\_ \^ \$ \\  the character itself
//
// Text outside $...$ is upright, and _ ^ there are plain characters, so a
// user's model label ("phi^2") is written as given. Nothing in the markup
// can fail: an unknown \name is written as it stands.
type Typeset struct {
	Fonts *font.Cache
}

var _ text.Handler = Typeset{}

// Sizes and shifts of scripts, as fractions of the font size (common
// practice in mathematical typesetting: scripts at about 70%, subscripts
// lowered by about a quarter of the size and superscripts raised by about
// 0.4 of it).
const (
	scriptScale = 0.7
	subShift    = -0.22
	supShift    = 0.42
)

// greekLetters are the Greek letters and symbols the markup knows.
var greekLetters = map[string]string{
	"alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ε", "varepsilon": "ε",
	"zeta": "ζ", "eta": "η", "theta": "θ", "iota": "ι", "kappa": "κ", "lambda": "λ", "mu": "μ",
	"nu": "ν", "xi": "ξ", "pi": "π", "rho": "ρ", "sigma": "σ", "tau": "τ", "upsilon": "υ",
	"phi": "ϕ", "varphi": "φ", "chi": "χ", "psi": "ψ", "omega": "ω",
	"Gamma": "Γ", "Delta": "Δ", "Theta": "Θ", "Lambda": "Λ", "Xi": "Ξ", "Pi": "Π",
	"Sigma": "Σ", "Phi": "Φ", "Psi": "Ψ", "Omega": "Ω",
	"star": "∗", "times": "×", "pm": "±", "sim": "∼", "le": "≤", "ge": "≥", "cdot": "·", "infty": "∞",
}

// span is a piece of text at one script level in one style.
type span struct {
	text   string
	italic bool
	level  int // 0 base, -1 subscript, +1 superscript
}

// spans cache: labels are measured and drawn many times.
var spanCache sync.Map // string -> []span

// parseMarkup splits a label into spans.
func parseMarkup(s string) []span {
	if v, ok := spanCache.Load(s); ok {
		return v.([]span)
	}
	var out []span
	add := func(t string, italic bool, level int) {
		if t == "" {
			return
		}
		if n := len(out); n > 0 && out[n-1].italic == italic && out[n-1].level == level {
			out[n-1].text += t
			return
		}
		out = append(out, span{t, italic, level})
	}
	math := false
	// emit writes a run of characters at a level; in math, single letters
	// are italic and words upright.
	emit := func(t string, level int) {
		if !math {
			add(t, false, level)
			return
		}
		rs := []rune(t)
		for i := 0; i < len(rs); {
			j := i
			for j < len(rs) && isLatin(rs[j]) {
				j++
			}
			if j > i {
				add(string(rs[i:j]), j-i == 1, level)
				i = j
				continue
			}
			add(string(rs[i]), false, level)
			i++
		}
	}
	rs := []rune(s)
	// word reads a macro name or a single escaped character after a
	// backslash at i, returning the text and the index after it.
	macro := func(i int) (string, int) {
		j := i + 1
		for j < len(rs) && isLatin(rs[j]) {
			j++
		}
		if j == i+1 {
			if j < len(rs) {
				return string(rs[j]), j + 1
			}
			return `\`, j
		}
		name := string(rs[i+1 : j])
		if g, ok := greekLetters[name]; ok {
			return g, j
		}
		return `\` + name, j
	}
	for i := 0; i < len(rs); {
		c := rs[i]
		switch {
		case c == '$':
			math = !math
			i++
		case c == '\\':
			t, j := macro(i)
			if math && len([]rune(t)) == 1 && !isLatin([]rune(t)[0]) {
				add(t, false, 0)
			} else {
				emit(t, 0)
			}
			i = j
		case math && (c == '_' || c == '^') && i+1 < len(rs):
			level := -1
			if c == '^' {
				level = 1
			}
			i++
			var group []rune
			if rs[i] == '{' {
				depth := 1
				j := i + 1
				for ; j < len(rs) && depth > 0; j++ {
					switch rs[j] {
					case '{':
						depth++
					case '}':
						depth--
					}
				}
				group = rs[i+1 : j-1]
				i = j
			} else if rs[i] == '\\' {
				t, j := macro(i)
				group = []rune(t)
				i = j
			} else {
				group = rs[i : i+1]
				i++
			}
			// A group is written at the script level: its own macros
			// resolved, words upright and letters italic.
			var b strings.Builder
			for k := 0; k < len(group); k++ {
				if group[k] == '\\' {
					sub := string(group[k:])
					name := strings.TrimLeftFunc(sub[1:], isLatin)
					word := sub[1 : len(sub)-len(name)]
					if g, ok := greekLetters[word]; ok {
						b.WriteString(g)
						k += len([]rune(word))
						continue
					}
				}
				b.WriteRune(group[k])
			}
			emit(b.String(), level)
		default:
			j := i
			for j < len(rs) && rs[j] != '$' && rs[j] != '\\' && !(math && (rs[j] == '_' || rs[j] == '^')) {
				j++
			}
			if j == i {
				j = i + 1
			}
			emit(string(rs[i:j]), 0)
			i = j
		}
	}
	spanCache.Store(s, out)
	return out
}

func isLatin(r rune) bool { return r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' }

// face returns the face of a span in fnt.
func (h Typeset) face(fnt font.Font, sp span) (font.Face, vg.Length) {
	size := fnt.Size
	if sp.level != 0 {
		size = vg.Length(float64(size) * scriptScale)
	}
	// Spans marked italic are drawn upright: gonum's PDF canvas (v0.17)
	// writes every embedded TrueType font under one file name, so a second
	// font would replace the first in a PDF. One face keeps the three
	// formats alike.
	return h.Fonts.Lookup(fnt, size), size
}

// shift is a span's baseline offset.
func shift(fnt font.Font, sp span) vg.Length {
	switch sp.level {
	case -1:
		return vg.Length(subShift * float64(fnt.Size))
	case 1:
		return vg.Length(supShift * float64(fnt.Size))
	}
	return 0
}

// Cache implements text.Handler.
func (h Typeset) Cache() *font.Cache { return h.Fonts }

// Extents implements text.Handler.
func (h Typeset) Extents(fnt font.Font) font.Extents {
	face := h.Fonts.Lookup(fnt, fnt.Size)
	return face.Extents()
}

// Lines implements text.Handler.
func (h Typeset) Lines(txt string) []string {
	return strings.Split(strings.TrimRight(txt, "\n"), "\n")
}

// Box implements text.Handler: the width of a line, and its height above
// and depth below the baseline, scripts included.
func (h Typeset) Box(txt string, fnt font.Font) (width, height, depth vg.Length) {
	ext := h.Extents(fnt)
	height, depth = ext.Ascent, ext.Descent
	for _, sp := range parseMarkup(txt) {
		face, _ := h.face(fnt, sp)
		width += face.Width(sp.text)
		e := face.Extents()
		dy := shift(fnt, sp)
		height = vg.Length(math.Max(float64(height), float64(e.Ascent+dy)))
		depth = vg.Length(math.Max(float64(depth), float64(e.Descent-dy)))
	}
	return width, height, depth
}

// Draw implements text.Handler, aligned and rotated as text.Plain draws.
func (h Typeset) Draw(c vg.Canvas, txt string, sty text.Style, pt vg.Point) {
	txt = strings.TrimRight(txt, "\n")
	if txt == "" {
		return
	}
	c.SetColor(sty.Color)
	if sty.Rotation != 0 {
		c.Push()
		c.Rotate(sty.Rotation)
	}
	sin64, cos64 := math.Sincos(sty.Rotation)
	cos, sin := vg.Length(cos64), vg.Length(sin64)
	pt.X, pt.Y = pt.Y*sin+pt.X*cos, pt.Y*cos-pt.X*sin
	lines := h.Lines(txt)
	ht := sty.Height(txt)
	pt.Y += ht*vg.Length(sty.YAlign) - h.Extents(sty.Font).Ascent
	for i, line := range lines {
		w, _, _ := h.Box(line, sty.Font)
		x := pt.X + vg.Length(sty.XAlign)*w
		y := pt.Y + vg.Length(len(lines)-i)*sty.Font.Size
		pdf := isPDF(c)
		for _, sp := range parseMarkup(line) {
			face, size := h.face(sty.Font, sp)
			at := vg.Point{X: x, Y: y + shift(sty.Font, sp)}
			if pdf && !winAnsi(sp.text) {
				// The PDF canvas writes text in Windows-1252, which has no
				// Greek: write such a span as the outlines of its glyphs.
				fillOutlines(c, face, size, at, sp.text)
			} else {
				c.FillString(face, at, sp.text)
			}
			x += face.Width(sp.text)
		}
	}
	if sty.Rotation != 0 {
		c.Pop()
	}
}

// PlainText makes what the user wrote (a title, a model label) safe for
// the typeset labels: it is written as given.
func PlainText(s string) string {
	r := strings.NewReplacer(`\`, `\\`, `$`, `\$`)
	return r.Replace(s)
}

// isPDF reports whether c draws into a PDF (under any draw.Canvas).
func isPDF(c vg.Canvas) bool {
	for {
		switch x := c.(type) {
		case *vgpdf.Canvas:
			return true
		case *draw.Canvas:
			c = x.Canvas
		case draw.Canvas:
			c = x.Canvas
		default:
			return false
		}
	}
}

// winAnsi reports whether every character of s is one the PDF canvas can
// write (ASCII and Latin-1; the rest of Windows-1252 is left to outlines
// as well, which is always correct).
func winAnsi(s string) bool {
	for _, r := range s {
		if r >= 0x80 && r < 0xa0 || r > 0xff {
			return false
		}
	}
	return true
}

// fillOutlines draws text from its baseline origin at as the filled
// outlines of its glyphs, advanced (and kerned) as the face's own text is.
func fillOutlines(c vg.Canvas, face font.Face, size vg.Length, at vg.Point, text string) {
	f := face.Face
	var buf sfnt.Buffer
	ppem := fixed.Int26_6(math.Round(float64(size) * 64)) // one unit per point
	toPt := func(v fixed.Int26_6) vg.Length { return vg.Length(float64(v) / 64) }
	x := at.X
	prev := sfnt.GlyphIndex(0)
	for i, r := range text {
		g, err := f.GlyphIndex(&buf, r)
		if err != nil {
			continue
		}
		if i > 0 {
			if k, err := f.Kern(&buf, prev, g, ppem, 0); err == nil {
				x += toPt(k)
			}
		}
		segs, err := f.LoadGlyph(&buf, g, ppem, nil)
		if err == nil && len(segs) > 0 {
			var path vg.Path
			pt := func(p fixed.Point26_6) vg.Point { return vg.Point{X: x + toPt(p.X), Y: at.Y - toPt(p.Y)} }
			for _, sg := range segs {
				switch sg.Op {
				case sfnt.SegmentOpMoveTo:
					if len(path) > 0 {
						path.Close()
					}
					path.Move(pt(sg.Args[0]))
				case sfnt.SegmentOpLineTo:
					path.Line(pt(sg.Args[0]))
				case sfnt.SegmentOpQuadTo:
					path.QuadTo(pt(sg.Args[0]), pt(sg.Args[1]))
				case sfnt.SegmentOpCubeTo:
					path.CubeTo(pt(sg.Args[0]), pt(sg.Args[1]), pt(sg.Args[2]))
				}
			}
			path.Close()
			c.Fill(path)
		}
		if adv, err := f.GlyphAdvance(&buf, g, ppem, 0); err == nil {
			x += toPt(adv)
		}
		prev = g
	}
}
