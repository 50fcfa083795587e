package root

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"encoding/xml"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/figures"
)

func TestTablePlotAndArchiveContents(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	tex := h.mustRun("table", r.Run, "--format", "latex", "--digits", "3")
	// The wide layout: a header row of set names, one of column headers,
	// a row per prediction (booktabs rules, no \hline).
	if !strings.HasPrefix(tex, "\\begin{tabular}") || !strings.Contains(tex, "\\end{tabular}") || strings.Count(tex, "\\\\") != 2+3 || strings.Contains(tex, `\hline`) {
		t.Errorf("LaTeX table:\n%s", tex)
	}
	csv := h.mustRun("table", r.Run, "--format", "csv", "--columns", "model,param.alpha,n_s", "--exact")
	if lines := strings.Split(strings.TrimSpace(csv), "\r\n"); len(lines) != 4 || !strings.HasPrefix(lines[0], "model,") {
		t.Errorf("CSV table:\n%q", csv)
	}
	if _, _, code := h.run("table", r.Run, "--columns", "nonsense"); code == 0 {
		t.Error("an unknown column was accepted")
	}
	dir := filepath.Join(h.dir, "figs")
	h.mustRun("plot", r.Run, "--out", dir, "--forecast", "litebird")
	if pdf, err := os.ReadFile(filepath.Join(dir, "ns-r.pdf")); err != nil || !bytes.HasPrefix(pdf, []byte("%PDF-")) {
		t.Errorf("plot without --format: no PDF (%v)", err)
	}
	h.mustRun("plot", r.Run, "--out", dir, "--forecast", "litebird", "--format", "png")
	data, err := os.ReadFile(filepath.Join(dir, "ns-r.png"))
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	// figures.Width at figures.DPI (6 inches at 150 dpi), and
	// figures.Height (4.5 inches) plus the key below the data.
	if b := img.Bounds(); b.Dx() != 900 || b.Dy() <= 675 {
		t.Errorf("PNG %dx%d, want 900 wide and more than 675 tall", b.Dx(), b.Dy())
	}
	if _, err := os.Stat(filepath.Join(dir, "r-alpha.png")); err != nil {
		t.Errorf("no r against alpha figure for a scan over alpha: %v", err)
	}
	svgDir := filepath.Join(h.dir, "svg")
	h.mustRun("plot", r.Run, "--out", svgDir, "--format", "svg", "--r-scale", "linear")
	svg, _ := os.ReadFile(filepath.Join(svgDir, "ns-r.svg"))
	dec := xml.NewDecoder(bytes.NewReader(svg))
	for {
		if _, err := dec.Token(); err == io.EOF {
			break
		} else if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
	}
	_ = figures.DPI
	// The archive holds the configuration, the results as CSV, JSON and
	// LaTeX, the figures, the run's ledger and the manifest.
	arc := filepath.Join(h.dir, "rel.tgz")
	h.mustRun("export", r.Run, "--out", arc)
	f, _ := os.Open(arc)
	defer f.Close()
	gz, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	tr := tar.NewReader(gz)
	var names []string
	for {
		hdr, err := tr.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		names = append(names, hdr.Name)
	}
	sort.Strings(names)
	// Every figure in every format (PDF for the paper), besides the
	// configuration, ledger, manifest and tables.
	for _, want := range []string{"config.toml", "ledger.db", "manifest.json", "results.csv", "results.tex",
		"figures/ns-r.pdf", "figures/ns-r.svg", "figures/ns-r.png", "figures/r-alpha.pdf", "figures/r-alpha.svg", "figures/r-alpha.png"} {
		if !slices.Contains(names, want) {
			t.Errorf("archive holds %v, without %s", names, want)
		}
	}
}
