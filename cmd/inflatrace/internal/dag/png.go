package dag

import (
	"bufio"
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Layout is a graph laid out by Graphviz, read from its "plain" output:
// sizes and coordinates in inches, y upwards.
type Layout struct {
	Width, Height float64
	Nodes         []LaidNode
	Edges         []LaidEdge
}

// LaidNode is a positioned node.
type LaidNode struct {
	Name, Label, Fill, Stroke string
	X, Y, W, H                float64
}

// LaidEdge is an edge as the control points of a cubic B-spline.
type LaidEdge struct {
	Tail, Head string
	Points     [][2]float64
	Stroke     string
}

// ParsePlain reads Graphviz's plain output format.
func ParsePlain(data []byte) (*Layout, error) {
	l := &Layout{}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 1<<20), 1<<24)
	line := 0
	for sc.Scan() {
		line++
		f, err := fields(sc.Text())
		if err != nil {
			return nil, fmt.Errorf("plain layout line %d: %w", line, err)
		}
		if len(f) == 0 {
			continue
		}
		num := func(i int) float64 {
			if i >= len(f) {
				err = fmt.Errorf("missing field %d", i)
				return 0
			}
			x, e := strconv.ParseFloat(f[i], 64)
			if e != nil && err == nil {
				err = e
			}
			return x
		}
		switch f[0] {
		case "graph":
			l.Width, l.Height = num(2), num(3)
		case "node":
			if len(f) < 11 {
				return nil, fmt.Errorf("plain layout line %d: short node line", line)
			}
			l.Nodes = append(l.Nodes, LaidNode{Name: f[1], X: num(2), Y: num(3), W: num(4), H: num(5), Label: f[6], Stroke: f[9], Fill: f[10]})
		case "edge":
			n := int(num(3))
			e := LaidEdge{Tail: f[1], Head: f[2]}
			for i := 0; i < n; i++ {
				e.Points = append(e.Points, [2]float64{num(4 + 2*i), num(5 + 2*i)})
			}
			if len(f) > 4+2*n+1 {
				e.Stroke = f[len(f)-1]
			}
			l.Edges = append(l.Edges, e)
		case "stop":
			return l, err
		}
		if err != nil {
			return nil, fmt.Errorf("plain layout line %d: %w", line, err)
		}
	}
	return l, sc.Err()
}

// fields splits a plain-format line, honouring double quotes and the
// escape \n inside them.
func fields(s string) ([]string, error) {
	var out []string
	for i := 0; i < len(s); {
		switch {
		case s[i] == ' ':
			i++
		case s[i] == '"':
			var b strings.Builder
			j := i + 1
			for ; j < len(s) && s[j] != '"'; j++ {
				if s[j] == '\\' && j+1 < len(s) {
					j++
					if s[j] == 'n' {
						b.WriteByte('\n')
						continue
					}
				}
				b.WriteByte(s[j])
			}
			if j >= len(s) {
				return nil, fmt.Errorf("unterminated quote")
			}
			out = append(out, b.String())
			i = j + 1
		default:
			j := strings.IndexByte(s[i:], ' ')
			if j < 0 {
				j = len(s) - i
			}
			out = append(out, s[i:i+j])
			i += j
		}
	}
	return out, nil
}

func parseColor(s string) color.Color {
	if strings.HasPrefix(s, "#") && len(s) == 7 {
		v, err := strconv.ParseUint(s[1:], 16, 32)
		if err == nil {
			return color.RGBA{uint8(v >> 16), uint8(v >> 8), uint8(v), 255}
		}
	}
	switch s {
	case "white":
		return color.White
	case "lightgrey":
		return color.RGBA{211, 211, 211, 255}
	}
	return color.Black
}

// DPI is the resolution of PNG graphs.
const DPI = 96

// PNG draws a plain layout as a PNG image with gonum/plot's raster canvas
// (Graphviz's own PNG output is not used: in the WebAssembly build it drops
// outlines and edges).
func PNG(plain []byte, w io.Writer) error {
	l, err := ParsePlain(plain)
	if err != nil {
		return err
	}
	const margin = 0.2 // inches
	width, height := vg.Length(l.Width+2*margin)*vg.Inch, vg.Length(l.Height+2*margin)*vg.Inch
	img := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(DPI))
	c := draw.New(img)
	c.FillPolygon(color.White, []vg.Point{{X: 0, Y: 0}, {X: width, Y: 0}, {X: width, Y: height}, {X: 0, Y: height}})
	at := func(x, y float64) vg.Point {
		return vg.Point{X: vg.Length(x+margin) * vg.Inch, Y: vg.Length(y+margin) * vg.Inch}
	}
	fnt := font.From(plot.DefaultFont, 8)
	style := draw.TextStyle{Color: color.Black, Font: fnt, XAlign: draw.XCenter, YAlign: draw.YCenter, Handler: text.Plain{Fonts: font.DefaultCache}}
	for _, e := range l.Edges {
		pts := bspline(e.Points, at)
		ls := draw.LineStyle{Color: parseColor(e.Stroke), Width: vg.Points(1)}
		c.StrokeLines(ls, pts)
		if n := len(pts); n >= 2 {
			c.FillPolygon(ls.Color, arrow(pts[n-2], pts[n-1]))
		}
	}
	for _, n := range l.Nodes {
		x0, y0 := at(n.X-n.W/2, n.Y-n.H/2), at(n.X+n.W/2, n.Y+n.H/2)
		box := []vg.Point{x0, {X: y0.X, Y: x0.Y}, y0, {X: x0.X, Y: y0.Y}}
		c.FillPolygon(parseColor(n.Fill), box)
		c.StrokeLines(draw.LineStyle{Color: parseColor(n.Stroke), Width: vg.Points(1)}, append(box, box[0]))
		lines := strings.Split(n.Label, "\n")
		for i, ln := range lines {
			off := (float64(len(lines)-1)/2 - float64(i)) * 0.14
			c.FillText(style, at(n.X, n.Y+off), ln)
		}
	}
	_, err = vgimg.PngCanvas{Canvas: img}.WriteTo(w)
	return err
}

// bspline evaluates Graphviz's piecewise cubic Bézier control points
// (1 + 3k points) into a polyline.
func bspline(p [][2]float64, at func(x, y float64) vg.Point) []vg.Point {
	var out []vg.Point
	for i := 0; i+3 < len(p); i += 3 {
		for s := 0; s <= 12; s++ {
			t := float64(s) / 12
			u := 1 - t
			x := u*u*u*p[i][0] + 3*u*u*t*p[i+1][0] + 3*u*t*t*p[i+2][0] + t*t*t*p[i+3][0]
			y := u*u*u*p[i][1] + 3*u*u*t*p[i+1][1] + 3*u*t*t*p[i+2][1] + t*t*t*p[i+3][1]
			out = append(out, at(x, y))
		}
	}
	return out
}

// arrow is a small triangle pointing from a to b, with its tip beyond b
// (Graphviz ends edge splines short of the head node, at the arrow's base).
func arrow(a, b vg.Point) []vg.Point {
	dx, dy := float64(b.X-a.X), float64(b.Y-a.Y)
	n := math.Hypot(dx, dy)
	if n == 0 {
		return nil
	}
	dx, dy = dx/n, dy/n
	const length, half = 7.0, 3.0 // points
	tip := vg.Point{X: b.X + vg.Length(dx*length), Y: b.Y + vg.Length(dy*length)}
	return []vg.Point{tip, {X: b.X + vg.Length(-dy*half), Y: b.Y + vg.Length(dx*half)}, {X: b.X - vg.Length(-dy*half), Y: b.Y - vg.Length(dx*half)}}
}
