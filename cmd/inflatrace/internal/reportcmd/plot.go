package reportcmd

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"
	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/figures"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
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
	XScale    string
	RRange    string
	NsRange   string
	Along     string
	Forecasts []string
	Models    []string
	Reheating []string
	Methods   []string
}

// NewPlotCmd returns the plot command.
func NewPlotCmd(env *app.Env, g *app.Globals) *cobra.Command {
	o := &PlotOptions{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "plot RUN --out DIR [--format pdf|svg|png] [--r-scale log|linear] [--r-range LO,HI] [--ns-range LO,HI] [--along N_star|PARAM] [--x-scale auto|log|linear] [--forecast NAME]... [--model M]... [--reheating H]... [--method M]...",
		Short: "Draw a run's figures from the ledger: the n_s-r plane and r against a scanned parameter",
		Long: `plot draws, without recomputing, into --out:

ns-r.FORMAT, the n_s-r plane: each constraint set of the run (Gaussian or
sample-based) as its 68% region, filled with a solid outline, and its 95%
region, a dashed outline; each model as a line of its own colour and dash
(eight colours, then the next dash pattern), joined along N* (or along a
scanned parameter with --along), with one marker shape per reheating
history ($N_*$ = 50, 55, 60, instantaneous reheating, ...); reheating bands
(history "band") as tinted stripes between the predictions at N*_min
and N*_max of each parameter value, or along the curve of a single model;
and each forecast (the run's [[forecast]] sets and --forecast) as a dotted
horizontal line at r = 3 sigma(r), above which that experiment detects r at
3 sigma. The key, below the data in as many columns as fit, names every
model, marker, region, band and forecast line; nothing is written on the
data.

r-PARAM.FORMAT, for each scanned model parameter: r against it (3 alpha for
alpha), with the same styles, markers and forecast lines. The parameter axis
is logarithmic when the scan is log-spaced (--x-scale overrides).

Axis ranges follow the data, so no point is cut off; --r-range and
--ns-range fix them, and plot says how many points then fall outside.
--model, --reheating and --method draw a subset (a model by its label or
family, a history by its kind or its label part such as "N*=55"; each flag
may repeat). PDF (the default) and SVG embed their fonts. Shipped forecasts:
` + strings.Join(study.ForecastNames(), ", ") + ".",
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
	f.StringVar(&o.XScale, "x-scale", "auto", "parameter axis of r-PARAM: auto (log when the scan is log-spaced), log or linear")
	f.StringVar(&o.RRange, "r-range", "", "r axis range LO,HI (default: follow the data)")
	f.StringVar(&o.NsRange, "ns-range", "", "n_s axis range LO,HI (default: follow the data)")
	f.StringVar(&o.Along, "along", "auto", "join predictions along N_star or along a model parameter; auto: along N_star, or along the most-scanned parameter when that would give more than "+strconv.Itoa(MaxModelCurves)+" model curves")
	f.StringSliceVar(&o.Forecasts, "forecast", nil, "forecasts to draw besides the run's own")
	f.StringSliceVar(&o.Models, "model", nil, "draw only these models (label or family)")
	f.StringSliceVar(&o.Reheating, "reheating", nil, "draw only these histories (kind, or label part such as N*=55)")
	f.StringSliceVar(&o.Methods, "method", nil, "draw only these slow-roll methods")
	return cmd
}

// Plot draws the figures.
func Plot(ctx context.Context, o *PlotOptions) error {
	fo, err := o.figureOptions()
	if err != nil {
		return err
	}
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	id, err := l.ResolveRun(ctx, o.Run)
	if err != nil {
		return err
	}
	run, err := l.Run(ctx, id)
	if err != nil {
		return err
	}
	if rows, ok, err := infertable.Recorded(ctx, l, id); err != nil {
		return err
	} else if ok {
		// A run of inferences: its posterior densities.
		built, err := inferenceFigures(run, rows)
		if err != nil {
			return err
		}
		if err := os.MkdirAll(o.Out, 0o755); err != nil {
			return err
		}
		for _, b := range built {
			path := filepath.Join(o.Out, b.Name+"."+fo.Format)
			if err := figures.Save(b.Figure, path); err != nil {
				return err
			}
			fmt.Fprintf(o.Env.Stderr, "wrote %s\n", path)
		}
		return nil
	}
	// The figures draw predictions and bands; the comparison nodes'
	// figures are not decoded (the constraint sets come from their
	// parameters, read once per set).
	results, err := app.RecordedResultsWith(ctx, l, id, figureNeeds)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(o.Out, 0o755); err != nil {
		return err
	}
	fo.Dir = o.Out
	out, err := Figures(ctx, l, run, results, fo)
	if err != nil {
		return err
	}
	for _, p := range out.Written {
		fmt.Fprintf(o.Env.Stderr, "wrote %s\n", p)
	}
	for _, n := range out.Notes {
		fmt.Fprintf(o.Env.Stderr, "note: %s\n", n)
	}
	return nil
}

// figureNeeds is what the figures read of a result's lineage: the outputs
// of the model, slow-roll and reheat stages.
func figureNeeds(stage string) (params, outputs bool) {
	switch stage {
	case nodes.ModelStage, nodes.SlowRollStage, nodes.ReheatStage:
		return false, true
	}
	return false, false
}

// figureOptions checks the flags.
func (o *PlotOptions) figureOptions() (FigureOptions, error) {
	fo := FigureOptions{Format: o.Format, RScale: o.RScale, XScale: o.XScale, Along: o.Along,
		Models: o.Models, Reheating: o.Reheating, Methods: o.Methods}
	var err error
	if fo.RRange, err = parseRange("--r-range", o.RRange); err != nil {
		return fo, err
	}
	if fo.NsRange, err = parseRange("--ns-range", o.NsRange); err != nil {
		return fo, err
	}
	for _, n := range o.Forecasts {
		f, err := study.ShippedForecast(n)
		if err != nil {
			return fo, app.Usage(fmt.Errorf("--forecast: %w", err))
		}
		fo.Forecasts = append(fo.Forecasts, f)
	}
	return fo, nil
}

// parseRange reads "LO,HI".
func parseRange(flag, s string) ([2]float64, error) {
	if s == "" {
		return [2]float64{}, nil
	}
	lo, hi, ok := strings.Cut(s, ",")
	a, err1 := strconv.ParseFloat(strings.TrimSpace(lo), 64)
	b, err2 := strconv.ParseFloat(strings.TrimSpace(hi), 64)
	if !ok || err1 != nil || err2 != nil || !(a < b) || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return [2]float64{}, app.Usage(fmt.Errorf("%s %q: want LO,HI with LO < HI (for example 1e-4,0.1)", flag, s))
	}
	return [2]float64{a, b}, nil
}

