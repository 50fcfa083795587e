package figures

import (
	"bytes"
	"encoding/xml"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/inflatrace/inflatrace/stages/compare"
)

var (
	magenta = color.NRGBA{255, 0, 255, 255}
	cyan    = color.NRGBA{0, 255, 255, 255}
)

// upperLimit is a Gaussian constraint shaped like an upper limit on r
// (n_s = 0.9649 ± 0.0042 and r < 0.036 at 95%, numbers as in the compare
// package's example; the combination is illustrative).
var upperLimit = compare.Gaussian{Name: "limit", MeanNs: 0.9649, SigmaNs: 0.0042, MeanR: 0, SigmaR: 0.036 / compare.HalfNormal95}

// render draws f as PNG and decodes it.
func render(t *testing.T, f *Figure) image.Image {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteTo(f, &buf, "png", Options{}); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&buf)
	if err != nil {
		t.Fatal(err)
	}
	return img
}

// centroid returns the mean pixel centre of the pixels of exactly colour
// c, and their number.
func centroid(img image.Image, c color.NRGBA) (x, y float64, n int) {
	b := img.Bounds()
	for j := b.Min.Y; j < b.Max.Y; j++ {
		for i := b.Min.X; i < b.Max.X; i++ {
			if color.NRGBAModel.Convert(img.At(i, j)).(color.NRGBA) == c {
				x += float64(i) + 0.5
				y += float64(j) + 0.5
				n++
			}
		}
	}
	if n > 0 {
		x /= float64(n)
		y /= float64(n)
	}
	return x, y, n
}

// expectedPixel maps data (x, y) to image pixels independently of the
// plot's own transform: the data area is the rectangle gonum's
// DataCanvas reports for the figure's size (its key below), and a position in it is
// the linear or logarithmic fraction of the axis range (the definition of
// linear and log axes); image rows count down from the top.
func expectedPixel(f *Figure, x, y float64, xlog, ylog bool) (float64, float64) {
	w, h := f.Size()
	c := draw.New(vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(DPI)))
	da := f.dataArea(c)
	p := f.Plot
	frac := func(v, lo, hi float64, log bool) float64 {
		if log {
			return (math.Log(v) - math.Log(lo)) / (math.Log(hi) - math.Log(lo))
		}
		return (v - lo) / (hi - lo)
	}
	dots := func(l float64) float64 { return l / 72 * DPI }
	px := dots(float64(da.Min.X)) + frac(x, p.X.Min, p.X.Max, xlog)*dots(float64(da.Max.X-da.Min.X))
	py := dots(float64(da.Min.Y)) + frac(y, p.Y.Min, p.Y.Max, ylog)*dots(float64(da.Max.Y-da.Min.Y))
	return px, dots(float64(h)) - py
}

// TestNsRPixels: the PNG is 900 pixels wide and 675 tall above its key
// (6 x 4.5 in at 150 dpi),
// and glyphs drawn in colours used nowhere else land where the data
// coordinates say, within 0.75 pixel, for linear and logarithmic r axes
// (the centroid of a glyph's fully covered pixels is its centre up to the
// pixel grid: partly covered edge pixels are left out, which shifts it
// by up to half a pixel).
func TestNsRPixels(t *testing.T) {
	for _, c := range []struct {
		name  string
		scale Scale
		a, b  compare.Point
	}{
		{"linear", Linear, compare.Point{Ns: 0.960, R: 0.02}, compare.Point{Ns: 0.970, R: 0.005}},
		{"log", Log, compare.Point{Ns: 0.960, R: 3e-3}, compare.Point{Ns: 0.970, R: 2e-4}},
	} {
		p, err := NsR(NsRSpec{
			Title:       "pixel test",
			RScale:      c.scale,
			Constraints: []ConstraintLayer{{Set: upperLimit}},
			Curves: []Curve{
				{Points: []compare.Point{c.a}, Color: magenta},
				{Points: []compare.Point{c.b}, Color: cyan, Marker: MarkerSquare},
			},
		})
		if err != nil {
			t.Fatal(err)
		}
		img := render(t, p)
		_, h := p.Size()
		if b := img.Bounds(); b.Dx() != 900 || b.Dy() != int(math.Round(float64(h)/72*DPI)) || b.Dy() <= 675 {
			t.Fatalf("%s: image %dx%d, want 900 wide and 675 plus the key tall", c.name, b.Dx(), b.Dy())
		}
		for _, g := range []struct {
			col color.NRGBA
			at  compare.Point
		}{{magenta, c.a}, {cyan, c.b}} {
			x, y, n := centroid(img, g.col)
			if n < 20 {
				t.Fatalf("%s: %d pixels of %v, want a glyph", c.name, n, g.col)
			}
			wx, wy := expectedPixel(p, g.at.Ns, g.at.R, false, c.scale == Log)
			if math.Abs(x-wx) > 0.75 || math.Abs(y-wy) > 0.75 {
				t.Errorf("%s: glyph at (%g, %g) drawn at pixel (%.2f, %.2f), want (%.2f, %.2f)", c.name, g.at.Ns, g.at.R, x, y, wx, wy)
			}
		}
	}
}

