package figures

// lattice is a function sampled on a rectangular grid: Z[i][j] is the value
// at (X[i], Y[j]); X and Y increase.
type lattice struct {
	X, Y []float64
	Z    [][]float64
}

// xy is a point in data coordinates.
type xy struct{ X, Y float64 }

// edgeKey names a grid edge: horizontal from node (i, j) to (i+1, j), or
// vertical from (i, j) to (i, j+1).
type edgeKey struct {
	vertical bool
	i, j     int
}

// isolines returns the closed curves Z = level of g by marching squares
// (Lorensen & Cline 1987, Computer Graphics 21(4), 163, in its
// two-dimensional form), with the crossing on each edge interpolated
// linearly. Nodes with Z >= level are inside. Each curve keeps the inside
// on its left, so outer boundaries run counter-clockwise and holes
// clockwise and the set {Z >= level} is filled correctly by the nonzero
// winding rule. Ambiguous (saddle) cells are resolved by the mean of
// their four corners. Curves that would leave the grid are closed by
// treating everything beyond it as outside.
func isolines(g lattice, level float64) [][]xy {
	nx, ny := len(g.X), len(g.Y)
	if nx < 2 || ny < 2 {
		return nil
	}
	// Pad with one ring of outside nodes so that every curve closes.
	z := func(i, j int) float64 {
		if i < 0 || j < 0 || i >= nx || j >= ny {
			return level - 1 - abs(level)
		}
		return g.Z[i][j]
	}
	coord := func(v []float64, i int) float64 {
		switch {
		case i < 0:
			return v[0] - (v[1] - v[0])
		case i >= len(v):
			return v[len(v)-1] + (v[len(v)-1] - v[len(v)-2])
		}
		return v[i]
	}
	point := func(e edgeKey) xy {
		i2, j2 := e.i+1, e.j
		if e.vertical {
			i2, j2 = e.i, e.j+1
		}
		a, b := z(e.i, e.j), z(i2, j2)
		t := (level - a) / (b - a)
		x0, y0 := coord(g.X, e.i), coord(g.Y, e.j)
		x1, y1 := coord(g.X, i2), coord(g.Y, j2)
		return xy{x0 + t*(x1-x0), y0 + t*(y1-y0)}
	}
	next := map[edgeKey]edgeKey{}
	var starts []edgeKey
	for i := -1; i < nx; i++ {
		for j := -1; j < ny; j++ {
			// Corners counter-clockwise from bottom left, and the edge that
			// follows each corner counter-clockwise round the cell.
			corner := [4]float64{z(i, j), z(i+1, j), z(i+1, j+1), z(i, j+1)}
			edge := [4]edgeKey{{false, i, j}, {true, i + 1, j}, {false, i, j + 1}, {true, i, j}}
			var in [4]bool
			count := 0
			for k, v := range corner {
				in[k] = v >= level
				if in[k] {
					count++
				}
			}
			if count == 0 || count == 4 {
				continue
			}
			// Crossings in counter-clockwise order: edge k lies between
			// corner k and corner k+1.
			var outs, ins []int // in->out and out->in crossings
			for k := 0; k < 4; k++ {
				a, b := in[k], in[(k+1)%4]
				switch {
				case a && !b:
					outs = append(outs, k)
				case !a && b:
					ins = append(ins, k)
				}
			}
			centreIn := (corner[0]+corner[1]+corner[2]+corner[3])/4 >= level
			for _, o := range outs {
				// The curve leaves the cell's inside at edge o and re-enters
				// the boundary at the next out->in crossing
				// counter-clockwise (inside connected through the centre) or
				// the previous one (inside corners separate).
				var to int
				best := 5
				for _, k := range ins {
					d := (k - o + 4) % 4
					if !centreIn && len(ins) > 1 {
						d = (o - k + 4) % 4
					}
					if d < best {
						best, to = d, k
					}
				}
				from := edge[o]
				next[from] = edge[to]
				starts = append(starts, from)
			}
		}
	}
	var curves [][]xy
	used := map[edgeKey]bool{}
	for _, s := range starts {
		if used[s] {
			continue
		}
		var c []xy
		for e := s; !used[e]; e = next[e] {
			used[e] = true
			c = append(c, point(e))
		}
		curves = append(curves, c)
	}
	return curves
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
