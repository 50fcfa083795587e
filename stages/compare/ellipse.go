package compare

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// Contour returns the boundary of the region Delta chi^2 <= dchi2 of g
// with r >= 0, as n points on the ellipse chi^2 = dchi2 + min (min the
// offset DeltaChi2 subtracts), computed analytically: with the covariance
// C = L L^T (Cholesky),
//
//	x(theta) = mean + sqrt(dchi2 + min) L (cos theta, sin theta),
//
// so that (x - mean)^T C^-1 (x - mean) = dchi2 + min exactly, and
// r(theta) = mean_r + sqrt(dchi2 + min) sigma_r sin(theta + asin rho).
//
// When the whole ellipse lies in r >= 0 the points sample it uniformly in
// theta and closed is true. Otherwise only the arc with r >= 0 is
// returned, from one crossing of r = 0 to the other (both ends with r = 0
// exactly), closed is false, and the region's polygon is the arc closed
// along r = 0.
func (g Gaussian) Contour(dchi2 float64, n int) (pts []Point, closed bool, err error) {
	if err := g.Check(); err != nil {
		return nil, false, err
	}
	if !(dchi2 > 0) || math.IsInf(dchi2, 0) {
		return nil, false, fmt.Errorf("constraint %s: contour level Delta chi^2 = %g, want > 0", g.Name, dchi2)
	}
	if n < 8 {
		return nil, false, fmt.Errorf("constraint %s: %d contour points, want at least 8", g.Name, n)
	}
	c := dchi2
	if g.MeanR < 0 {
		y := g.MeanR / g.SigmaR
		c += float64(y * y)
	}
	rad := math.Sqrt(c)
	cr := math.Sqrt(1 - float64(g.Rho*g.Rho))
	at := func(t float64) Point {
		u, v := detmath.Cos(t), detmath.Sin(t)
		return Point{
			Ns: g.MeanNs + float64(float64(rad*g.SigmaNs)*u),
			R:  g.MeanR + float64(float64(rad*g.SigmaR)*(float64(g.Rho*u)+float64(cr*v))),
		}
	}
	s0 := -g.MeanR / (rad * g.SigmaR) // sin(theta + phi) where r = 0
	if s0 <= -1 {
		pts = make([]Point, n)
		for i := range pts {
			pts[i] = at(2 * math.Pi * float64(i) / float64(n))
		}
		return pts, true, nil
	}
	phi := detmath.Asin(g.Rho)
	t1 := detmath.Asin(s0) - phi
	t2 := math.Pi - detmath.Asin(s0) - phi
	pts = make([]Point, n)
	for i := range pts {
		pts[i] = at(t1 + (t2-t1)*float64(i)/float64(n-1))
	}
	pts[0].R, pts[n-1].R = 0, 0
	return pts, false, nil
}
