package figures

// box is an axis-aligned rectangle in data coordinates.
type box struct{ x0, x1, y0, y1 float64 }

// halfPlane is one side of a box: coordinate 0 (x) or 1 (y) compared with
// v, keeping values >= v (lower) or <= v (upper).
type halfPlane struct {
	axis  int
	v     float64
	lower bool
}

func (b box) planes() [4]halfPlane {
	return [4]halfPlane{{0, b.x0, true}, {0, b.x1, false}, {1, b.y0, true}, {1, b.y1, false}}
}

func (h halfPlane) coord(p xy) float64 {
	if h.axis == 0 {
		return p.X
	}
	return p.Y
}

func (h halfPlane) in(p xy) bool {
	if h.lower {
		return h.coord(p) >= h.v
	}
	return h.coord(p) <= h.v
}

// cross is where segment p-q meets the plane's line (p and q on opposite
// sides), with the crossing coordinate set exactly.
func (h halfPlane) cross(p, q xy) xy {
	t := (h.v - h.coord(p)) / (h.coord(q) - h.coord(p))
	c := xy{p.X + t*(q.X-p.X), p.Y + t*(q.Y-p.Y)}
	if h.axis == 0 {
		c.X = h.v
	} else {
		c.Y = h.v
	}
	return c
}

// clipPolygon clips a closed polygon to b by the Sutherland-Hodgman
// algorithm (Sutherland & Hodgman 1974, Communications of the ACM 17, 32),
// which keeps the orientation of the ring.
func clipPolygon(ring []xy, b box) []xy {
	out := ring
	for _, h := range b.planes() {
		if len(out) == 0 {
			return nil
		}
		in := out
		out = nil
		prev := in[len(in)-1]
		for _, p := range in {
			switch {
			case h.in(p) && h.in(prev):
				out = append(out, p)
			case h.in(p):
				out = append(out, h.cross(prev, p), p)
			case h.in(prev):
				out = append(out, h.cross(prev, p))
			}
			prev = p
		}
	}
	return out
}

// clipPolyline clips an open polyline to b, returning its pieces inside.
func clipPolyline(line []xy, b box) [][]xy {
	pieces := [][]xy{line}
	for _, h := range b.planes() {
		var next [][]xy
		for _, l := range pieces {
			var cur []xy
			for k, p := range l {
				if k == 0 {
					if h.in(p) {
						cur = append(cur, p)
					}
					continue
				}
				prev := l[k-1]
				switch {
				case h.in(p) && h.in(prev):
					cur = append(cur, p)
				case h.in(p):
					cur = append(cur, h.cross(prev, p), p)
				case h.in(prev):
					cur = append(cur, h.cross(prev, p))
					next = append(next, cur)
					cur = nil
				}
			}
			if len(cur) > 0 {
				next = append(next, cur)
			}
		}
		pieces = next
	}
	var out [][]xy
	for _, l := range pieces {
		if len(l) >= 2 {
			out = append(out, l)
		}
	}
	return out
}

func (b box) contains(p xy) bool {
	return p.X >= b.x0 && p.X <= b.x1 && p.Y >= b.y0 && p.Y <= b.y1
}