// TestRAlphaPixels: a forecast line at r = 3 sigma(r) = 3e-3 on the log r
// axis occupies the image row the data coordinate gives (within one
// pixel: a 1 pt line is about two pixels tall), and a point on a log x
// axis lands at its pixel (within 0.75 pixel, as in TestNsRPixels).
func TestRAlphaPixels(t *testing.T) {
	f := compare.Forecast{Name: "planned", Citation: "invented for the test", SigmaR: 1e-3}
	p, err := RAlpha(RAlphaSpec{
		XScale:    Log,
		Curves:    []XYCurve{{X: []float64{3}, R: []float64{0.01}, Color: magenta}},
		Forecasts: []ForecastLine{{Forecast: f, K: 3, Color: cyan}},
	})
	if err != nil {
		t.Fatal(err)
	}
	img := render(t, p)
	x, y, n := centroid(img, magenta)
	wx, wy := expectedPixel(p, 3, 0.01, true, true)
	if n == 0 || math.Abs(x-wx) > 0.75 || math.Abs(y-wy) > 0.75 {
		t.Errorf("point drawn at (%.2f, %.2f) [%d px], want (%.2f, %.2f)", x, y, n, wx, wy)
	}
	// The key's swatch is cyan too; take the line's rows only: those with
	// at least half the cyan pixels of the fullest row, which must hold
	// more than a swatch can (the line is dotted: a pixel is exactly cyan
	// only where a dot covers it fully).
	b := img.Bounds()
	counts := make([]int, b.Dy())
	most := 0
	for j := b.Min.Y; j < b.Max.Y; j++ {
		for i := b.Min.X; i < b.Max.X; i++ {
			if color.NRGBAModel.Convert(img.At(i, j)).(color.NRGBA) == cyan {
				counts[j-b.Min.Y]++
			}
		}
		most = max(most, counts[j-b.Min.Y])
	}
	var rows []int
	for j, k := range counts {
		if k > 60 && 2*k >= most {
			rows = append(rows, j+b.Min.Y)
		}
	}
	_, wy = expectedPixel(p, 3, 3e-3, true, true)
	if len(rows) == 0 {
		t.Fatal("no forecast line found")
	}
	mid := float64(rows[0]+rows[len(rows)-1])/2 + 0.5
	if math.Abs(mid-wy) > 1 {
		t.Errorf("forecast line at row %.1f, want %.1f", mid, wy)
	}
}

// TestSVG: the SVG is well-formed XML with an <svg> root 432 points wide
// and 324 plus the key tall, and the title (with XML special characters)
// appears as text.
func TestSVG(t *testing.T) {
	title := "n_s & r <test>"
	p, err := NsR(NsRSpec{Title: title, Constraints: []ConstraintLayer{{Set: upperLimit}}})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteTo(p, &buf, "svg", Options{}); err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(&buf)
	var root *xml.StartElement
	found := false
	inText := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v", err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			if root == nil {
				e := v.Copy()
				root = &e
			}
			inText = v.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText && strings.TrimSpace(string(v)) == title {
				found = true
			}
		}
	}
	if root == nil || root.Name.Local != "svg" {
		t.Fatalf("root element %v, want svg", root)
	}
	attr := map[string]string{}
	for _, a := range root.Attr {
		attr[a.Name.Local] = a.Value
	}
	_, h := p.Size()
	if want := strconv.FormatFloat(float64(h), 'g', -1, 64) + "pt"; attr["width"] != "432pt" || attr["height"] != want {
		t.Errorf("svg size %s x %s, want 432pt x %s", attr["width"], attr["height"], want)
	}
	if !found {
		t.Errorf("title %q not found as SVG text", title)
	}
}

