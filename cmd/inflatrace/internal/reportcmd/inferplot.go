package reportcmd

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/figures"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/stages/study"
)

// inferenceQuantities are the quantities of a run of inferences drawn as
// posterior densities, after the free parameters: file name, axis label.
var inferenceQuantities = []struct{ name, label string }{
	{"N_star", `$N_*$`},
	{"log10_T_reh_GeV", `$log_{10}(T_{reh}$/GeV$)$`},
	{"w_reh", `$w_{reh}$`},
	{"N_reh", `$N_{reh}$`},
	{"n_s", `$n_s$`},
	{"log10_r", `$log_{10} r$`},
}

// paramLabels typesets parameter names on an axis.
func paramLabel(name string) string {
	switch name {
	case "alpha", "xi", "mu", "lambda", "beta", "gamma", "delta", "phi":
		return `$\` + name + `$`
	}
	return `$` + name + `$`
}

// inferenceFigures draws a run of inferences' figures from its recorded
// densities: one figure per quantity (posterior-NAME), one curve per
// inference and constraint set, the log10 r figure with each forecast's
// 3 sigma detection level.
func inferenceFigures(run ledger.RunDetail, rows []infertable.Row) ([]Built, error) {
	var forecasts []struct {
		name  string
		sigma float64
	}
	if s, err := study.Parse(run.ConfigPath, []byte(run.ConfigText), filepath.Dir(run.ConfigPath)); err == nil {
		for _, f := range s.Forecasts {
			forecasts = append(forecasts, struct {
				name  string
				sigma float64
			}{f.Name, f.SigmaR})
		}
	}
	several := len(rowsSets(rows)) > 1
	label := func(r infertable.Row) string {
		if several {
			return figures.PlainText(r.Label + " (" + r.Constraint + ")")
		}
		return figures.PlainText(r.Label)
	}
	// The free parameters, in their first appearance.
	var params []string
	seen := map[string]bool{}
	for _, r := range rows {
		for _, p := range r.Free {
			if p != "w_reh" && !seen[p] {
				seen[p] = true
				params = append(params, p)
			}
		}
	}
	type quantity struct{ key, file, label string }
	var qs []quantity
	for _, p := range params {
		qs = append(qs, quantity{"param:" + p, "posterior-" + p, paramLabel(p)})
	}
	for _, q := range inferenceQuantities {
		qs = append(qs, quantity{q.name, "posterior-" + q.name, q.label})
	}
	var out []Built
	for _, q := range qs {
		spec := figures.DensitySpec{XLabel: q.label, XScale: figures.Linear}
		logSpaced := true
		for ri, r := range rows {
			xs, ys, ok := r.PDF(q.key)
			if !ok {
				continue
			}
			spec.Curves = append(spec.Curves, figures.DensityCurve{Label: label(r), X: xs, Y: ys, Style: ri})
			if !(xs[0] > 0) || math.Abs(xs[2]/xs[1]-xs[1]/xs[0]) > 1e-6*xs[1]/xs[0] {
				logSpaced = false
			}
		}
		if len(spec.Curves) == 0 {
			continue
		}
		if logSpaced && strings.HasPrefix(q.key, "param:") {
			spec.XScale = figures.Log
		}
		if q.key == "log10_r" {
			for _, f := range forecasts {
				spec.Levels = append(spec.Levels, figures.VLine{X: math.Log10(3 * f.sigma),
					Label: figures.PlainText(f.name) + fmt.Sprintf(`: detects $r$ at $3\sigma$ above $r = %.3g$`, 3*f.sigma)})
			}
		}
		f, err := figures.Densities(spec)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", q.file, err)
		}
		out = append(out, Built{Name: q.file, Figure: f})
	}
	// Joint posteriors with log10 T_reh.
	pairs := append([]string(nil), params...)
	for _, r := range rows {
		if slices.Contains(r.Free, "w_reh") {
			pairs = append(pairs, "w_reh")
			break
		}
	}
	for _, p := range pairs {
		key, xlabel := "param:"+p, paramLabel(p)
		if p == "w_reh" {
			key, xlabel = "w_reh", `$w_{reh}$`
		}
		spec := figures.Density2Spec{XLabel: xlabel, YLabel: `$log_{10}(T_{reh}$/GeV$)$`, XScale: figures.Linear}
		logSpaced := true
		for ri, r := range rows {
			xs, ys, z, ok := r.PDF2(key)
			if !ok {
				continue
			}
			spec.Curves = append(spec.Curves, figures.Density2Curve{Label: label(r), X: xs, Y: ys, Z: z, Style: ri})
			if !(xs[0] > 0) || math.Abs(xs[2]/xs[1]-xs[1]/xs[0]) > 1e-6*xs[1]/xs[0] {
				logSpaced = false
			}
		}
		if len(spec.Curves) == 0 {
			continue
		}
		if logSpaced {
			spec.XScale = figures.Log
		}
		f, err := figures.Densities2(spec)
		if err != nil {
			return nil, fmt.Errorf("posterior-%s-T_reh: %w", p, err)
		}
		out = append(out, Built{Name: "posterior-" + p + "-T_reh", Figure: f})
	}
	return out, nil
}

// rowsSets are the distinct constraint sets of rows.
func rowsSets(rows []infertable.Row) []string {
	m := map[string]bool{}
	for _, r := range rows {
		m[r.Constraint] = true
	}
	var out []string
	for s := range m {
		out = append(out, s)
	}
	sort.Strings(out)
	return out
}
