package compare

import (
	"math"
	"testing"
)

// shoelace is the signed area of a closed polygon (Gauss's area formula).
func shoelace(pts []Point) float64 {
	a := 0.0
	for i, p := range pts {
		q := pts[(i+1)%len(pts)]
		a += p.Ns*q.R - q.Ns*p.R
	}
	return a / 2
}

// TestContourOnLevel: every point of the contour satisfies DeltaChi2 =
// level to 1e-9 and has r >= 0, for the two-parameter 68.27% and 95.45%
// levels 2.2958 and 6.1801, for a constraint clear of r = 0, one centred
// on r = 0 (an upper limit) and one with its mean at r < 0, correlated
// either way. Areas against the ellipse (x-m)^T C^-1 (x-m) = c, which
// encloses pi c sqrt(det C) (common practice): the full ellipse to the
// inscribed polygon's deficit (2 pi/n)^2/6 ~ 1.6e-6 at n = 2000; a
// centred one cut at r = 0 through its centre keeps exactly half (central
// symmetry).
func TestContourOnLevel(t *testing.T) {
	const n = 2000
	for _, g := range []Gaussian{
		{Name: "clear", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0.06, SigmaR: 0.01, Rho: 0.6},
		{Name: "limit", MeanNs: 0.9649, SigmaNs: 0.0042, MeanR: 0, SigmaR: 0.036 / HalfNormal95, Rho: -0.6},
		{Name: "negative", MeanNs: 0.967, SigmaNs: 0.004, MeanR: -0.01, SigmaR: 0.015, Rho: 0.3},
		{Name: "barely", MeanNs: 0.967, SigmaNs: 0.004, MeanR: 0.02, SigmaR: 0.015, Rho: 0},
	} {
		for _, level := range []float64{Chi2Level(P68), Chi2Level(P95)} {
			pts, closed, err := g.Contour(level, n)
			if err != nil {
				t.Fatal(err)
			}
			if len(pts) != n {
				t.Fatalf("%s: %d points, want %d", g.Name, len(pts), n)
			}
			for _, p := range pts {
				if d := g.DeltaChi2(p.Ns, p.R); math.Abs(d-level) > 1e-9 {
					t.Fatalf("%s: DeltaChi2(%v) = %.12f, want %.12f", g.Name, p, d, level)
				}
				if p.R < 0 {
					t.Fatalf("%s: contour point %v below r = 0", g.Name, p)
				}
			}
			full := math.Pi * level * g.SigmaNs * g.SigmaR * math.Sqrt(1-g.Rho*g.Rho)
			wantClosed := g.MeanR-math.Sqrt(level)*g.SigmaR >= 0
			if closed != wantClosed {
				t.Errorf("%s: closed = %v, want %v", g.Name, closed, wantClosed)
			}
			switch {
			case closed:
				if a := math.Abs(shoelace(pts)); math.Abs(a/full-1) > 3e-6 {
					t.Errorf("%s: area %.6g, ellipse %.6g", g.Name, a, full)
				}
			default:
				if pts[0].R != 0 || pts[n-1].R != 0 {
					t.Errorf("%s: truncated arc ends at r = %g, %g, want 0", g.Name, pts[0].R, pts[n-1].R)
				}
				if g.MeanR == 0 {
					if a := math.Abs(shoelace(pts)); math.Abs(a/(full/2)-1) > 3e-6 {
						t.Errorf("%s: area %.6g, half ellipse %.6g", g.Name, a, full/2)
					}
				}
			}
		}
	}
}

// TestContourRefuses: a non-positive level, too few points and an invalid
// constraint are errors.
func TestContourRefuses(t *testing.T) {
	g := Gaussian{Name: "g", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0, SigmaR: 0.02}
	for _, c := range []struct {
		g     Gaussian
		level float64
		n     int
	}{
		{g, 0, 100}, {g, -1, 100}, {g, math.Inf(1), 100}, {g, 2.3, 7},
		{Gaussian{Name: "bad", MeanNs: 0.965, SigmaNs: 0, SigmaR: 0.02}, 2.3, 100},
	} {
		if _, _, err := c.g.Contour(c.level, c.n); err == nil {
			t.Errorf("Contour(%g, %d) of %s accepted", c.level, c.n, c.g.Name)
		}
	}
}
