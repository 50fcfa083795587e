package figures

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// NsR draws the n_s-r plane: the 68.27% and 95.45% regions of each
// constraint set (filled, darker inside), reheating stripes, and model
// curves, with r on a linear axis from zero or a logarithmic one from
// spec.RCut. Axis ranges not given are fitted to the content with a 5%
// margin (a factor 1.5 above on a log axis). The axes are labelled "n_s"
// and "r" in plain text.
func NsR(spec NsRSpec) (*plot.Plot, error) {
	if spec.RScale != Linear && spec.RScale != Log {
		return nil, fmt.Errorf("figures: unknown r scale %d", spec.RScale)
	}
	rcut := spec.RCut
	if rcut == 0 {
		rcut = DefaultRCut
	}
	if spec.RScale == Log && !(rcut > 0) {
		return nil, fmt.Errorf("figures: log r axis needs a cut r > 0, got %g", rcut)
	}
	grid := spec.Grid
	if grid == 0 {
		grid = DefaultGrid
	}
	if grid < 10 {
		return nil, fmt.Errorf("figures: KDE grid of %d nodes a side, want at least 10", grid)
	}
	if err := checkRange("n_s", spec.NsRange, false); err != nil {
		return nil, err
	}
	if err := checkRange("r", spec.RRange, spec.RScale == Log); err != nil {
		return nil, err
	}

	p := newPlot(spec.Title, "n_s", "r")
	var ext extent
	for i, layer := range spec.Constraints {
		sets, err := constraintContours(layer.Set, grid)
		if err != nil {
			return nil, err
		}
		col := pick(layer.Color, constraintPalette, i)
		line := draw.LineStyle{Color: col, Width: contourWidth}
		r95 := &region{rings: sets[1].rings, lines: sets[1].lines, fill: withAlpha(col, alpha95), line: line}
		r68 := &region{rings: sets[0].rings, lines: sets[0].lines, fill: withAlpha(col, alpha68), line: line}
		p.Add(r95, r68)
		label := layer.Label
		if label == "" {
			label = layer.Set.Label()
		}
		if label != "" {
			p.Legend.Add(label, r68)
		}
		for _, ring := range sets[1].rings {
			for _, q := range ring {
				ext.add(q.X, math.Max(q.Y, 0))
			}
		}
	}
	for i, s := range spec.Stripes {
		pl, err := stripePlotter(s, i)
		if err != nil {
			return nil, err
		}
		p.Add(pl)
		if s.Label != "" {
			p.Legend.Add(s.Label, pl)
		}
		for _, q := range append(append(append([]xy(nil), fromPoints(s.Lower)...), fromPoints(s.Upper)...), fromPoints(s.Path)...) {
			ext.add(q.X, q.Y)
		}
	}
	for i, cv := range spec.Curves {
		if cv.Tags != nil && len(cv.Tags) != len(cv.Points) {
			return nil, fmt.Errorf("figures: curve %q: %d tags for %d points", cv.Label, len(cv.Tags), len(cv.Points))
		}
		pts := fromPoints(cv.Points)
		if err := finite(cv.Label, pts); err != nil {
			return nil, err
		}
		pl := newCurve(p, pts, cv.Tags, cv.Join, cv.Marker, pick(cv.Color, curvePalette, i))
		p.Add(pl)
		if cv.Label != "" {
			p.Legend.Add(cv.Label, pl)
		}
		for _, q := range pts {
			ext.add(q.X, q.Y)
		}
	}

	// Axis ranges.
	p.X.Min, p.X.Max = ext.x0, ext.x1
	if spec.NsRange != [2]float64{} {
		p.X.Min, p.X.Max = spec.NsRange[0], spec.NsRange[1]
	} else if !ext.ok() {
		p.X.Min, p.X.Max = 0.94, 0.99
	} else {
		pad := 0.05 * math.Max(ext.x1-ext.x0, 1e-3)
		p.X.Min, p.X.Max = ext.x0-pad, ext.x1+pad
	}
	switch {
	case spec.RRange != [2]float64{}:
		p.Y.Min, p.Y.Max = spec.RRange[0], spec.RRange[1]
	case spec.RScale == Log:
		top := 0.1
		if ext.ok() && ext.y1 > rcut {
			top = 1.5 * ext.y1
		}
		p.Y.Min, p.Y.Max = rcut, top
	default:
		top := 0.1
		if ext.ok() && ext.y1 > 0 {
			top = 1.05 * ext.y1
		}
		p.Y.Min, p.Y.Max = 0, top
	}
	if spec.RScale == Log {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = decadeTicks{}
	}
	if err := placeLegend(p, spec.Legend); err != nil {
		return nil, err
	}
	return p, nil
}

