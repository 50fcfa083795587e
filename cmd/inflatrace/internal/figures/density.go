package figures

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg/draw"
)

// DensityCurve is one posterior density: a model's, against one set.
type DensityCurve struct {
	Label string // key text (typeset markup)
	X, Y  []float64
	Style int // line style index (curveStyle): the same inference, the same line in every figure
}

// DensitySpec describes a figure of posterior densities of one quantity,
// one curve per inference, with optional vertical levels (a forecast's
// detection threshold on a log10 r axis, say).
type DensitySpec struct {
	Title  string // typeset markup
	XLabel string // typeset markup
	YLabel string // typeset markup; empty means "posterior density"
	XScale Scale  // Linear or Log (the x values as given, positive)
	Curves []DensityCurve
	Levels []VLine
}

// VLine is a vertical line named in the key.
type VLine struct {
	X     float64
	Label string // typeset markup
}

// Densities draws posterior densities of one quantity. Its ranges follow
// the curves and levels; each curve is scaled to a peak of 1, so that
// models with different spreads can be read on one axis (the key says
// so).
func Densities(spec DensitySpec) (*Figure, error) {
	if spec.XScale != Linear && spec.XScale != Log {
		return nil, fmt.Errorf("figures: unknown x scale %d", spec.XScale)
	}
	ylabel := spec.YLabel
	if ylabel == "" {
		ylabel = `posterior density (peak 1)`
	}
	p := newPlot(spec.Title, spec.XLabel, ylabel)
	f := &Figure{Plot: p}
	var ext extent
	for _, cv := range spec.Curves {
		if len(cv.X) != len(cv.Y) || len(cv.X) < 2 {
			return nil, fmt.Errorf("figures: density %q: %d x values for %d densities", cv.Label, len(cv.X), len(cv.Y))
		}
		top := floats.Max(cv.Y)
		if !(top > 0) {
			continue
		}
		pts := make([]xy, len(cv.X))
		for k := range cv.X {
			pts[k] = xy{cv.X[k], cv.Y[k] / top}
			if spec.XScale == Log && !(cv.X[k] > 0) {
				return nil, fmt.Errorf("figures: density %q: x = %g on a log axis", cv.Label, cv.X[k])
			}
			ext.add(cv.X[k], pts[k].Y)
		}
		if err := f.addCurve(cv.Label, pts, nil, MarkerNone, true, cv.Style, nil); err != nil {
			return nil, err
		}
	}
	for _, lv := range spec.Levels {
		line := draw.LineStyle{Color: forecastColor, Width: contourWidth, Dashes: dashForecast}
		f.Plot.Add(&vline{x: lv.X, line: line})
		f.Key = append(f.Key, KeyEntry{lv.Label, Swatch{Kind: SwatchForecast, Line: line}})
		ext.add(lv.X, 0)
	}
	if !ext.ok() {
		return nil, fmt.Errorf("figures: no density to draw")
	}
	fitX(p, ext, spec.XScale, 1.2, 0.03)
	p.Y.Min, p.Y.Max = 0, 1.08
	f.Key = capKey(f.Key)
	return f, nil
}

// vline is a vertical line across the data area.
type vline struct {
	x    float64
	line draw.LineStyle
}

// Plot implements plot.Plotter.
func (v *vline) Plot(c draw.Canvas, plt *plot.Plot) {
	if v.x < plt.X.Min || v.x > plt.X.Max {
		return
	}
	tx, _ := plt.Transforms(&c)
	x := tx(v.x)
	c.StrokeLine2(v.line, x, c.Min.Y, x, c.Max.Y)
}

// fitX sets a posterior figure's x range to the extent of its content: on
// a log axis (decade ticks) a factor beyond each end, on a linear one a
// fraction of the span.
func fitX(p *plot.Plot, ext extent, scale Scale, factor, fraction float64) {
	if scale == Log {
		p.X.Min, p.X.Max = ext.x0/factor, ext.x1*factor
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = decadeTicks{}
		return
	}
	pad := fraction * math.Max(ext.x1-ext.x0, 1e-12)
	p.X.Min, p.X.Max = ext.x0-pad, ext.x1+pad
}
