package figures

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// sampleGrid samples f on an n x n grid over [lo, hi]^2.
func sampleGrid(f func(x, y float64) float64, lo, hi float64, n int) lattice {
	g := lattice{X: make([]float64, n), Y: make([]float64, n), Z: make([][]float64, n)}
	for i := range g.X {
		g.X[i] = lo + (hi-lo)*float64(i)/float64(n-1)
		g.Y[i] = g.X[i]
	}
	for i := range g.Z {
		g.Z[i] = make([]float64, n)
		for j := range g.Z[i] {
			g.Z[i][j] = f(g.X[i], g.Y[j])
		}
	}
	return g
}

// area is the signed area of a ring (Gauss's shoelace formula):
// positive when counter-clockwise.
func area(ring []xy) float64 {
	a := 0.0
	for i, p := range ring {
		q := ring[(i+1)%len(ring)]
		a += p.X*q.Y - q.X*p.Y
	}
	return a / 2
}

// winding is the winding number of the rings about p (Sunday's
// crossing-direction rule; common practice).
func winding(rings [][]xy, p xy) int {
	w := 0
	for _, ring := range rings {
		for i, a := range ring {
			b := ring[(i+1)%len(ring)]
			cross := (b.X-a.X)*(p.Y-a.Y) - (p.X-a.X)*(b.Y-a.Y)
			if a.Y <= p.Y {
				if b.Y > p.Y && cross > 0 {
					w++
				}
			} else if b.Y <= p.Y && cross < 0 {
				w--
			}
		}
	}
	return w
}

// TestIsolinesShapes: isolines of functions with known level sets.
// Circle: exp(-(x^2+y^2)/2) = exp(-1/2) is the unit circle, traced
// counter-clockwise with area pi (to 2e-3: linear interpolation on a
// 0.05 grid). Annulus: exp(-(rho-2)^2) = exp(-1/4) is rho = 1.5 and 2.5,
// the outer ring counter-clockwise (area 6.25 pi), the hole clockwise
// (-2.25 pi). Two bumps make two rings. Every vertex lies on the level
// to the interpolation error.
func TestIsolinesShapes(t *testing.T) {
	bump := func(cx, cy float64) func(x, y float64) float64 {
		return func(x, y float64) float64 { return math.Exp(-((x-cx)*(x-cx) + (y-cy)*(y-cy)) / 2) }
	}
	for _, c := range []struct {
		name  string
		f     func(x, y float64) float64
		level float64
		areas []float64
	}{
		{"circle", bump(0, 0), math.Exp(-0.5), []float64{math.Pi}},
		{"annulus", func(x, y float64) float64 { r := math.Hypot(x, y); return math.Exp(-(r - 2) * (r - 2)) }, math.Exp(-0.25), []float64{6.25 * math.Pi, -2.25 * math.Pi}},
		{"two bumps", func(x, y float64) float64 { return bump(-2.2, 0)(x, y) + bump(2.2, 0)(x, y) }, math.Exp(-0.5), nil},
	} {
		g := sampleGrid(c.f, -4, 4, 161)
		rings := isolines(g, c.level)
		if c.name == "two bumps" {
			if len(rings) != 2 {
				t.Errorf("%s: %d rings, want 2", c.name, len(rings))
			}
			for _, r := range rings {
				if area(r) <= 0 {
					t.Errorf("%s: ring clockwise", c.name)
				}
			}
		} else {
			if len(rings) != len(c.areas) {
				t.Fatalf("%s: %d rings, want %d", c.name, len(rings), len(c.areas))
			}
			for _, want := range c.areas {
				ok := false
				for _, r := range rings {
					if math.Abs(area(r)-want) < 2e-3*math.Abs(want) {
						ok = true
					}
				}
				if !ok {
					t.Errorf("%s: no ring of signed area %.4f", c.name, want)
				}
			}
		}
		for _, r := range rings {
			for _, p := range r {
				if d := c.f(p.X, p.Y) - c.level; math.Abs(d) > 2e-3 {
					t.Fatalf("%s: vertex (%.4f, %.4f) off the level by %.2g", c.name, p.X, p.Y, d)
				}
			}
		}
	}
}

