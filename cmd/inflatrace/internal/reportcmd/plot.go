package reportcmd

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"github.com/pelletier/go-toml/v2"
	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/figures"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/study"
)

// PlotOptions are the parsed flags of plot.
type PlotOptions struct {
	Env       *app.Env
	Globals   *app.Globals
	Run       string
	Out       string
	Format    string
	RScale    string
	Along     string
	Forecasts []string
}

// NewPlotCmd returns the plot command.
func NewPlotCmd(env *app.Env, g *app.Globals) *cobra.Command {
	o := &PlotOptions{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "plot RUN --out DIR [--format pdf|svg|png] [--r-scale log|linear] [--along N_star|PARAM] [--forecast NAME]...",
		Short: "Draw a run's figures from the ledger: the n_s-r plane and r against a scanned parameter",
		Long: `plot draws, without recomputing: the n_s-r plane with the 68% and 95% regions of
the run's constraint sets, its predictions joined along N* (or along a scanned
parameter with --along) and its reheating bands as stripes (ns-r.png); and,
when a model parameter is scanned, r against it with the sensitivity lines of
the named forecasts (r-PARAM.png). Shipped forecasts: ` + strings.Join(study.ForecastNames(), ", ") + ".",
		Args: cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o.Run = args[0]
			if o.Out == "" {
				return app.Usage(fmt.Errorf("--out is required"))
			}
			return Plot(c.Context(), o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Out, "out", "", "folder to write the figures to")
	f.StringVar(&o.Format, "format", figures.DefaultFormat, strings.Join(figures.Formats, ", ")+" (fonts embedded in PDF and SVG)")
	f.StringVar(&o.RScale, "r-scale", "log", "log or linear r axis")
	f.StringVar(&o.Along, "along", figures.AlongNStar, "join predictions along N_star or along a model parameter")
	f.StringSliceVar(&o.Forecasts, "forecast", nil, "forecast sensitivities to draw on the r figure")
	return cmd
}

// Plot draws the figures.
func Plot(ctx context.Context, o *PlotOptions) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	run, results, err := app.LoadRun(ctx, l, o.Run)
	if err != nil {
		return err
	}
	var fcs []compare.Forecast
	for _, n := range o.Forecasts {
		f, err := study.ShippedForecast(n)
		if err != nil {
			return app.Usage(err)
		}
		fcs = append(fcs, f)
	}
	if err := os.MkdirAll(o.Out, 0o755); err != nil {
		return err
	}
	written, err := Figures(ctx, l, run, results, FigureOptions{Dir: o.Out, Format: o.Format, RScale: o.RScale, Along: o.Along, Forecasts: fcs})
	if err != nil {
		return err
	}
	for _, p := range written {
		fmt.Fprintf(o.Env.Stderr, "wrote %s\n", p)
	}
	return nil
}

// MaxLegend is the largest number of entries a figure's legend shows;
// beyond it the legend is left out.
const MaxLegend = 12

// FigureOptions choose what Figures draws.
type FigureOptions struct {
	Dir, Format, RScale, Along string
	Forecasts                  []compare.Forecast
}

// title returns the configuration's title, or the run id.
func title(run ledger.RunDetail) string {
	var t struct {
		Title string `toml:"title"`
	}
	if err := toml.Unmarshal([]byte(run.ConfigText), &t); err == nil && t.Title != "" {
		return t.Title
	}
	return "inflatrace run " + string(run.ID)
}

// constraints returns the Gaussian sets the run's comparisons used.
func constraints(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) ([]figures.ConstraintLayer, error) {
	ns, err := l.RunNodes(ctx, id)
	if err != nil {
		return nil, err
	}
	seen := map[string]bool{}
	var out []figures.ConstraintLayer
	for _, n := range ns {
		if n.Stage != nodes.CompareStage {
			continue
		}
		g, ok := nodes.GaussianFrom(n.Params)
		if !ok || seen[g.Name] {
			continue
		}
		seen[g.Name] = true
		out = append(out, figures.ConstraintLayer{Set: g})
	}
	return out, nil
}

