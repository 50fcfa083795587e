package figures

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure size and raster resolution: 6 x 4.5 inches, 150 dots per inch,
// so a PNG is 900 x 675 pixels and an SVG 432 x 324 points.
const (
	Width  = 6 * vg.Inch
	Height = 4.5 * vg.Inch
	DPI    = 150
)

// Formats are the output formats, by file extension.
var Formats = []string{"png", "svg"}

// Options adjust the output.
type Options struct {
	// EmbedFonts embeds the fonts (Liberation, about 0.5 MB) in an SVG so
	// that it renders the same everywhere. Without it the SVG names the
	// font and viewers lacking it substitute another serif. PNG ignores it.
	EmbedFonts bool
}

// WriteTo renders p at the fixed size in format "png" or "svg" to w.
// The output is a function of the plot and the options alone: no time
// stamps or random identifiers are written, so the same plot gives the
// same bytes with the same versions of Go and gonum/plot (TestDeterministic;
// both formats are rendered by pure Go code with compiled-in fonts).
func WriteTo(p *plot.Plot, w io.Writer, format string, o Options) error {
	var c vg.CanvasWriterTo
	switch format {
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(Width, Height), vgimg.UseDPI(DPI))}
	case "svg":
		c = vgsvg.NewWith(vgsvg.UseWH(Width, Height), vgsvg.EmbedFonts(o.EmbedFonts))
	default:
		return fmt.Errorf("figures: unknown format %q (want %s)", format, strings.Join(Formats, " or "))
	}
	p.Draw(draw.New(c))
	_, err := c.WriteTo(w)
	return err
}

// Save writes p to path as PNG or SVG according to its extension (.png or
// .svg, any case), with default Options. See SaveWith.
func Save(p *plot.Plot, path string) error { return SaveWith(p, path, Options{}) }

// SaveWith writes p to path as PNG or SVG according to its extension. The
// file is written to a temporary name beside path and renamed into place,
// so a failed render leaves no partial file.
func SaveWith(p *plot.Plot, path string, o Options) error {
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
	var buf bytes.Buffer
	if err := WriteTo(p, &buf, format, o); err != nil {
		return fmt.Errorf("figures: %s: %w", path, err)
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, err = f.Write(buf.Bytes())
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp, 0o644)
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return err
	}
	return nil
}
