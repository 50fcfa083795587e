package figures

import (
	"image/color"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Marker is the glyph drawn at each point of a curve.
type Marker int

// Markers. The zero value draws a filled circle.
const (
	MarkerCircle Marker = iota
	MarkerSquare
	MarkerTriangle
	MarkerRing
	MarkerCross
	MarkerPlus
	MarkerNone
)

func (m Marker) shape() draw.GlyphDrawer {
	switch m {
	case MarkerSquare:
		return draw.BoxGlyph{}
	case MarkerTriangle:
		return draw.PyramidGlyph{}
	case MarkerRing:
		return draw.RingGlyph{}
	case MarkerCross:
		return draw.CrossGlyph{}
	case MarkerPlus:
		return draw.PlusGlyph{}
	case MarkerNone:
		return nil
	}
	return draw.CircleGlyph{}
}

// The colour-blind-safe palette of Okabe & Ito (2008, "Color Universal
// Design"): model curves take black, vermillion, blue, bluish green,
// reddish purple, orange, sky blue, yellow in turn; constraint sets take
// blue, vermillion, bluish green, reddish purple.
var (
	curvePalette = []color.NRGBA{
		{0, 0, 0, 255}, {213, 94, 0, 255}, {0, 114, 178, 255}, {0, 158, 115, 255},
		{204, 121, 167, 255}, {230, 159, 0, 255}, {86, 180, 233, 255}, {240, 228, 66, 255},
	}
	constraintPalette = []color.NRGBA{
		{0, 114, 178, 255}, {213, 94, 0, 255}, {0, 158, 115, 255}, {204, 121, 167, 255},
	}
)

func pick(c color.Color, palette []color.NRGBA, i int) color.Color {
	if c != nil {
		return c
	}
	return palette[i%len(palette)]
}

// withAlpha returns c with its opacity scaled to a (0..1), non-premultiplied.
func withAlpha(c color.Color, a float64) color.NRGBA {
	n := color.NRGBAModel.Convert(c).(color.NRGBA)
	n.A = uint8(float64(n.A)*a + 0.5)
	return n
}

// Line widths and glyph sizes, in points.
var (
	contourWidth = vg.Points(1)
	curveWidth   = vg.Points(1.2)
	bandWidth    = vg.Points(6)
	glyphRadius  = vg.Points(2.5)
)

// Opacities of the filled 95% and 68% regions and of reheating bands.
const (
	alpha95   = 0.18
	alpha68   = 0.40
	alphaBand = 0.25
)