// TestIsolinesInside: for every grid node, the winding number of the
// rings about it is 1 where Z >= level and 0 where Z < level: the rings
// bound exactly the superlevel set under the nonzero rule. Covers saddle
// cells, regions cut by the grid's edge (closed by the padding) and
// random fields (levels chosen off the node values). At the centre of
// each saddle cell (diagonal corners inside) the winding is 1 exactly when
// the corners' mean is >= level, the rule the tracer resolves them by.
func TestIsolinesInside(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 3))
	random := lattice{X: make([]float64, 30), Y: make([]float64, 25), Z: make([][]float64, 30)}
	for i := range random.X {
		random.X[i] = float64(i) + 0.3*rng.Float64()
	}
	for j := range random.Y {
		random.Y[j] = 2 * float64(j)
	}
	for i := range random.Z {
		random.Z[i] = make([]float64, len(random.Y))
		for j := range random.Z[i] {
			random.Z[i][j] = rng.Float64()
		}
	}
	for _, c := range []struct {
		name  string
		g     lattice
		level float64
	}{
		{"saddle", sampleGrid(func(x, y float64) float64 { return math.Sin(x) * math.Sin(y) }, -6, 6, 37), 0.3001},
		{"saddle coarse", sampleGrid(func(x, y float64) float64 { return math.Sin(x) * math.Sin(y) }, -6, 6, 9), 0.0501},
		{"edge", sampleGrid(func(x, y float64) float64 { return x + 0.3*y }, 0, 1, 11), 0.5001},
		{"random", random, 0.5},
		{"random high", random, 0.9},
	} {
		rings := isolines(c.g, c.level)
		for i, x := range c.g.X {
			for j, y := range c.g.Y {
				want := 0
				if c.g.Z[i][j] >= c.level {
					want = 1
				}
				if w := winding(rings, xy{x, y}); w != want {
					t.Fatalf("%s: node (%d, %d) value %.4f: winding %d, want %d", c.name, i, j, c.g.Z[i][j], w, want)
				}
			}
		}
		saddles := 0
		for i := 0; i+1 < len(c.g.X); i++ {
			for j := 0; j+1 < len(c.g.Y); j++ {
				z := [4]float64{c.g.Z[i][j], c.g.Z[i+1][j], c.g.Z[i+1][j+1], c.g.Z[i][j+1]}
				in0, in1, in2, in3 := z[0] >= c.level, z[1] >= c.level, z[2] >= c.level, z[3] >= c.level
				if !(in0 == in2 && in1 == in3 && in0 != in1) {
					continue
				}
				saddles++
				want := 0
				if (z[0]+z[1]+z[2]+z[3])/4 >= c.level {
					want = 1
				}
				mid := xy{(c.g.X[i] + c.g.X[i+1]) / 2, (c.g.Y[j] + c.g.Y[j+1]) / 2}
				if w := winding(rings, mid); w != want {
					t.Errorf("%s: saddle cell (%d, %d) %v: winding %d at the centre, want %d", c.name, i, j, z, w, want)
				}
			}
		}
		if c.name == "saddle coarse" && saddles == 0 {
			t.Errorf("%s: no saddle cells", c.name)
		}
	}
}

// TestClip: Sutherland-Hodgman clipping of a square to a box keeps the
// overlap's area and orientation; a polyline leaving and re-entering the
// box is cut into two pieces ending on the box.
func TestClip(t *testing.T) {
	sq := []xy{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}}
	b := box{0, 2, -0.5, 0.5}
	got := clipPolygon(sq, b)
	if a := area(got); math.Abs(a-1) > 1e-15 {
		t.Errorf("clipped square area %g, want 1 (counter-clockwise)", a)
	}
	for _, p := range got {
		if !b.contains(p) {
			t.Errorf("clipped vertex %v outside the box", p)
		}
	}
	line := []xy{{-1, 0}, {1, 0}, {1, 3}, {1.5, 3}, {1.5, 0}, {3, 0}}
	pieces := clipPolyline(line, box{0, 2, -1, 1})
	if len(pieces) != 2 {
		t.Fatalf("%d pieces, want 2: %v", len(pieces), pieces)
	}
	want := [][]xy{{{0, 0}, {1, 0}, {1, 1}}, {{1.5, 1}, {1.5, 0}, {2, 0}}}
	for k := range want {
		if len(pieces[k]) != len(want[k]) {
			t.Fatalf("piece %d = %v, want %v", k, pieces[k], want[k])
		}
		for i := range want[k] {
			if pieces[k][i] != want[k][i] {
				t.Errorf("piece %d = %v, want %v", k, pieces[k], want[k])
			}
		}
	}
}