// FigureOptions choose what Figures draws.
type FigureOptions struct {
	Dir, Format, RScale, XScale, Along string
	RRange, NsRange                    [2]float64
	Forecasts                          []compare.Forecast // besides the run's own
	Models, Reheating, Methods         []string           // filters; empty keeps all
}

// FiguresWritten is what Figures did.
type FiguresWritten struct {
	Written []string
	Notes   []string // points left out of fixed ranges, and the like
}

// title returns the configuration's title, or the run id, as plain text.
func title(run ledger.RunDetail) string {
	var t struct {
		Title string `toml:"title"`
	}
	if err := toml.Unmarshal([]byte(run.ConfigText), &t); err == nil && t.Title != "" {
		return figures.PlainText(t.Title)
	}
	return "inflatrace run " + string(run.ID)
}

// constraints returns the constraint sets and forecasts the run's
// comparisons used, in the order the run met them.
func constraints(ctx context.Context, l *ledger.Ledger, id pipeline.RunID) ([]figures.ConstraintLayer, []compare.Forecast, error) {
	ps, err := l.RunStageParams(ctx, id, nodes.CompareStage)
	if err != nil {
		return nil, nil, err
	}
	seen := map[string]bool{}
	var sets []figures.ConstraintLayer
	var fcs []compare.Forecast
	for _, params := range ps {
		name, _ := params.Text("constraint")
		if seen[name] {
			continue
		}
		seen[name] = true
		if f, ok := nodes.ForecastFrom(params); ok {
			fcs = append(fcs, f)
			continue
		}
		c, ok, err := nodes.ConstraintFrom(params)
		if err != nil {
			return nil, nil, err
		}
		if ok {
			sets = append(sets, figures.ConstraintLayer{Set: c})
		}
	}
	return sets, fcs, nil
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
		k := key{model, parts[min(1, len(parts)-1)]}
		if _, ok := groups[k]; !ok {
			order = append(order, k)
		}
		groups[k] = append(groups[k], r)
	}
	var out []figures.Stripe
	for i, k := range order {
		g := groups[k]
		s := figures.Stripe{Label: figures.PlainText(k.model + " " + k.history), Style: i}
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

// keep applies the figure filters.
func keep(results []study.Result, o FigureOptions) []study.Result {
	match := func(want []string, have ...string) bool {
		if len(want) == 0 {
			return true
		}
		for _, w := range want {
			for _, h := range have {
				if h != "" && strings.EqualFold(w, h) {
					return true
				}
			}
		}
		return false
	}
	var out []study.Result
	for _, r := range results {
		parts := strings.Split(r.Label, " | ")
		history := ""
		if len(parts) > 1 {
			history = parts[1]
		}
		if match(o.Models, tables.ModelLabel(r), r.Model, parts[0]) && match(o.Reheating, r.Reheating, history) && match(o.Methods, r.Method) {
			out = append(out, r)
		}
	}
	return out
}

// greekParams are the parameter names written as Greek letters on an axis.
var greekParams = map[string]bool{"alpha": true, "beta": true, "gamma": true, "delta": true, "xi": true, "mu": true, "lambda": true, "phi": true}

// paramAxis is the axis factor and typeset label of a scanned parameter.
func paramAxis(param string) (float64, string) {
	switch {
	case param == "alpha":
		return 3, `$3\alpha$`
	case greekParams[param]:
		return 1, `$\` + param + `$`
	}
	return 1, figures.PlainText(param)
}

// logSpaced reports whether a scan's values are log-spaced: all positive,
// spanning more than a decade, with ratios of neighbours more alike than
// their differences (or, for a scan of a few values, spanning at least
// two decades).
func logSpaced(xs []float64) bool {
	vs := append([]float64(nil), xs...)
	sort.Float64s(vs)
	vs = slices.Compact(vs)
	if len(vs) < 2 || vs[0] <= 0 || vs[len(vs)-1]/vs[0] < 10 {
		return false
	}
	if len(vs) < 4 {
		return vs[len(vs)-1]/vs[0] >= 100
	}
	spread := func(d []float64) float64 {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, x := range d {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
		return (hi - lo) / math.Abs(hi+lo) * 2
	}
	var diffs, logs []float64
	for i := 1; i < len(vs); i++ {
		diffs = append(diffs, vs[i]-vs[i-1])
		logs = append(logs, math.Log(vs[i]/vs[i-1]))
	}
	return spread(logs) < spread(diffs)
}

// Built is a figure BuildFigures drew, with its file name without
// extension ("ns-r", "r-alpha").
type Built struct {
	Name   string
	Figure *figures.Figure
}

// Figures draws a run's figures into o.Dir and says what it wrote.
func Figures(ctx context.Context, l *ledger.Ledger, run ledger.RunDetail, all []study.Result, o FigureOptions) (FiguresWritten, error) {
	var out FiguresWritten
	if o.Format == "" {
		o.Format = figures.DefaultFormat
	}
	if !slices.Contains(figures.Formats, o.Format) {
		return out, app.Usage(fmt.Errorf("--format %q: want %s", o.Format, strings.Join(figures.Formats, ", ")))
	}
	built, err := BuildFigures(ctx, l, run, all, o)
	if err != nil {
		return out, err
	}
	for _, b := range built {
		path := filepath.Join(o.Dir, b.Name+"."+o.Format)
		if err := figures.Save(b.Figure, path); err != nil {
			return out, err
		}
		out.Written = append(out.Written, path)
		if b.Figure.Clipped > 0 {
			out.Notes = append(out.Notes, fmt.Sprintf("%s: %d point(s) lie outside the fixed axis ranges and are not drawn", path, b.Figure.Clipped))
		}
	}
	return out, nil
}

// BuildFigures draws a run's figures, from the ledger alone: the n_s-r
// plane and r against each scanned parameter.
func BuildFigures(ctx context.Context, l *ledger.Ledger, run ledger.RunDetail, all []study.Result, o FigureOptions) ([]Built, error) {
	scale := figures.Log
	switch o.RScale {
	case "", "log":
	case "linear":
		scale = figures.Linear
	default:
		return nil, app.Usage(fmt.Errorf("--r-scale %q: want log or linear", o.RScale))
	}
	switch o.XScale {
	case "", "auto", "log", "linear":
	default:
		return nil, app.Usage(fmt.Errorf("--x-scale %q: want auto, log or linear", o.XScale))
	}
	if scale == figures.Log && o.RRange != [2]float64{} && !(o.RRange[0] > 0) {
		return nil, app.Usage(fmt.Errorf("--r-range %g,%g: a log r axis needs LO > 0 (or --r-scale linear)", o.RRange[0], o.RRange[1]))
	}
	results := keep(all, o)
	if len(results) == 0 {
		return nil, app.Usage(fmt.Errorf("--model, --reheating and --method leave none of the run's %d results to draw", len(all)))
	}
	layers, own, err := constraints(ctx, l, run.ID)
	if err != nil {
		return nil, err
	}
	var lines []figures.ForecastLine
	seen := map[string]bool{}
	for _, f := range append(own, o.Forecasts...) {
		if !seen[f.Name] {
			seen[f.Name] = true
			lines = append(lines, figures.ForecastLine{Forecast: f})
		}
	}
	along := o.Along
	if along == "" || along == "auto" {
		along = autoAlong(results)
	}
	spec := figures.NsRSpec{Title: title(run), RScale: scale, RRange: o.RRange, NsRange: o.NsRange,
		Constraints: layers, Stripes: stripes(results), Forecasts: lines}
	if curves, marks, err := figures.CurvesAlong(results, along); err == nil {
		spec.Curves, spec.Markers = curves, marks
	} else if len(spec.Stripes) == 0 {
		return nil, fmt.Errorf("nothing to draw: %w", err)
	}
	f, err := figures.NsR(spec)
	if err != nil {
		return nil, err
	}
	built := []Built{{"ns-r", f}}
	// r against each scanned parameter (one with more than one value).
	for _, param := range scanned(results) {
		factor, label := paramAxis(param)
		xy, marks, err := figures.RCurvesAlong(results, param, factor)
		if err != nil {
			continue
		}
		rs := figures.RAlphaSpec{Title: title(run), XLabel: label, Curves: xy, Markers: marks, Forecasts: lines}
		if o.RRange != [2]float64{} && o.RRange[0] > 0 {
			rs.RRange = o.RRange
		}
		var xs []float64
		for _, c := range xy {
			for _, x := range c.X {
				xs = append(xs, x/factor)
			}
		}
		if o.XScale == "log" || (o.XScale == "" || o.XScale == "auto") && logSpaced(xs) {
			rs.XScale = figures.Log
		}
		f, err := figures.RAlpha(rs)
		if err != nil {
			return nil, err
		}
		built = append(built, Built{"r-" + param, f})
	}
	return built, nil
}

// MaxModelCurves is the most model curves --along auto draws along N*;
// a scan with more models is joined along its most-scanned parameter.
const MaxModelCurves = 40

// autoAlong joins along N* unless that gives more than MaxModelCurves
// models (a parameter scan: one curve of one point per value), in which
// case it joins along the parameter with the most values.
func autoAlong(results []study.Result) string {
	models := map[string]bool{}
	values := map[string]map[float64]bool{}
	for _, r := range results {
		if r.Error != "" || r.Band != nil {
			continue
		}
		model, _, _ := strings.Cut(r.Label, " | ")
		models[model+"\x00"+r.Method+"\x00"+r.End] = true
		for n, v := range r.Params {
			if values[n] == nil {
				values[n] = map[float64]bool{}
			}
			values[n][v] = true
		}
	}
	if len(models) <= MaxModelCurves {
		return figures.AlongNStar
	}
	best, most := figures.AlongNStar, 1
	for _, n := range scanned(results) {
		if len(values[n]) > most {
			best, most = n, len(values[n])
		}
	}
	return best
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

// archiveFigures draws a run's figures into dir/figures in every format
// (PDF for the paper, SVG, PNG for a quick look). A run whose results
// cannot be drawn (only failures, say) is archived without them.
func archiveFigures(ctx context.Context, led *ledger.Ledger, dir string, run ledger.RunDetail, results []study.Result) error {
	figDir := filepath.Join(dir, "figures")
	if err := os.MkdirAll(figDir, 0o755); err != nil {
		return err
	}
	// Drawn once, written in each format.
	built, err := BuildFigures(ctx, led, run, results, FigureOptions{})
	if err != nil {
		os.RemoveAll(figDir)
		return nil
	}
	for _, format := range figures.Formats {
		for _, b := range built {
			if err := figures.Save(b.Figure, filepath.Join(figDir, b.Name+"."+format)); err != nil {
				os.RemoveAll(figDir)
				return nil
			}
		}
	}
	return nil
}
