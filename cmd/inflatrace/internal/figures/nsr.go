package figures

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// NsR draws the n_s-r plane: the 68.27% region of each constraint set
// (filled, solid outline) and its 95.45% region (dashed outline), reheating
// stripes, forecast detection levels, and model curves, with r on a linear
// axis from zero or a logarithmic one. Axis ranges not given follow the
// content, so no point is clipped: the n_s axis spans the points, stripes
// and 95% regions with a 5% margin; a log r axis spans the points and
// levels with a factor 1.5 beyond them; a linear one starts at 0. Points
// outside a range the caller fixed are counted in Figure.Clipped. The key
// names every model, the meaning of each marker shape, each constraint
// set's 68% and 95% regions, each band and each forecast level.
func NsR(spec NsRSpec) (*Figure, error) {
	if spec.RScale != Linear && spec.RScale != Log {
		return nil, fmt.Errorf("figures: unknown r scale %d", spec.RScale)
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
	p := newPlot(spec.Title, `$n_s$`, `$r$`)
	f := &Figure{Plot: p}
	var regions, points extent  // x: n_s; y: r
	var outlines []plot.Plotter // drawn over every fill
	for i, layer := range spec.Constraints {
		sets, err := constraintContours(layer.Set, grid)
		if err != nil {
			return nil, err
		}
		col := pick(layer.Color, constraintPalette, i)
		line68 := draw.LineStyle{Color: col, Width: contourWidth}
		line95 := draw.LineStyle{Color: col, Width: contourWidth, Dashes: dash95}
		fill := tint(col, alpha68)
		p.Add(&region{rings: sets[0].rings, fill: fill})
		outlines = append(outlines, &region{lines: sets[1].lines, line: line95}, &region{lines: sets[0].lines, line: line68})
		label := layer.Label
		if label == "" {
			label = layer.Set.Label()
		}
		label = PlainText(label)
		f.Key = append(f.Key,
			KeyEntry{label + " 68%", Swatch{Kind: SwatchFilled, Line: line68, Fill: fill}},
			KeyEntry{label + " 95%", Swatch{Kind: SwatchOutline, Line: line95}})
		for _, ring := range sets[1].rings {
			for _, q := range ring {
				regions.add(q.X, math.Max(q.Y, 0))
			}
		}
	}
	for _, s := range spec.Stripes {
		pl, err := stripePlotter(s)
		if err != nil {
			return nil, err
		}
		p.Add(pl)
		if s.Label != "" {
			f.Key = append(f.Key, KeyEntry{s.Label, Swatch{Kind: SwatchBand, Fill: tint(stripeColor(s), alphaBand)}})
		}
		for _, q := range append(append(append([]xy(nil), fromPoints(s.Lower)...), fromPoints(s.Upper)...), fromPoints(s.Path)...) {
			points.add(q.X, q.Y)
		}
	}
	p.Add(outlines...)
	levels, err := f.addForecasts(spec.Forecasts)
	if err != nil {
		return nil, err
	}
	var all [][]xy
	for _, cv := range spec.Curves {
		pts := fromPoints(cv.Points)
		if err := f.addCurve(cv.Label, pts, cv.Markers, cv.Marker, cv.Join, cv.Style, cv.Color); err != nil {
			return nil, err
		}
		for _, q := range pts {
			points.add(q.X, q.Y)
		}
		all = append(all, pts)
	}
	f.Key = append(capKey(f.Key), markerKey(spec.Markers)...)

	// Axis ranges: what the caller fixed, or what the content needs.
	content := points
	content.merge(regions)
	switch {
	case spec.NsRange != [2]float64{}:
		p.X.Min, p.X.Max = spec.NsRange[0], spec.NsRange[1]
	case !content.ok():
		p.X.Min, p.X.Max = 0.94, 0.99
	default:
		pad := 0.05 * math.Max(content.x1-content.x0, 1e-3)
		p.X.Min, p.X.Max = content.x0-pad, content.x1+pad
	}
	switch {
	case spec.RRange != [2]float64{}:
		p.Y.Min, p.Y.Max = spec.RRange[0], spec.RRange[1]
	case spec.RScale == Log:
		lo, hi := logSpan(points, append(levels, regions.y1), DefaultRCut, 0.1)
		p.Y.Min, p.Y.Max = lo, hi
	default:
		top := 0.1
		if content.ok() {
			top = 1.05 * math.Max(content.y1, maxOf(levels))
		}
		if !(top > 0) {
			top = 0.1
		}
		p.Y.Min, p.Y.Max = 0, top
	}
	if spec.RScale == Log {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = decadeTicks{}
	}
	f.Clipped = countOutside(all, p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, spec.RScale == Log)
	return f, nil
}

// addCurve checks a curve's points and markers, draws it in its style
// (the Style-th, its colour replaced by col when set) and names it in the
// key when it has a label.
func (f *Figure) addCurve(label string, pts []xy, markers []Marker, m Marker, join bool, style int, col color.Color) error {
	if markers != nil && len(markers) != len(pts) {
		return fmt.Errorf("figures: curve %q: %d markers for %d points", label, len(markers), len(pts))
	}
	if err := finite(label, pts); err != nil {
		return err
	}
	line := curveStyle(style)
	if col != nil {
		line.Color = col
	}
	f.Plot.Add(newCurve(pts, markers, m, join, line))
	if label != "" {
		f.Key = append(f.Key, KeyEntry{label, Swatch{Kind: SwatchLine, Line: line}})
	}
	return nil
}

// addForecasts draws each forecast's detection level, names it in the
// key, and returns the levels (what the r axis must reach).
func (f *Figure) addForecasts(fls []ForecastLine) ([]float64, error) {
	var levels []float64
	for _, fl := range fls {
		y, entry, line, err := forecastLevel(fl)
		if err != nil {
			return nil, err
		}
		f.Plot.Add(&hline{y: y, line: line})
		f.Key = append(f.Key, entry)
		levels = append(levels, y)
	}
	return levels, nil
}

// logSpan is the span of a log axis holding every point with y > 0 and
// every level, a factor 1.5 beyond them; lo and hi are the defaults when
// there is nothing.
func logSpan(points extent, levels []float64, lo, hi float64) (float64, float64) {
	min, max := math.Inf(1), math.Inf(-1)
	if points.ok() && points.posY0 > 0 {
		min, max = points.posY0, points.y1
	}
	for _, l := range levels {
		if l > 0 {
			min, max = math.Min(min, l), math.Max(max, l)
		}
	}
	if math.IsInf(min, 0) {
		return lo, hi
	}
	if max <= min {
		max = min * 10
	}
	return min / 1.5, max * 1.5
}

func maxOf(xs []float64) float64 {
	m := math.Inf(-1)
	for _, x := range xs {
		m = math.Max(m, x)
	}
	return m
}

// countOutside counts the points not inside the axis box (on a log axis,
// r <= 0 is outside).
func countOutside(curves [][]xy, x0, x1, y0, y1 float64, ylog bool) int {
	n := 0
	for _, pts := range curves {
		for _, q := range pts {
			if q.X < x0 || q.X > x1 || q.Y < y0 || q.Y > y1 || ylog && q.Y <= 0 {
				n++
			}
		}
	}
	return n
}

// MaxKeyModels is the most models a key names; the curves of any more
// are drawn, and one entry says how many the key leaves out.
const MaxKeyModels = 60

// capKey keeps the first MaxKeyModels model entries of a key.
func capKey(key []KeyEntry) []KeyEntry {
	var out []KeyEntry
	n := 0
	for _, e := range key {
		if e.Swatch.Kind == SwatchLine {
			n++
			if n > MaxKeyModels {
				continue
			}
		}
		out = append(out, e)
	}
	if n > MaxKeyModels {
		out = append(out, KeyEntry{Label: fmt.Sprintf("and %d more models (draw a subset to name them)", n-MaxKeyModels), Swatch: Swatch{Kind: SwatchMarker}})
	}
	return out
}

// markerKey explains the marker shapes.
func markerKey(ms []MarkerLabel) []KeyEntry {
	var out []KeyEntry
	for _, m := range ms {
		out = append(out, KeyEntry{m.Label, Swatch{Kind: SwatchMarker, Glyph: draw.GlyphStyle{Color: color.Black, Radius: glyphRadius, Shape: m.Marker.shape()}}})
	}
	return out
}

// forecastLevel is a forecast's detection level: its r, key entry and line.
func forecastLevel(fl ForecastLine) (float64, KeyEntry, draw.LineStyle, error) {
	if err := fl.Forecast.Check(); err != nil {
		return 0, KeyEntry{}, draw.LineStyle{}, err
	}
	k := fl.K
	if k == 0 {
		k = DetectionSigmas
	}
	if !(k > 0) || math.IsInf(k, 0) {
		return 0, KeyEntry{}, draw.LineStyle{}, fmt.Errorf("figures: forecast %s: multiple K = %g, want > 0", fl.Forecast.Name, k)
	}
	y := k * fl.Forecast.SigmaR
	col := fl.Color
	if col == nil {
		col = forecastColor
	}
	line := draw.LineStyle{Color: col, Width: contourWidth, Dashes: dashForecast}
	label := fl.Label
	if label == "" {
		label = forecastLabel(fl.Forecast.Name, k, y)
	}
	return y, KeyEntry{label, Swatch{Kind: SwatchForecast, Line: line}}, line, nil
}

// forecastLabel states the rule: "LiteBIRD: detects r at 3σ above r =
// 3σ(r) = 0.003".
func forecastLabel(name string, k, y float64) string {
	ks := strconv.FormatFloat(k, 'g', -1, 64)
	return PlainText(name) + ": detects $r$ at " + ks + `$\sigma$ above $r$ = ` + ks + `$\sigma(r)$ = ` + strconv.FormatFloat(y, 'g', 3, 64)
}

// newPlot returns a plot with the title and typeset axis labels.
func newPlot(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = x
	p.Y.Label.Text = y
	p.X.Label.TextStyle.Font.Size = vg.Points(12)
	p.Y.Label.TextStyle.Font.Size = vg.Points(12)
	useHandler(p, handler)
	return p
}

func newCurve(pts []xy, markers []Marker, m Marker, join bool, line draw.LineStyle) *curve {
	cv := &curve{pts: pts, join: join, line: line, glyph: draw.GlyphStyle{Color: line.Color, Radius: glyphRadius, Shape: m.shape()}}
	if markers != nil {
		cv.glyphs = make([]draw.GlyphStyle, len(markers))
		for i, mk := range markers {
			cv.glyphs[i] = draw.GlyphStyle{Color: line.Color, Radius: glyphRadius, Shape: mk.shape()}
		}
	}
	return cv
}

func stripeColor(s Stripe) color.Color {
	if s.Color != nil {
		return s.Color
	}
	return curveStyle(s.Style).Color
}

func stripePlotter(s Stripe) (*region, error) {
	col := stripeColor(s)
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
		return &region{lines: [][]xy{pts}, line: draw.LineStyle{Color: tint(col, alphaBand), Width: bandWidth}}, nil
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
	return &region{rings: [][]xy{ring}, fill: tint(col, alphaBand)}, nil
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

// extent accumulates the bounding box of the content, and the least
// positive y (what a log axis must reach).
type extent struct {
	x0, x1, y0, y1 float64
	posY0          float64
	n              int
}

func (e *extent) add(x, y float64) {
	if e.n == 0 {
		e.x0, e.x1, e.y0, e.y1 = x, x, y, y
	}
	e.x0, e.x1 = math.Min(e.x0, x), math.Max(e.x1, x)
	e.y0, e.y1 = math.Min(e.y0, y), math.Max(e.y1, y)
	if y > 0 && (e.posY0 == 0 || y < e.posY0) {
		e.posY0 = y
	}
	e.n++
}

func (e *extent) merge(o extent) {
	if o.n == 0 {
		return
	}
	e.add(o.x0, o.y0)
	e.add(o.x1, o.y1)
}

func (e *extent) ok() bool { return e.n > 0 }
