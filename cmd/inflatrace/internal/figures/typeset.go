package figures

import (
	"math"
	"strings"
	"sync"

	"codeberg.org/go-fonts/liberation/liberationserifitalic"
	"golang.org/x/image/font/opentype"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// Typeset is a text.Handler for the labels of a physics figure. It writes
// subscripts and superscripts, Greek letters and italic symbols, which
// gonum's plain handler cannot (and its LaTeX handler, in the version we
// use, renders no sub- or superscript at all). The markup is small:
//
//	$...$        math: single Latin letters in italic (n, r, N, T), words
//	             of two or more letters upright ("reh", "end")
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

// italicVariant names Liberation Serif Italic as a variant of its own.
// gonum's PDF canvas registers a font under its full name with no style
// but selects it with the style's letter ("I"), so a face looked up by
// StyleItalic cannot be written to PDF; as a variant with the normal
// style it can, in every format.
const italicVariant = "SerifItalic"

func init() {
	f, err := opentype.Parse(liberationserifitalic.TTF)
	if err != nil {
		panic("figures: the compiled-in italic font does not parse: " + err.Error())
	}
	font.DefaultCache.Add(font.Collection{{Font: font.Font{Typeface: "Liberation", Variant: italicVariant}, Face: f}})
}

// face returns the face of a span in fnt.
func (h Typeset) face(fnt font.Font, sp span) (font.Face, vg.Length) {
	size := fnt.Size
	if sp.level != 0 {
		size = vg.Length(float64(size) * scriptScale)
	}
	f := fnt
	if sp.italic && f.Variant == "Serif" {
		f.Variant = italicVariant
	}
	return h.Fonts.Lookup(f, size), size
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
		for _, sp := range parseMarkup(line) {
			face, _ := h.face(sty.Font, sp)
			c.FillString(face, vg.Point{X: x, Y: y + shift(sty.Font, sp)}, sp.text)
			x += face.Width(sp.text)
		}
	}
	if sty.Rotation != 0 {
		c.Pop()
	}
}

// Plain text for what the user wrote: a model label is written as given.
func plainText(s string) string {
	r := strings.NewReplacer(`\`, `\\`, `$`, `\$`)
	return r.Replace(s)
}