// TestGaussianContours: every vertex of the drawn 68.27% and 95.45%
// regions of Gaussian sets satisfies Delta chi^2 = 2.2958 / 6.1801 (the
// two-parameter chi^2 quantiles, compare.Chi2Level) to 1e-9 and has
// r >= 0, for an upper limit and for a set clear of r = 0 (both as value
// and pointer).
func TestGaussianContours(t *testing.T) {
	clear := compare.Gaussian{Name: "clear", MeanNs: 0.965, SigmaNs: 0.004, MeanR: 0.05, SigmaR: 0.01, Rho: 0.5}
	for _, set := range []compare.Constraint{upperLimit, &clear} {
		sets, err := constraintContours(set, DefaultGrid)
		if err != nil {
			t.Fatal(err)
		}
		for k, level := range []float64{compare.Chi2Level(compare.P68), compare.Chi2Level(compare.P95)} {
			for _, ring := range append(sets[k].rings, sets[k].lines...) {
				for _, p := range ring {
					if d := set.DeltaChi2(p.X, p.Y); math.Abs(d-level) > 1e-9 || p.Y < 0 {
						t.Fatalf("%s: vertex (%.6f, %.6f) has Delta chi^2 %.12f, want %.12f, r >= 0", set.Label(), p.X, p.Y, d, level)
					}
				}
			}
		}
	}
}

// TestKDEContours: the drawn regions of a KDE set (1000 samples of a
// Gaussian touching r = 0, grid 60). Vertices with r >= 0 lie on the
// set's own Delta chi^2 levels within 0.1: linear interpolation along a
// grid edge of width D errs by about D^2/8 |q2|/q in ln q, q2 the second
// derivative, with |q2|/q up to ~1/(h sigma)^2 on the kernel scale, that
// is ~0.02 in ln q and 0.04 in Delta chi^2, here allowed 2.5 times. The
// fraction of samples inside each region (nonzero winding after clipping
// at r = 0) is 68.27% / 95.45% within 2 points (the levels are the
// samples' density quantiles, so the fractions hold up to the grid
// error).
func TestKDEContours(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 5))
	pts := make([]compare.Point, 1000)
	for i := range pts {
		z1, z2 := rng.NormFloat64(), rng.NormFloat64()
		pts[i] = compare.Point{Ns: 0.965 + 0.004*z1, R: math.Abs(0.01 + 0.01*(0.5*z1+0.866*z2))}
	}
	k, err := compare.NewKDE("kde", "synthetic", pts)
	if err != nil {
		t.Fatal(err)
	}
	sets, err := constraintContours(k, 60)
	if err != nil {
		t.Fatal(err)
	}
	d68, d95 := k.Levels()
	lo, hi := k.Extent()
	b := box{lo.Ns - 1, hi.Ns + 1, 0, hi.R + 1}
	for n, c := range []struct{ level, mass float64 }{{d68, compare.P68}, {d95, compare.P95}} {
		var clipped [][]xy
		for _, ring := range sets[n].rings {
			for _, p := range ring {
				if p.Y < 0 {
					continue
				}
				if d := k.DeltaChi2(p.X, p.Y); math.Abs(d-c.level) > 0.1 {
					t.Fatalf("level %d: vertex (%.5f, %.5f) has Delta chi^2 %.4f, want %.4f", n, p.X, p.Y, d, c.level)
				}
			}
			clipped = append(clipped, clipPolygon(ring, b))
		}
		inside := 0
		for _, p := range pts {
			if winding(clipped, xy{p.Ns, p.R}) != 0 {
				inside++
			}
		}
		if f := float64(inside) / float64(len(pts)); math.Abs(f-c.mass) > 0.02 {
			t.Errorf("level %d: %.4f of samples inside, want %.4f", n, f, c.mass)
		}
	}
}
