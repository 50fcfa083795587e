package root

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/figures"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/reportcmd"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/stages/study"
)

// built draws the figures of a recorded run as plot would.
func built(t *testing.T, h *harness, ref string, o reportcmd.FigureOptions) []reportcmd.Built {
	t.Helper()
	l, err := ledger.Open(h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	ctx := context.Background()
	run, results, err := app.LoadRun(ctx, l, ref)
	if err != nil {
		t.Fatal(err)
	}
	bs, err := reportcmd.BuildFigures(ctx, l, run, results, o)
	if err != nil {
		t.Fatal(err)
	}
	return bs
}

func keyCount(f *figures.Figure, kind figures.SwatchKind) int {
	n := 0
	for _, e := range f.Key {
		if e.Swatch.Kind == kind {
			n++
		}
	}
	return n
}

// The demo's figures identify all 16 models (7 E-model and 7 T-model
// alphas, Starobinsky, phi^2), explain the four reheating markers (N* =
// 50, 55, 60, instantaneous), and no two of their labels overlap, nor
// does the key cover the data. A 30-model study does the same.
func TestFiguresIdentifyEveryModel(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", demoPath(t))
	for _, b := range built(t, h, "latest", reportcmd.FigureOptions{}) {
		for _, o := range b.Figure.Overlaps() {
			t.Errorf("demo %s: %s", b.Name, o)
		}
		if b.Name == "ns-r" {
			if n := keyCount(b.Figure, figures.SwatchLine); n != 16 {
				t.Errorf("demo n_s-r key names %d models, want 16", n)
			}
			if n := keyCount(b.Figure, figures.SwatchMarker); n != 4 {
				t.Errorf("demo n_s-r key explains %d markers, want 4", n)
			}
		}
	}
	var alphas []string
	for i := 1; i <= 15; i++ {
		alphas = append(alphas, fmt.Sprint(0.2*float64(i)))
	}
	list := "[" + strings.Join(alphas, ", ") + "]"
	study := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = [50, 60]\n\n[[constraint]]\nuse = \"cmb-combined-2025\"\n\n" +
		"[[model]]\nfamily = \"e-model\"\nalpha = " + list + "\n\n[[model]]\nfamily = \"t-model\"\nalpha = " + list + "\n"
	h.mustRun("run", h.write("thirty.toml", study))
	bs := built(t, h, "latest", reportcmd.FigureOptions{})
	if len(bs) != 2 {
		t.Fatalf("%d figures, want n_s-r and r-alpha", len(bs))
	}
	for _, b := range bs {
		for _, o := range b.Figure.Overlaps() {
			t.Errorf("30 models %s: %s", b.Name, o)
		}
	}
	if n := keyCount(bs[0].Figure, figures.SwatchLine); n != 30 {
		t.Errorf("30-model key names %d models", n)
	}
	// The filter draws a subset: one family.
	sub := built(t, h, "latest", reportcmd.FigureOptions{Models: []string{"T-model"}})
	if n := keyCount(sub[0].Figure, figures.SwatchLine); n != 15 {
		t.Errorf("--model T-model: %d models drawn, want 15", n)
	}
}

// A sample-based constraint is drawn (two key entries, 68% and 95%),
// and the run's forecast appears on both figures as its 3 sigma level;
// axis ranges follow the data down to the smallest r, however small.
func TestFiguresDrawSamplesForecastsAndSmallR(t *testing.T) {
	h := newHarness(t)
	rng := rand.New(rand.NewPCG(3, 5))
	var b strings.Builder
	for i := 0; i < 2000; i++ {
		fmt.Fprintf(&b, "%.6f %.6f\n", 0.965+0.004*rng.NormFloat64(), math.Abs(0.02*rng.NormFloat64()))
	}
	h.write("chain.txt", b.String())
	h.write("chain-set.toml", "name = \"orrery-chain\"\ncitation = \"samples drawn in this test\"\n\n[samples]\nfile = \"chain.txt\"\n")
	study := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = [55, 60]\n\n[[constraint]]\nfile = \"chain-set.toml\"\n\n[[forecast]]\nuse = \"litebird\"\n\n" +
		"[[model]]\nfamily = \"e-model\"\nalpha = {log = [1e-5, 10], points = 13}\n"
	h.mustRun("run", h.write("s.toml", study))
	bs := built(t, h, "latest", reportcmd.FigureOptions{})
	ns := bs[0].Figure
	if n := keyCount(ns, figures.SwatchFilled) + keyCount(ns, figures.SwatchOutline); n != 2 {
		t.Errorf("sample-based set: %d region entries, want 68%% and 95%%", n)
	}
	for _, x := range bs {
		if keyCount(x.Figure, figures.SwatchForecast) != 1 {
			t.Errorf("%s: the run's forecast is not drawn", x.Name)
		}
		if x.Figure.Clipped != 0 {
			t.Errorf("%s: %d points clipped with ranges following the data", x.Name, x.Figure.Clipped)
		}
		for _, o := range x.Figure.Overlaps() {
			t.Errorf("%s: %s", x.Name, o)
		}
	}
	// r = 12 alpha / N^2 is 3.3e-8 at alpha = 1e-5, N* = 60 (Kallosh &
	// Linde 2013, arXiv:1306.5220): the r axis reaches below it, and
	// follows it rather than a fixed cut (a factor 1.5 below).
	if lo := ns.Plot.Y.Min; !(lo < 3.3e-8 && lo > 1e-8) {
		t.Errorf("log r axis starts at %g; the smallest prediction is about 3.3e-8", lo)
	}
	// A log-spaced scan gets a log alpha axis.
	if _, ok := bs[1].Figure.Plot.X.Scale.(interface {
		Normalize(float64, float64, float64) float64
	}); !ok || bs[1].Figure.Plot.X.Min <= 0 {
		t.Errorf("r-alpha x axis %T from %g", bs[1].Figure.Plot.X.Scale, bs[1].Figure.Plot.X.Min)
	}
	// A fixed range that leaves points out says so.
	_, errs, code := h.run("plot", "latest", "--out", h.dir+"/figs", "--r-range", "1e-3,0.1")
	if code != 0 || !strings.Contains(errs, "outside the fixed axis ranges") {
		t.Errorf("plot --r-range 1e-3,0.1: exit %d, %q; want a note on the points left out", code, errs)
	}
	if _, errs, code := h.run("plot", "latest", "--out", h.dir+"/figs", "--r-range", "0.1"); code != 2 || !strings.Contains(errs, "--r-range") {
		t.Errorf("bad --r-range: exit %d, %q", code, errs)
	}
}

// Results assembled from the decoded fields study.AssemblyNeeds names are
// the results assembled from every field (a property that fails as soon
// as Assemble reads something AssemblyNeeds leaves out).
func TestAssemblyNeedsSuffice(t *testing.T) {
	h := newHarness(t)
	h.mustRun("run", demoPath(t))
	l, err := ledger.Open(h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	ctx := context.Background()
	id, err := l.ResolveRun(ctx, "latest")
	if err != nil {
		t.Fatal(err)
	}
	assemble := func(need func(string) (bool, bool)) []study.Result {
		ls, err := l.RunLineages(ctx, id, need)
		if err != nil {
			t.Fatal(err)
		}
		var out []study.Result
		for _, rl := range ls {
			var so []study.StageOutputs
			for _, n := range rl.Nodes {
				so = append(so, study.StageOutputs{Stage: n.Stage, Outputs: n.Outputs, Params: n.Params})
			}
			out = append(out, study.Assemble(rl.Ref.Label, rl.Ref.Key, so))
		}
		return out
	}
	all, some := assemble(nil), assemble(study.AssemblyNeeds)
	if len(all) != 64 || !reflect.DeepEqual(all, some) {
		t.Errorf("%d results; assembled from the needed fields only, they differ", len(all))
	}
}