// TestDeterministic: two plots built from the same spec give the same
// PNG and SVG bytes.
func TestDeterministic(t *testing.T) {
	spec := NsRSpec{
		Title:       "determinism",
		RScale:      Log,
		Constraints: []ConstraintLayer{{Set: upperLimit}},
		Curves:      []Curve{{Label: "m", Points: []compare.Point{{Ns: 0.96, R: 0.01}, {Ns: 0.965, R: 0.005}}, Join: true, Markers: []Marker{MarkerCircle, MarkerSquare}}},
	}
	for _, format := range Formats {
		var out [2][]byte
		for k := range out {
			p, err := NsR(spec)
			if err != nil {
				t.Fatal(err)
			}
			var buf bytes.Buffer
			if err := WriteTo(p, &buf, format, Options{}); err != nil {
				t.Fatal(err)
			}
			out[k] = buf.Bytes()
		}
		if !bytes.Equal(out[0], out[1]) {
			t.Errorf("%s: two renders differ", format)
		}
	}
}

// TestSave: the extension picks the format (any case); an unknown one is
// refused and leaves no file; PDF and SVG embed their fonts by default
// (a plain SVG is smaller), so their text renders the same everywhere.
func TestSave(t *testing.T) {
	p, err := NsR(NsRSpec{Title: "save", Constraints: []ConstraintLayer{{Set: upperLimit}}})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, name := range []string{"a.png", "b.SVG", "c.pdf"} {
		path := filepath.Join(dir, name)
		if err := Save(p, path); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		switch {
		case strings.HasSuffix(name, "png") && !bytes.HasPrefix(data, []byte("\x89PNG\r\n\x1a\n")):
			t.Errorf("%s is not a PNG", name)
		case strings.HasSuffix(name, "SVG") && (!bytes.HasPrefix(data, []byte("<?xml")) || !bytes.Contains(data, []byte("@font-face"))):
			t.Errorf("%s is not XML with embedded fonts", name)
		case strings.HasSuffix(name, "pdf") && (!bytes.HasPrefix(data, []byte("%PDF-")) || !bytes.Contains(data, []byte("/FontFile"))):
			t.Errorf("%s is not a PDF with embedded fonts", name)
		}
	}
	// Each font of the PDF has a font file of its own (gonum's PDF canvas
	// shares one between fonts, so a figure must use a single face).
	pdf, _ := os.ReadFile(filepath.Join(dir, "c.pdf"))
	files := map[string]bool{}
	for _, m := range regexp.MustCompile(`/FontFile2? (\d+) 0 R`).FindAllSubmatch(pdf, -1) {
		files[string(m[1])] = true
	}
	if descs := len(regexp.MustCompile(`/FontDescriptor \d+ 0 R`).FindAll(pdf, -1)); descs == 0 || len(files) != descs {
		t.Errorf("PDF: %d font descriptors sharing %d font files", descs, len(files))
	}
	if err := Save(p, filepath.Join(dir, "d.eps")); err == nil {
		t.Error("d.eps accepted")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 3 {
		t.Errorf("%d files left, want 3 (no temporary or refused files)", len(entries))
	}
	embedded, plain := filepath.Join(dir, "b.SVG"), filepath.Join(dir, "e.svg")
	if err := SaveWith(p, plain, Options{PlainSVGFonts: true}); err != nil {
		t.Fatal(err)
	}
	a, _ := os.Stat(plain)
	b, _ := os.Stat(embedded)
	if b.Size() <= a.Size() {
		t.Errorf("embedded-font SVG %d bytes, plain %d", b.Size(), a.Size())
	}
}