// newPlot returns a plot with the title and plain-text axis labels.
func newPlot(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = x
	p.Y.Label.Text = y
	p.Legend.ThumbnailWidth = vg.Points(16)
	return p
}

func newCurve(p *plot.Plot, pts []xy, tags []string, join bool, m Marker, c color.Color) *curve {
	font := p.X.Tick.Label
	font.Font.Size = vg.Points(8)
	font.XAlign = draw.XLeft
	font.YAlign = draw.YBottom
	font.Color = c
	return &curve{
		pts:   pts,
		tags:  tags,
		join:  join,
		line:  draw.LineStyle{Color: c, Width: curveWidth},
		glyph: draw.GlyphStyle{Color: c, Radius: glyphRadius, Shape: m.shape()},
		font:  font,
	}
}

func stripePlotter(s Stripe, i int) (*region, error) {
	col := pick(s.Color, curvePalette, i)
	switch {
	case len(s.Path) > 0 && (len(s.Lower) > 0 || len(s.Upper) > 0):
		return nil, fmt.Errorf("figures: stripe %q: give Lower and Upper, or Path, not both", s.Label)
	case len(s.Path) > 0:
		if len(s.Path) < 2 {
			return nil, fmt.Errorf("figures: stripe %q: a path needs at least 2 points", s.Label)
		}
		pts := fromPoints(s.Path)
		if err := finite(s.Label, pts); err != nil {
			return nil, err
		}
		return &region{lines: [][]xy{pts}, line: draw.LineStyle{Color: withAlpha(col, alphaBand), Width: bandWidth}}, nil
	}
	if len(s.Lower) != len(s.Upper) || len(s.Lower) < 2 {
		return nil, fmt.Errorf("figures: stripe %q: edges of %d and %d points, want equal and at least 2", s.Label, len(s.Lower), len(s.Upper))
	}
	ring := fromPoints(s.Lower)
	up := fromPoints(s.Upper)
	for k := len(up) - 1; k >= 0; k-- {
		ring = append(ring, up[k])
	}
	if err := finite(s.Label, ring); err != nil {
		return nil, err
	}
	// Orientation does not matter for a single ring under nonzero winding.
	return &region{rings: [][]xy{ring}, fill: withAlpha(col, alphaBand)}, nil
}

func finite(label string, pts []xy) error {
	for i, q := range pts {
		if math.IsNaN(q.X) || math.IsInf(q.X, 0) || math.IsNaN(q.Y) || math.IsInf(q.Y, 0) {
			return fmt.Errorf("figures: %q point %d is (%g, %g), want finite", label, i+1, q.X, q.Y)
		}
	}
	return nil
}

func checkRange(name string, r [2]float64, log bool) error {
	if r == [2]float64{} {
		return nil
	}
	if !(r[0] < r[1]) || math.IsInf(r[0], 0) || math.IsInf(r[1], 0) {
		return fmt.Errorf("figures: %s range [%g, %g], want min < max", name, r[0], r[1])
	}
	if log && !(r[0] > 0) {
		return fmt.Errorf("figures: %s range [%g, %g] on a log axis, want min > 0", name, r[0], r[1])
	}
	return nil
}

func placeLegend(p *plot.Plot, c Corner) error {
	switch c {
	case TopRight:
		p.Legend.Top, p.Legend.Left = true, false
	case TopLeft:
		p.Legend.Top, p.Legend.Left = true, true
	case BottomRight:
		p.Legend.Top, p.Legend.Left = false, false
	case BottomLeft:
		p.Legend.Top, p.Legend.Left = false, true
	case NoLegend:
		p.Legend = plot.NewLegend()
	default:
		return fmt.Errorf("figures: unknown legend corner %d", c)
	}
	p.Legend.XOffs, p.Legend.YOffs = -vg.Points(6), -vg.Points(6)
	if p.Legend.Left {
		p.Legend.XOffs = vg.Points(6)
	}
	if !p.Legend.Top {
		p.Legend.YOffs = vg.Points(6)
	}
	return nil
}

// extent accumulates the bounding box of the content.
type extent struct {
	x0, x1, y0, y1 float64
	n              int
}

func (e *extent) add(x, y float64) {
	if e.n == 0 {
		e.x0, e.x1, e.y0, e.y1 = x, x, y, y
	}
	e.x0, e.x1 = math.Min(e.x0, x), math.Max(e.x1, x)
	e.y0, e.y1 = math.Min(e.y0, y), math.Max(e.y1, y)
	e.n++
}

func (e *extent) ok() bool { return e.n > 0 }
