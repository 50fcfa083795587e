package figures

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// ellipsePoints is the number of points on a Gaussian contour.
const ellipsePoints = 721

// contourSet is one probability level of a constraint: the rings to fill
// (r < 0 parts are clipped at drawing) and the curves to stroke.
type contourSet struct {
	rings, lines [][]xy
}

// constraintContours returns the 68.27% and 95.45% regions of c.
// A Gaussian's boundaries are its Delta chi^2 = 2.30 and 6.18 ellipses cut
// at r = 0 (compare.Gaussian.Contour, analytic). A KDE set's are the
// isolines of its density at the highest-density levels f_68 and f_95
// (compare.KDE.DensityLevels), from the density on a grid x grid lattice
// over compare.KDE.Extent with one more row just below r = 0, where the
// density is zero, so that regions touching r = 0 close there and are cut
// back to r = 0 when drawn.
func constraintContours(c compare.Constraint, grid int) ([2]contourSet, error) {
	var out [2]contourSet
	switch g := c.(type) {
	case *compare.Gaussian:
		return gaussianContours(*g)
	case compare.Gaussian:
		return gaussianContours(g)
	case *compare.KDE:
		return kdeContours(g, grid), nil
	case nil:
		return out, fmt.Errorf("figures: constraint layer without a constraint set")
	}
	return out, fmt.Errorf("figures: constraint %s: no contours for a %T", c.Label(), c)
}

func gaussianContours(g compare.Gaussian) ([2]contourSet, error) {
	var out [2]contourSet
	d68, d95 := g.Levels()
	for k, level := range []float64{d68, d95} {
		pts, closed, err := g.Contour(level, ellipsePoints)
		if err != nil {
			return out, err
		}
		ring := fromPoints(pts)
		line := ring
		if closed {
			line = append(append([]xy(nil), ring...), ring[0])
		}
		out[k] = contourSet{rings: [][]xy{ring}, lines: [][]xy{line}}
	}
	return out, nil
}

func kdeContours(k *compare.KDE, grid int) [2]contourSet {
	lo, hi := k.Extent()
	g := lattice{X: make([]float64, grid), Y: make([]float64, 0, grid+1)}
	for i := range g.X {
		g.X[i] = lo.Ns + (hi.Ns-lo.Ns)*float64(i)/float64(grid-1)
	}
	dr := (hi.R - lo.R) / float64(grid-1)
	if lo.R == 0 {
		g.Y = append(g.Y, -dr)
	}
	for j := 0; j < grid; j++ {
		g.Y = append(g.Y, lo.R+dr*float64(j))
	}
	_, pmax := k.Max()
	g.Z = make([][]float64, len(g.X))
	for i, x := range g.X {
		g.Z[i] = make([]float64, len(g.Y))
		for j, y := range g.Y {
			g.Z[i][j] = k.Density(x, y) / pmax
		}
	}
	f68, f95 := k.DensityLevels()
	var out [2]contourSet
	for n, f := range []float64{f68, f95} {
		rings := isolines(g, f/pmax)
		lines := make([][]xy, len(rings))
		for i, r := range rings {
			lines[i] = append(append([]xy(nil), r...), r[0])
		}
		out[n] = contourSet{rings: rings, lines: lines}
	}
	return out
}

func fromPoints(pts []compare.Point) []xy {
	out := make([]xy, len(pts))
	for i, p := range pts {
		out[i] = xy{p.Ns, p.R}
	}
	return out
}
