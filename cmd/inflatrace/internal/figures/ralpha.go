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

// RAlpha draws r on a logarithmic axis against a scanned parameter (by
// default labelled "3 alpha"), with a labelled horizontal line at
// K sigma(r) for each forecast. Ranges not given are fitted to the curves
// and lines (a factor 1.5 beyond them on log axes, 5% on a linear one),
// r from no lower than spec.RCut.
func RAlpha(spec RAlphaSpec) (*plot.Plot, error) {
	if spec.XScale != Linear && spec.XScale != Log {
		return nil, fmt.Errorf("figures: unknown x scale %d", spec.XScale)
	}
	rcut := spec.RCut
	if rcut == 0 {
		rcut = DefaultRCut
	}
	if !(rcut > 0) {
		return nil, fmt.Errorf("figures: log r axis needs a cut r > 0, got %g", rcut)
	}
	if err := checkRange("x", spec.XRange, spec.XScale == Log); err != nil {
		return nil, err
	}
	if err := checkRange("r", spec.RRange, true); err != nil {
		return nil, err
	}
	xlabel := spec.XLabel
	if xlabel == "" {
		xlabel = "3 alpha"
	}
	p := newPlot(spec.Title, xlabel, "r")
	var ext extent
	var rs []float64
	for i, cv := range spec.Curves {
		if len(cv.X) != len(cv.R) {
			return nil, fmt.Errorf("figures: curve %q: %d x values for %d r values", cv.Label, len(cv.X), len(cv.R))
		}
		pts := make([]xy, len(cv.X))
		for k := range cv.X {
			pts[k] = xy{cv.X[k], cv.R[k]}
		}
		if err := finite(cv.Label, pts); err != nil {
			return nil, err
		}
		pl := newCurve(p, pts, nil, cv.Join, cv.Marker, pick(cv.Color, curvePalette, i))
		p.Add(pl)
		if cv.Label != "" {
			p.Legend.Add(cv.Label, pl)
		}
		for _, q := range pts {
			if spec.XScale == Log && q.X <= 0 {
				continue
			}
			if q.Y > 0 {
				ext.add(q.X, q.Y)
				rs = append(rs, q.Y)
			}
		}
	}
	for _, f := range spec.Forecasts {
		if err := f.Forecast.Check(); err != nil {
			return nil, err
		}
		k := f.K
		if k == 0 {
			k = 1
		}
		if !(k > 0) || math.IsInf(k, 0) {
			return nil, fmt.Errorf("figures: forecast %s: multiple K = %g, want > 0", f.Forecast.Name, k)
		}
		y := k * f.Forecast.SigmaR
		label := f.Label
		if label == "" {
			label = forecastLabel(f.Forecast.Name, k, y)
		}
		col := f.Color
		if col == nil {
			col = color.NRGBA{96, 96, 96, 255}
		}
		font := p.X.Tick.Label
		font.Font.Size = vg.Points(8)
		font.XAlign = draw.XLeft
		font.YAlign = draw.YBottom
		font.Color = col
		p.Add(&hline{y: y, label: label, line: draw.LineStyle{Color: col, Width: contourWidth, Dashes: []vg.Length{vg.Points(4), vg.Points(2)}}, font: font})
		rs = append(rs, y)
	}

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
		lo, hi := 1e-3, 0.1
		if len(rs) > 0 {
			lo, hi = math.Inf(1), math.Inf(-1)
			for _, r := range rs {
				lo, hi = math.Min(lo, r), math.Max(hi, r)
			}
			lo, hi = lo/1.5, hi*1.5
		}
		p.Y.Min, p.Y.Max = math.Max(lo, rcut), math.Max(hi, rcut*10)
	}
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = decadeTicks{}
	if spec.XScale == Log {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = decadeTicks{}
	}
	if err := placeLegend(p, spec.Legend); err != nil {
		return nil, err
	}
	return p, nil
}

// forecastLabel is "<name>: sigma(r) = <y>" or "<name>: <k> sigma(r) = <y>",
// with y to three significant digits.
func forecastLabel(name string, k, y float64) string {
	v := strconv.FormatFloat(y, 'g', 3, 64)
	if k == 1 {
		return name + ": sigma(r) = " + v
	}
	return name + ": " + strconv.FormatFloat(k, 'g', -1, 64) + " sigma(r) = " + v
}
