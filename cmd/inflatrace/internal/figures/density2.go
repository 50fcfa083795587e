package figures

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/plot/vg/draw"
)

// Density2Curve is one joint posterior density on a grid: Z[i][j] at
// (X[i], Y[j]), the grid's cells of equal prior volume (X may be log
// spaced, as a log-uniform parameter's).
type Density2Curve struct {
	Label string // key text (typeset markup)
	X, Y  []float64
	Z     [][]float64
	Style int // line style index (curveStyle): the same inference, the same line in every figure
}

// Density2Spec describes a figure of joint posteriors of two quantities,
// one pair of regions per inference.
type Density2Spec struct {
	Title          string
	XLabel, YLabel string // typeset markup
	XScale         Scale
	Curves         []Density2Curve
}

// Densities2 draws each joint posterior's highest-density regions of 68%
// and 95% posterior mass (the smallest regions holding that mass on the
// grid) as outlines, solid for 68% and dashed for 95%, a colour per
// inference; the key names each inference and the two line styles.
func Densities2(spec Density2Spec) (*Figure, error) {
	if spec.XScale != Linear && spec.XScale != Log {
		return nil, fmt.Errorf("figures: unknown x scale %d", spec.XScale)
	}
	p := newPlot(spec.Title, spec.XLabel, spec.YLabel)
	f := &Figure{Plot: p}
	var ext extent
	for _, cv := range spec.Curves {
		nx, ny := len(cv.X), len(cv.Y)
		if nx < 3 || ny < 3 || len(cv.Z) != nx {
			return nil, fmt.Errorf("figures: joint density %q: a %d x %d grid with %d rows", cv.Label, nx, ny, len(cv.Z))
		}
		// Isolines on the index lattice (cells of equal prior volume),
		// mapped to the data afterwards.
		g := lattice{X: make([]float64, nx), Y: make([]float64, ny), Z: cv.Z}
		for i := range g.X {
			g.X[i] = float64(i)
		}
		for j := range g.Y {
			g.Y[j] = float64(j)
		}
		at := func(grid []float64, t float64, log bool) float64 {
			i := int(math.Floor(t))
			i = max(0, min(len(grid)-2, i))
			u := t - float64(i)
			if log && grid[i] > 0 && grid[i+1] > 0 {
				return math.Exp(math.Log(grid[i]) + u*(math.Log(grid[i+1])-math.Log(grid[i])))
			}
			return grid[i] + u*(grid[i+1]-grid[i])
		}
		base := curveStyle(cv.Style)
		for n, mass := range []float64{0.6827, 0.9545} {
			level := hpdLevel(cv.Z, mass)
			if !(level > 0) {
				continue
			}
			line := draw.LineStyle{Color: base.Color, Width: curveWidth}
			if n == 1 {
				line.Width, line.Dashes = contourWidth, dash95
			}
			for _, ring := range isolines(g, level) {
				pts := make([]xy, 0, len(ring)+1)
				for _, q := range append(ring, ring[0]) {
					pt := xy{at(cv.X, q.X, spec.XScale == Log), at(cv.Y, q.Y, false)}
					pts = append(pts, pt)
					ext.add(pt.X, pt.Y)
				}
				f.Plot.Add(newCurve(pts, nil, MarkerNone, true, line))
			}
		}
		f.Key = append(f.Key, KeyEntry{cv.Label, Swatch{Kind: SwatchLine, Line: base}})
	}
	if !ext.ok() {
		return nil, fmt.Errorf("figures: no joint density to draw")
	}
	f.Key = append(f.Key,
		KeyEntry{`68% of the posterior`, Swatch{Kind: SwatchLine, Line: draw.LineStyle{Color: forecastColor, Width: curveWidth}}},
		KeyEntry{`95% of the posterior`, Swatch{Kind: SwatchLine, Line: draw.LineStyle{Color: forecastColor, Width: contourWidth, Dashes: dash95}}})
	fitX(p, ext, spec.XScale, 1.3, 0.05)
	pad := 0.05 * math.Max(ext.y1-ext.y0, 1e-12)
	p.Y.Min, p.Y.Max = ext.y0-pad, ext.y1+pad
	f.Key = capKey(f.Key)
	return f, nil
}

// hpdLevel is the density above which the grid's cells hold mass of the
// total (cells of equal volume): the level of the highest-density region.
func hpdLevel(z [][]float64, mass float64) float64 {
	var vals []float64
	var total float64
	for _, row := range z {
		for _, v := range row {
			if v > 0 {
				vals = append(vals, v)
				total += v
			}
		}
	}
	if total == 0 {
		return 0
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(vals)))
	cum := 0.0
	for _, v := range vals {
		cum += v
		if cum >= mass*total {
			return v
		}
	}
	return vals[len(vals)-1]
}
