package figures

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
)

// RAlpha draws r on a logarithmic axis against a scanned parameter (by
// default labelled 3 alpha), with each forecast's detection level as a
// horizontal line named in the key. Ranges not given follow the curves
// and levels (a factor 1.5 beyond them on log axes, 5% on a linear one), so
// no point is clipped; points outside a range the caller fixed are
// counted in Figure.Clipped.
func RAlpha(spec RAlphaSpec) (*Figure, error) {
	if spec.XScale != Linear && spec.XScale != Log {
		return nil, fmt.Errorf("figures: unknown x scale %d", spec.XScale)
	}
	if err := checkRange("x", spec.XRange, spec.XScale == Log); err != nil {
		return nil, err
	}
	if err := checkRange("r", spec.RRange, true); err != nil {
		return nil, err
	}
	xlabel := spec.XLabel
	if xlabel == "" {
		xlabel = `$3\alpha$`
	}
	p := newPlot(spec.Title, xlabel, `$r$`)
	f := &Figure{Plot: p}
	var ext extent
	var all [][]xy
	for _, cv := range spec.Curves {
		if len(cv.X) != len(cv.R) {
			return nil, fmt.Errorf("figures: curve %q: %d x values for %d r values", cv.Label, len(cv.X), len(cv.R))
		}
		pts := make([]xy, len(cv.X))
		for k := range cv.X {
			pts[k] = xy{cv.X[k], cv.R[k]}
		}
		if err := f.addCurve(cv.Label, pts, cv.Markers, cv.Marker, cv.Join, cv.Style, cv.Color); err != nil {
			return nil, err
		}
		for _, q := range pts {
			if spec.XScale == Log && q.X <= 0 {
				continue
			}
			ext.add(q.X, q.Y)
		}
		all = append(all, pts)
	}
	levels, err := f.addForecasts(spec.Forecasts)
	if err != nil {
		return nil, err
	}
	f.Key = append(capKey(f.Key), markerKey(spec.Markers)...)
	switch {
	case spec.XRange != [2]float64{}:
		p.X.Min, p.X.Max = spec.XRange[0], spec.XRange[1]
	case !ext.ok():
		p.X.Min, p.X.Max = 0.1, 100
		if spec.XScale == Linear {
			p.X.Min = 0
		}
	case spec.XScale == Log:
		p.X.Min, p.X.Max = ext.x0/1.5, ext.x1*1.5
	default:
		pad := 0.05 * math.Max(ext.x1-ext.x0, math.Abs(ext.x1)*1e-3+1e-12)
		p.X.Min, p.X.Max = ext.x0-pad, ext.x1+pad
	}
	if spec.RRange != [2]float64{} {
		p.Y.Min, p.Y.Max = spec.RRange[0], spec.RRange[1]
	} else {
		p.Y.Min, p.Y.Max = logSpan(ext, levels, 1e-3, 0.1)
	}
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = decadeTicks{}
	if spec.XScale == Log {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = decadeTicks{}
	}
	f.Clipped = countOutside(all, p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, true)
	return f, nil
}
