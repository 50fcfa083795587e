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
	MarkerHollowSquare
	MarkerHollowTriangle
)

// markerOrder is the order in which marker shapes are handed out to the
// values they stand for (N* = 50, 55, 60, then other histories).
var markerOrder = []Marker{MarkerCircle, MarkerSquare, MarkerTriangle, MarkerRing, MarkerHollowSquare, MarkerHollowTriangle, MarkerCross, MarkerPlus}

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
	case MarkerHollowSquare:
		return draw.SquareGlyph{}
	case MarkerHollowTriangle:
		return draw.TriangleGlyph{}
	case MarkerNone:
		return nil
	}
	return draw.CircleGlyph{}
}

// Colours are those of the colour-blind-safe set of Okabe & Ito (2008,
// "Color Universal Design"), in an order of our own, plus a mid grey.
// Model lines take them in turn and, past eight models, the next dash
// pattern (solid, dashed, dotted, dash-dot), so 32 models have 32
// distinct styles; constraint sets take bluish green, reddish purple,
// orange and sky blue.
var (
	curvePalette = []color.NRGBA{
		{0, 0, 0, 255}, {213, 94, 0, 255}, {0, 114, 178, 255}, {0, 158, 115, 255},
		{204, 121, 167, 255}, {230, 159, 0, 255}, {86, 180, 233, 255}, {120, 120, 120, 255},
	}
	curveDashes = [][]vg.Length{
		nil,
		{vg.Points(5), vg.Points(2.5)},
		{vg.Points(1.2), vg.Points(1.8)},
		{vg.Points(6), vg.Points(2), vg.Points(1.2), vg.Points(2)},
	}
	constraintPalette = []color.NRGBA{
		{0, 158, 115, 255}, {204, 121, 167, 255}, {230, 159, 0, 255}, {86, 180, 233, 255},
	}
	// dash95 outlines a 95% region; a 68% region is filled and outlined
	// with a solid line.
	dash95 = []vg.Length{vg.Points(3.5), vg.Points(2)}
	// dashForecast draws a forecast's detection level.
	dashForecast  = []vg.Length{vg.Points(1), vg.Points(2.5)}
	forecastColor = color.NRGBA{70, 70, 70, 255}
)

// curveStyle is the line of the i-th model.
func curveStyle(i int) draw.LineStyle {
	return draw.LineStyle{Color: curvePalette[i%len(curvePalette)], Width: curveWidth, Dashes: curveDashes[(i/len(curvePalette))%len(curveDashes)]}
}

func pick(c color.Color, palette []color.NRGBA, i int) color.Color {
	if c != nil {
		return c
	}
	return palette[i%len(palette)]
}

// tint returns c mixed with white, a of c to 1-a of white, opaque. Fills
// are opaque tints, not translucent colours: gonum's PDF canvas (v0.17)
// writes a translucent colour premultiplied and then applies its opacity
// again, darkening it, so a tint is the one fill that looks the same in
// PDF, SVG and PNG. Regions are filled first and outlined after, so no
// fill hides another set's boundary.
func tint(c color.Color, a float64) color.NRGBA {
	n := color.NRGBAModel.Convert(c).(color.NRGBA)
	mix := func(v uint8) uint8 { return uint8(float64(v)*a + 255*(1-a) + 0.5) }
	return color.NRGBA{mix(n.R), mix(n.G), mix(n.B), 255}
}

// Line widths and glyph sizes, in points.
var (
	contourWidth = vg.Points(1)
	curveWidth   = vg.Points(1.2)
	bandWidth    = vg.Points(6)
	glyphRadius  = vg.Points(2.5)
)

// Strengths of the tints of the filled 68% region and of reheating bands
// (the 95% region is an outline only).
const (
	alpha68   = 0.35
	alphaBand = 0.25
)
