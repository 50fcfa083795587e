package root

import (
	"bytes"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/dag"
)

// The graph has one node per stage execution of the run; DOT is written
// by inflatrace itself, SVG and PNG go through the separate renderer,
// built here from this module.
func TestGraph(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	nodes := r.Computed + r.Reused
	dot := h.mustRun("graph", r.Run)
	if got := strings.Count(dot, "fillcolor="); got != nodes {
		t.Fatalf("DOT has %d labelled nodes, the run %d", got, nodes)
	}
	if got := strings.Count(dot, " -> "); got != 4*3 {
		t.Fatalf("DOT has %d edges, want 12 (a chain of five stages per model, three models)", got)
	}
	if testing.Short() {
		t.Skip("building the renderer takes a while")
	}
	bin := filepath.Join(t.TempDir(), "inflatrace-graphviz")
	build := exec.Command("go", "build", "-o", bin, "../../../inflatrace-graphviz")
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("build renderer: %v\n%s", err, out)
	}
	t.Setenv("INFLATRACE_GRAPHVIZ", bin)
	svgPath := filepath.Join(h.dir, "g.svg")
	h.mustRun("graph", r.Run, "--format", "svg", "--out", svgPath, "--result", r.Run+"#1")
	svg, _ := os.ReadFile(svgPath)
	if got := len(regexp.MustCompile(`<g id="node\d+" class="node">`).FindAll(svg, -1)); got != nodes {
		t.Errorf("SVG has %d nodes, want %d", got, nodes)
	}
	pngPath := filepath.Join(h.dir, "g.png")
	h.mustRun("graph", r.Run, "--format", "png", "--out", pngPath)
	data, _ := os.ReadFile(pngPath)
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("PNG does not decode: %v", err)
	}
	// The layout's size in inches at dag.DPI, plus the 0.2 inch margins.
	lay := renderPlain(t, bin, dot)
	wantW := int((lay.Width + 0.4) * dag.DPI)
	if b := img.Bounds(); b.Dx() < wantW-2 || b.Dx() > wantW+2 {
		t.Errorf("PNG width %d px, want %d", b.Dx(), wantW)
	}
	if len(lay.Nodes) != nodes || len(lay.Edges) != 12 {
		t.Errorf("layout has %d nodes, %d edges", len(lay.Nodes), len(lay.Edges))
	}
}

func renderPlain(t *testing.T, bin, dot string) *dag.Layout {
	t.Helper()
	cmd := exec.Command(bin, "-T", "plain")
	cmd.Stdin = strings.NewReader(dot)
	out, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	l, err := dag.ParsePlain(out)
	if err != nil {
		t.Fatal(err)
	}
	return l
}
