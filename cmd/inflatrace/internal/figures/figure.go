package figures

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Figure is a plot with its key drawn below the data area, outside it, in
// as many columns as fit the width: the figure grows downwards with the
// key, so that no entry ever covers the data and any number of curves can
// be identified.
type Figure struct {
	Plot *plot.Plot
	Key  []KeyEntry
	// Clipped counts the points that lie outside ranges the caller fixed
	// and are therefore not drawn (ranges fitted to the data clip none).
	Clipped int
}

// KeyEntry is one line of a figure's key: a swatch and its text.
type KeyEntry struct {
	Label  string // typeset markup (see Typeset); user text through PlainText
	Swatch Swatch
}

// Swatch is what a key entry shows before its text.
type Swatch struct {
	Kind  SwatchKind
	Line  draw.LineStyle  // SwatchLine, SwatchOutline, SwatchFilled (outline), SwatchForecast
	Glyph draw.GlyphStyle // SwatchMarker, and a SwatchLine's marker when Shape is set
	Fill  color.Color     // SwatchFilled, SwatchBand
}

// SwatchKind is the kind of a key swatch.
type SwatchKind int

// Swatch kinds.
const (
	SwatchLine     SwatchKind = iota // a model's line
	SwatchMarker                     // a marker shape (what it stands for)
	SwatchFilled                     // a filled region with its outline (68%)
	SwatchOutline                    // an outlined region (95%)
	SwatchBand                       // a translucent reheating band
	SwatchForecast                   // a forecast's detection level
)

// Key layout, in points: text size, row height, swatch width and gaps.
var (
	keyFontSize = vg.Points(8)
	keyRow      = vg.Points(11)
	keySwatch   = vg.Points(18)
	keyGap      = vg.Points(4)
	keyColGap   = vg.Points(12)
	keyMargin   = vg.Points(8)
)

// handler is the text handler of every label of a figure.
var handler text.Handler = Typeset{Fonts: font.DefaultCache}

// keyStyle is the text style of key entries.
func keyStyle(h text.Handler) text.Style {
	return text.Style{
		Color:   color.Black,
		Font:    font.Font{Typeface: "Liberation", Variant: "Serif", Size: keyFontSize},
		XAlign:  draw.XLeft,
		YAlign:  draw.YCenter,
		Handler: h,
	}
}

// keyLayout is where the key's entries go: columns of equal width, filled
// down each column in turn.
type keyLayout struct {
	cols, rows int
	colWidth   vg.Length
	height     vg.Length
}

func layoutKey(entries []KeyEntry, width vg.Length, h text.Handler) keyLayout {
	if len(entries) == 0 {
		return keyLayout{}
	}
	sty := keyStyle(h)
	var widest vg.Length
	for _, e := range entries {
		if w := sty.Width(e.Label); w > widest {
			widest = w
		}
	}
	colWidth := keySwatch + keyGap + widest + keyColGap
	usable := width - 2*keyMargin
	cols := int(math.Floor(float64((usable + keyColGap) / colWidth)))
	if cols < 1 {
		cols = 1
	}
	if cols > len(entries) {
		cols = len(entries)
	}
	rows := (len(entries) + cols - 1) / cols
	return keyLayout{cols: cols, rows: rows, colWidth: colWidth, height: vg.Length(rows)*keyRow + 2*keyMargin}
}

// Size is the figure's size: Width, and Height plus its key.
func (f *Figure) Size() (vg.Length, vg.Length) {
	return Width, Height + layoutKey(f.Key, Width, handler).height
}

// Draw draws the plot above and the key below.
func (f *Figure) Draw(c draw.Canvas) { f.draw(c, handler) }

func (f *Figure) draw(c draw.Canvas, h text.Handler) {
	useHandler(f.Plot, h)
	lay := layoutKey(f.Key, c.Max.X-c.Min.X, h)
	top := c
	top.Min.Y += lay.height
	f.Plot.Draw(top)
	if lay.cols == 0 {
		return
	}
	sty := keyStyle(h)
	for i, e := range f.Key {
		col, row := i/lay.rows, i%lay.rows
		x := c.Min.X + keyMargin + vg.Length(col)*lay.colWidth
		y := c.Min.Y + lay.height - keyMargin - (vg.Length(row)+0.5)*keyRow
		drawSwatch(c, e.Swatch, vg.Point{X: x, Y: y})
		c.FillText(sty, vg.Point{X: x + keySwatch + keyGap, Y: y}, e.Label)
	}
}

