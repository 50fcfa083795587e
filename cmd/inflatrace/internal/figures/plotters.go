package figures

import (
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// axisBox is the plot's data range.
func axisBox(plt *plot.Plot) box {
	return box{plt.X.Min, plt.X.Max, plt.Y.Min, plt.Y.Max}
}

// toCanvas maps data points to the canvas.
func toCanvas(c *draw.Canvas, plt *plot.Plot, pts []xy) []vg.Point {
	tx, ty := plt.Transforms(c)
	out := make([]vg.Point, len(pts))
	for i, p := range pts {
		out[i] = vg.Point{X: tx(p.X), Y: ty(p.Y)}
	}
	return out
}

// region draws filled rings (one path, nonzero winding, so holes oriented
// against their outer ring stay empty) and stroked curves, all clipped to
// the axis range in data coordinates first (a log axis cannot map r <= 0).
type region struct {
	rings [][]xy
	lines [][]xy
	fill  color.Color
	line  draw.LineStyle
}

// Plot implements plot.Plotter.
func (r *region) Plot(c draw.Canvas, plt *plot.Plot) {
	b := axisBox(plt)
	if r.fill != nil {
		var path vg.Path
		for _, ring := range r.rings {
			pts := toCanvas(&c, plt, clipPolygon(ring, b))
			if len(pts) < 3 {
				continue
			}
			path.Move(pts[0])
			for _, p := range pts[1:] {
				path.Line(p)
			}
			path.Close()
		}
		if len(path) > 0 {
			c.SetColor(r.fill)
			c.Fill(path)
		}
	}
	if r.line.Width > 0 {
		for _, l := range r.lines {
			for _, piece := range clipPolyline(l, b) {
				c.StrokeLines(r.line, toCanvas(&c, plt, piece))
			}
		}
	}
}

// curve draws points with glyphs, optionally joined. A curve of many
// points (a scan) draws its glyphs at about maxGlyphs of them, evenly
// spread and always at both ends, so that the shapes stay readable.
type curve struct {
	pts    []xy
	join   bool
	line   draw.LineStyle
	glyph  draw.GlyphStyle   // at every point, unless glyphs is set
	glyphs []draw.GlyphStyle // per point
}

// maxGlyphs is the number of glyphs drawn along a long curve.
const maxGlyphs = 12

// Plot implements plot.Plotter.
func (cv *curve) Plot(c draw.Canvas, plt *plot.Plot) {
	b := axisBox(plt)
	if cv.join && len(cv.pts) > 1 {
		for _, piece := range clipPolyline(cv.pts, b) {
			c.StrokeLines(cv.line, toCanvas(&c, plt, piece))
		}
	}
	tx, ty := plt.Transforms(&c)
	step := 1
	if n := len(cv.pts); n > 3*maxGlyphs {
		step = (n - 1) / (maxGlyphs - 1)
	}
	for i, p := range cv.pts {
		if !b.contains(p) || i%step != 0 && i != len(cv.pts)-1 {
			continue
		}
		g := cv.glyph
		if cv.glyphs != nil {
			g = cv.glyphs[i]
		}
		if g.Shape != nil {
			c.DrawGlyph(g, vg.Point{X: tx(p.X), Y: ty(p.Y)})
		}
	}
}

// hline is a horizontal line across the plot at data y (its text is in
// the figure's key).
type hline struct {
	y    float64
	line draw.LineStyle
}

// Plot implements plot.Plotter.
func (h *hline) Plot(c draw.Canvas, plt *plot.Plot) {
	if h.y < plt.Y.Min || h.y > plt.Y.Max {
		return
	}
	_, ty := plt.Transforms(&c)
	y := ty(h.y)
	c.StrokeLine2(h.line, c.Min.X, y, c.Max.X, y)
}
