package figures

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure size and raster resolution: 6 x 4.5 inches above the key (which
// adds its own height), 150 dots per inch, so a figure without a key is
// 900 x 675 pixels as PNG and 432 x 324 points as SVG or PDF.
const (
	Width  = 6 * vg.Inch
	Height = 4.5 * vg.Inch
	DPI    = 150
)

// Formats are the output formats, by file extension; PDF, the format
// journals take, is the default.
var Formats = []string{"pdf", "svg", "png"}

// DefaultFormat is the format of a figure written without one.
const DefaultFormat = "pdf"

// Options adjust the output.
type Options struct {
	// PlainSVGFonts writes an SVG that names its fonts (Liberation) instead
	// of embedding them (about 0.5 MB): smaller, but a viewer lacking the
	// fonts substitutes others, whose widths differ. PDF always embeds
	// its fonts; PNG has none.
	PlainSVGFonts bool
}

func init() {
	// A PDF carries no time stamp (its dates are fixed at the Unix epoch)
	// and writes its catalogue in sorted order, so that the same figure
	// gives the same bytes.
	fpdf.SetDefaultCreationDate(time.Unix(0, 0).UTC())
	fpdf.SetDefaultModificationDate(time.Unix(0, 0).UTC())
	fpdf.SetDefaultCatalogSort(true)
}

// WriteTo renders p at the fixed size in format "pdf", "svg" or "png" to
// w. The output is a function of the plot and the options alone: no time
// stamps or random identifiers are written, so the same plot gives the
// same bytes with the same versions of Go and gonum/plot (TestDeterministic;
// every format is rendered by pure Go code with compiled-in fonts, which
// PDF and SVG embed).
func WriteTo(f *Figure, w io.Writer, format string, o Options) error {
	var c vg.CanvasWriterTo
	width, height := f.Size()
	switch format {
	case "pdf":
		pc := vgpdf.New(width, height)
		pc.EmbedFonts(true)
		c = pc
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(DPI))}
	case "svg":
		c = vgsvg.NewWith(vgsvg.UseWH(width, height), vgsvg.EmbedFonts(!o.PlainSVGFonts))
	default:
		return fmt.Errorf("figures: unknown format %q (want %s)", format, strings.Join(Formats, ", "))
	}
	f.Draw(draw.New(c))
	_, err := c.WriteTo(w)
	return err
}

// Save writes p to path as PDF, SVG or PNG according to its extension
// (.pdf, .svg or .png, any case), with default Options. See SaveWith.
func Save(f *Figure, path string) error { return SaveWith(f, path, Options{}) }

// SaveWith writes p to path in the format its extension names. The
// file is written to a temporary name beside path and renamed into place,
// so a failed render leaves no partial file.
func SaveWith(f *Figure, path string, o Options) error {
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
	var buf bytes.Buffer
	if err := WriteTo(f, &buf, format, o); err != nil {
		return fmt.Errorf("figures: %s: %w", path, err)
	}
	file, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	tmp := file.Name()
	_, err = file.Write(buf.Bytes())
	if cerr := file.Close(); err == nil {
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