// dataArea is the rectangle of the data in a figure drawn on c.
func (f *Figure) dataArea(c draw.Canvas) vg.Rectangle {
	lay := layoutKey(f.Key, c.Max.X-c.Min.X, handler)
	top := c
	top.Min.Y += lay.height
	return f.Plot.DataCanvas(top).Rectangle
}

// drawSwatch draws a swatch whose left end is at p (vertically centred).
func drawSwatch(c draw.Canvas, s Swatch, p vg.Point) {
	w, half := keySwatch, vg.Points(3.5)
	box := []vg.Point{{X: p.X, Y: p.Y - half}, {X: p.X + w, Y: p.Y - half}, {X: p.X + w, Y: p.Y + half}, {X: p.X, Y: p.Y + half}, {X: p.X, Y: p.Y - half}}
	switch s.Kind {
	case SwatchLine, SwatchForecast:
		c.StrokeLine2(s.Line, p.X, p.Y, p.X+w, p.Y)
		if s.Glyph.Shape != nil {
			c.DrawGlyph(s.Glyph, vg.Point{X: p.X + w/2, Y: p.Y})
		}
	case SwatchMarker:
		c.DrawGlyph(s.Glyph, vg.Point{X: p.X + w/2, Y: p.Y})
	case SwatchFilled:
		c.FillPolygon(s.Fill, box)
		c.StrokeLines(s.Line, box)
	case SwatchOutline:
		c.StrokeLines(s.Line, box)
	case SwatchBand:
		c.FillPolygon(s.Fill, box)
	}
}

// useHandler sets the text handler of every label of a plot.
func useHandler(p *plot.Plot, h text.Handler) {
	p.Title.TextStyle.Handler = h
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Handler = h
		a.Tick.Label.Handler = h
	}
	p.Legend.TextStyle.Handler = h
}

// labelBox is the rectangle a drawn label occupies on the page.
type labelBox struct {
	Text string
	Rect vg.Rectangle
}

// recorder is a text handler that draws with inner and records where
// each label went (TestLabelsDoNotOverlap).
type recorder struct {
	inner text.Handler
	boxes *[]labelBox
}

func (r recorder) Cache() *font.Cache               { return r.inner.Cache() }
func (r recorder) Extents(f font.Font) font.Extents { return r.inner.Extents(f) }
func (r recorder) Lines(s string) []string          { return r.inner.Lines(s) }
func (r recorder) Box(s string, f font.Font) (vg.Length, vg.Length, vg.Length) {
	return r.inner.Box(s, f)
}

// Draw records the label's box (text.Style.Rectangle, the box gonum's
// own layout uses, placed at the anchor), then draws it.
func (r recorder) Draw(c vg.Canvas, txt string, sty text.Style, pt vg.Point) {
	if txt != "" {
		rect := sty.Rectangle(txt)
		rect.Min, rect.Max = rect.Min.Add(pt), rect.Max.Add(pt)
		*r.boxes = append(*r.boxes, labelBox{txt, rect})
	}
	r.inner.Draw(c, txt, sty, pt)
}

// Overlaps draws the figure and reports every pair of labels (title,
// axis labels, tick labels, key entries) whose boxes overlap by more than
// a quarter point, every key entry that reaches into the data area, and
// every label that leaves the page. A figure fit for print has none.
func (f *Figure) Overlaps() []string {
	var boxes []labelBox
	rec := recorder{inner: handler, boxes: &boxes}
	w, h := f.Size()
	c := draw.New(vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(DPI)))
	f.draw(c, rec)
	useHandler(f.Plot, handler)
	data := f.dataArea(c)
	keyTop := c.Min.Y + layoutKey(f.Key, w, handler).height
	const tol = 0.25
	overlap := func(a, b vg.Rectangle) bool {
		return a.Min.X < b.Max.X-tol && b.Min.X < a.Max.X-tol && a.Min.Y < b.Max.Y-tol && b.Min.Y < a.Max.Y-tol
	}
	var out []string
	for i, a := range boxes {
		if a.Rect.Min.X < -tol || a.Rect.Min.Y < -tol || a.Rect.Max.X > w+tol || a.Rect.Max.Y > h+tol {
			out = append(out, fmt.Sprintf("%q leaves the page", a.Text))
		}
		if a.Rect.Max.Y <= keyTop && overlap(a.Rect, data) {
			out = append(out, fmt.Sprintf("key entry %q covers the data", a.Text))
		}
		for _, b := range boxes[i+1:] {
			if overlap(a.Rect, b.Rect) {
				out = append(out, fmt.Sprintf("%q overlaps %q", a.Text, b.Text))
			}
		}
	}
	return out
}