// stripes turns the run's band results into stripes: one per model label
// (family) and band history, its edges the predictions at N*_min and
// N*_max of each parameter value, in the run's order.
func stripes(results []study.Result) []figures.Stripe {
	type key struct{ model, history string }
	var order []key
	groups := map[key][]study.Result{}
	for _, r := range results {
		if r.Band == nil || r.Error != "" {
			continue
		}
		parts := strings.Split(r.Label, " | ")
		model := parts[0]
		if i := strings.IndexByte(model, '('); i > 0 {
			model = model[:i]
		}
		k := key{model, strings.Join(parts[1:], " | ")}
		if _, ok := groups[k]; !ok {
			order = append(order, k)
		}
		groups[k] = append(groups[k], r)
	}
	var out []figures.Stripe
	for _, k := range order {
		g := groups[k]
		s := figures.Stripe{Label: k.model + " " + k.history}
		for _, r := range g {
			lo := compare.Point{Ns: r.Band.NsAtNStar[0], R: r.Band.RAtNStar[0]}
			hi := compare.Point{Ns: r.Band.NsAtNStar[1], R: r.Band.RAtNStar[1]}
			if len(g) == 1 {
				s.Path = []compare.Point{lo, hi}
			} else {
				s.Lower, s.Upper = append(s.Lower, lo), append(s.Upper, hi)
			}
		}
		out = append(out, s)
	}
	return out
}

// Figures draws a run's figures into o.Dir and returns the paths written.
func Figures(ctx context.Context, l *ledger.Ledger, run ledger.RunDetail, results []study.Result, o FigureOptions) ([]string, error) {
	scale := figures.Log
	switch o.RScale {
	case "", "log":
	case "linear":
		scale = figures.Linear
	default:
		return nil, app.Usage(fmt.Errorf("--r-scale %q: want log or linear", o.RScale))
	}
	if o.Format == "" {
		o.Format = figures.DefaultFormat
	}
	if !slices.Contains(figures.Formats, o.Format) {
		return nil, app.Usage(fmt.Errorf("--format %q: want %s", o.Format, strings.Join(figures.Formats, ", ")))
	}
	layers, err := constraints(ctx, l, run.ID)
	if err != nil {
		return nil, err
	}
	along := o.Along
	if along == "" {
		along = figures.AlongNStar
	}
	spec := figures.NsRSpec{Title: title(run), RScale: scale, Constraints: layers, Stripes: stripes(results)}
	if curves, err := figures.CurvesAlong(results, along); err == nil {
		spec.Curves = curves
	} else if len(spec.Stripes) == 0 {
		return nil, fmt.Errorf("nothing to draw: %w", err)
	}
	if len(spec.Curves)+len(spec.Stripes) > MaxLegend {
		spec.Legend = figures.NoLegend // the curves' end tags still name N* or the parameter
	}
	var written []string
	p, err := figures.NsR(spec)
	if err != nil {
		return nil, err
	}
	path := filepath.Join(o.Dir, "ns-r."+o.Format)
	if err := figures.Save(p, path); err != nil {
		return nil, err
	}
	written = append(written, path)
	// r against each scanned parameter (one with more than one value).
	for _, param := range scanned(results) {
		factor, label := 1.0, param
		if param == "alpha" {
			factor, label = 3, "3 alpha"
		}
		xy, err := figures.RCurvesAlong(results, param, factor)
		if err != nil {
			continue
		}
		rs := figures.RAlphaSpec{Title: title(run), XLabel: label, Curves: xy}
		if len(xy) > MaxLegend {
			rs.Legend = figures.NoLegend
		}
		for _, f := range o.Forecasts {
			rs.Forecasts = append(rs.Forecasts, figures.ForecastLine{Forecast: f})
		}
		p, err := figures.RAlpha(rs)
		if err != nil {
			return nil, err
		}
		path := filepath.Join(o.Dir, "r-"+param+"."+o.Format)
		if err := figures.Save(p, path); err != nil {
			return nil, err
		}
		written = append(written, path)
	}
	return written, nil
}

// scanned lists the model parameters that take more than one value.
func scanned(results []study.Result) []string {
	values := map[string]map[float64]bool{}
	for _, r := range results {
		for n, v := range r.Params {
			if values[n] == nil {
				values[n] = map[float64]bool{}
			}
			values[n][v] = true
		}
	}
	var out []string
	for n, vs := range values {
		if len(vs) > 1 {
			out = append(out, n)
		}
	}
	sort.Strings(out)
	return out
}

// archiveFigures draws a run's figures into dir/figures. A run whose
// results cannot be drawn (only failures, say) is archived without them.
func archiveFigures(ctx context.Context, led *ledger.Ledger, dir string, run ledger.RunDetail, results []study.Result) error {
	figDir := filepath.Join(dir, "figures")
	if err := os.MkdirAll(figDir, 0o755); err != nil {
		return err
	}
	if _, err := Figures(ctx, led, run, results, FigureOptions{Dir: figDir, Format: "png"}); err != nil {
		os.Remove(figDir)
	}
	return nil
}
