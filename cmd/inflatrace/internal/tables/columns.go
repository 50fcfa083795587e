package tables

import (
	"fmt"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/stages/study"
)

// kind is how a column's cells are typed and aligned.
type kind int

const (
	text    kind = iota // left-aligned text
	number              // right-aligned number, digits per Options
	input               // right-aligned number given as input: always exact
	flag                // centred yes/no
	params              // the parameter list: text, or an object in JSON
	ordinal             // the row's number, from 1: exact, right-aligned
)

// column is one selectable column.
type column struct {
	name  string // CSV header and JSON key
	plain string // Markdown header, units in brackets
	latex string // LaTeX header
	kind  kind
	get   func(r study.Result) cell // nil for the ordinal column
	// compared marks a column of the comparison with a constraint set or
	// forecast rather than of the prediction: in the wide layout it is
	// repeated under each set that gives it a value.
	compared bool
}

// value is the cell of row k (from 0), result r, in this column.
func (c column) value(k int, r study.Result) cell {
	if c.kind == ordinal {
		return num(float64(k + 1))
	}
	return c.get(r)
}

// cell is one value; ok is false for a missing value.
type cell struct {
	ok     bool
	text   string
	num    float64
	flag   bool
	params map[string]float64
	// written is each parameter as the study wrote it ("1/3"), for the
	// params column (WrittenParams).
	written map[string]string
}

func txt(s string) cell  { return cell{ok: true, text: s} }
func num(x float64) cell { return cell{ok: true, num: x} }

func opt(p *float64) cell {
	if p == nil {
		return cell{}
	}
	return num(*p)
}

func optFlag(p *bool) cell {
	if p == nil {
		return cell{}
	}
	return cell{ok: true, flag: *p}
}

// pred reads a predicted number, missing when the result failed.
func pred(f func(r study.Result) float64) func(r study.Result) cell {
	return func(r study.Result) cell {
		if r.Error != "" {
			return cell{}
		}
		return num(f(r))
	}
}

func predOpt(f func(r study.Result) *float64) func(r study.Result) cell {
	return func(r study.Result) cell {
		if r.Error != "" {
			return cell{}
		}
		return opt(f(r))
	}
}

func band(f func(b *study.Band) float64) func(r study.Result) cell {
	return func(r study.Result) cell {
		if r.Error != "" || r.Band == nil {
			return cell{}
		}
		return num(f(r.Band))
	}
}

// history is the history part of a result label
// "model(params) | history | constraint", else the reheating kind.
func history(r study.Result) string {
	parts := strings.Split(r.Label, " | ")
	if len(parts) >= 2 {
		return parts[1]
	}
	return r.Reheating
}

// ModelLabel is the model part of a result label "label(params)
// [method] | history | constraint" without its parameter list and method:
// the user's [[model]] label, or the family name when the study gives
// none.
func ModelLabel(r study.Result) string {
	s, _, _ := strings.Cut(r.Label, " | ")
	if r.Method != "" {
		s = strings.TrimSuffix(s, " ["+r.Method+"]")
	}
	label, _, _ := cutParams(s, len(r.Params) > 0)
	return label
}

// cutParams splits "label(a=1, b=2)" into the label and the parameter
// list "a=1, b=2", cutting at the parenthesis matching the last one (a
// label may itself hold parentheses); ok is false when s has no list.
func cutParams(s string, hasParams bool) (label, list string, ok bool) {
	if !hasParams || !strings.HasSuffix(s, ")") {
		return s, "", false
	}
	depth := 0
	for i := len(s) - 1; i >= 0; i-- {
		switch s[i] {
		case ')':
			depth++
		case '(':
			depth--
			if depth == 0 {
				return s[:i], s[i+1 : len(s)-1], true
			}
		}
	}
	return s, "", false
}

// columns are the selectable columns in their documented order (see the
// package documentation); param.NAME columns are made on demand.
var columns = []column{
	{"row", "#", "\\#", ordinal, nil, false},
	{"label", "Label", "Label", text, func(r study.Result) cell { return txt(r.Label) }, false},
	{"model_label", "Model label", "Model", text, func(r study.Result) cell { return txt(ModelLabel(r)) }, false},
	{"model", "Model", "Model", text, func(r study.Result) cell { return txt(r.Model) }, false},
	{"params", "Parameters", "Parameters", params, func(r study.Result) cell { return cell{ok: true, params: r.Params, written: WrittenParams(r)} }, false},
	{"method", "Method", "Method", text, func(r study.Result) cell { return txt(r.Method) }, false},
	{"reheating", "Reheating", "Reheating", text, func(r study.Result) cell { return txt(r.Reheating) }, false},
	{"history", "History", "History", text, func(r study.Result) cell { return txt(history(r)) }, false},
	{"N_star", "N*", `$N_*$`, number, pred(func(r study.Result) float64 { return r.NStar }), false},
	{"phi_star", "phi* [M_Pl]", `$\phi_*$ [$M_{\rm Pl}$]`, number, pred(func(r study.Result) float64 { return r.PhiStar }), false},
	{"phi_end", "phi_end [M_Pl]", `$\phi_{\rm end}$ [$M_{\rm Pl}$]`, number, pred(func(r study.Result) float64 { return r.PhiEnd }), false},
	{"n_s", "n_s", `$n_s$`, number, pred(func(r study.Result) float64 { return r.Ns }), false},
	{"r", "r", `$r$`, number, pred(func(r study.Result) float64 { return r.R }), false},
	{"alpha_s", "alpha_s", `$\alpha_s$`, number, pred(func(r study.Result) float64 { return r.AlphaS }), false},
	{"n_t", "n_t", `$n_t$`, number, pred(func(r study.Result) float64 { return r.Nt }), false},
	{"energy_scale_GeV", "V*^(1/4) [GeV]", `$V_*^{1/4}$ [GeV]`, number, predOpt(func(r study.Result) *float64 { return r.EnergyScaleGeV }), false},
	{"H_star_GeV", "H* [GeV]", `$H_*$ [GeV]`, number, predOpt(func(r study.Result) *float64 { return r.HStarGeV }), false},
	{"T_reh_GeV", "T_reh [GeV]", `$T_{\rm reh}$ [GeV]`, number, predOpt(func(r study.Result) *float64 { return r.TRehGeV }), false},
	{"T_max_GeV", "T_max [GeV]", `$T_{\rm max}$ [GeV]`, number, predOpt(func(r study.Result) *float64 { return r.TMaxGeV }), false},
	{"w_reh", "w_reh", `$w_{\rm reh}$`, number, predOpt(func(r study.Result) *float64 { return r.WReh }), false},
	{"N_reh", "N_reh", `$N_{\rm reh}$`, number, predOpt(func(r study.Result) *float64 { return r.NReh }), false},
	{"below_bbn", "below BBN", "below BBN", flag, func(r study.Result) cell { return optFlag(r.BelowBBN) }, false},
	{"N_star_min", "N*_min", `$N_*^{\rm min}$`, number, band(func(b *study.Band) float64 { return b.NStar[0] }), false},
	{"N_star_max", "N*_max", `$N_*^{\rm max}$`, number, band(func(b *study.Band) float64 { return b.NStar[1] }), false},
	{"n_s_min", "n_s,min", `$n_s^{\rm min}$`, number, band(func(b *study.Band) float64 { return b.Ns[0] }), false},
	{"n_s_max", "n_s,max", `$n_s^{\rm max}$`, number, band(func(b *study.Band) float64 { return b.Ns[1] }), false},
	{"r_min", "r_min", `$r^{\rm min}$`, number, band(func(b *study.Band) float64 { return b.R[0] }), false},
	{"r_max", "r_max", `$r^{\rm max}$`, number, band(func(b *study.Band) float64 { return b.R[1] }), false},
	{"constraint", "Constraint", "Constraint", text, func(r study.Result) cell { return txt(r.Constraint) }, true},
	{"delta_chi2", "Delta chi^2", `$\Delta\chi^2$`, number, predOpt(func(r study.Result) *float64 { return r.DeltaChi2 }), true},
	{"n_sigma", "n_sigma", `$n_\sigma$`, number, predOpt(func(r study.Result) *float64 { return r.NSigma }), true},
	{"inside_68", "in 68%", `in 68\%`, flag, func(r study.Result) cell { return optFlag(r.Inside68) }, true},
	{"inside_95", "in 95%", `in 95\%`, flag, func(r study.Result) cell { return optFlag(r.Inside95) }, true},
	{"detection_sigma", "detection [sigma]", `detection [$\sigma$]`, number, predOpt(func(r study.Result) *float64 { return r.DetectionSigma }), true},
	{"detected_5sigma", "detected at 5 sigma", `$5\sigma$ detection`, flag, func(r study.Result) cell { return optFlag(r.Detected5Sigma) }, true},
	{"key", "Key", "Key", text, func(r study.Result) cell { return txt(r.Key) }, true},
	{"error", "Error", "Error", text, func(r study.Result) cell { return txt(r.Error) }, false},
}

// ParamPrefix starts a column holding one model parameter:
// "param.alpha" is the parameter alpha.
const ParamPrefix = "param."

// DefaultColumns are used when Options.Columns is empty, except in LaTeX:
// the prediction (the row number, model, parameters, history and
// observables) and, per constraint set, Delta chi^2, the number of sigma
// and whether the prediction lies inside the 95% region, and per forecast
// the detection significance. In the wide layout the comparison columns
// (those after H_star_GeV) are repeated under each set that gives them a
// value; in the long layout the constraint column names the set.
var DefaultColumns = []string{"row", "model_label", "model", "params", "history", "N_star", "n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "H_star_GeV", "constraint", "delta_chi2", "n_sigma", "inside_95", "detection_sigma"}

// DefaultLaTeXColumns are used for LaTeX when Options.Columns is empty:
// DefaultColumns without the row number and the family name, which a
// paper's table does not carry (ask for them with the columns row and
// model).
var DefaultLaTeXColumns = []string{"model_label", "params", "history", "N_star", "n_s", "r", "alpha_s", "n_t", "energy_scale_GeV", "H_star_GeV", "constraint", "delta_chi2", "n_sigma", "inside_95", "detection_sigma"}

// ColumnNames returns the names of the fixed columns in documented order
// (a param.NAME column may be added for any parameter).
func ColumnNames() []string {
	out := make([]string, len(columns))
	for i, c := range columns {
		out[i] = c.name
	}
	return out
}

// greek maps parameter names spelled as Greek letters to LaTeX (common
// practice in papers).
var greek = map[string]string{
	"alpha": `\alpha`, "beta": `\beta`, "gamma": `\gamma`, "delta": `\delta`, "epsilon": `\epsilon`,
	"zeta": `\zeta`, "eta": `\eta`, "theta": `\theta`, "kappa": `\kappa`, "lambda": `\lambda`,
	"mu": `\mu`, "nu": `\nu`, "xi": `\xi`, "rho": `\rho`, "sigma": `\sigma`, "tau": `\tau`,
	"phi": `\phi`, "chi": `\chi`, "psi": `\psi`, "omega": `\omega`,
}

// lookup resolves column names.
func lookup(names []string) ([]column, error) {
	if len(names) == 0 {
		names = DefaultColumns
	}
	byName := map[string]column{}
	for _, c := range columns {
		byName[c.name] = c
	}
	out := make([]column, 0, len(names))
	for _, n := range names {
		if p, ok := strings.CutPrefix(n, ParamPrefix); ok && p != "" {
			head := escapeLaTeX(p)
			if g, ok := greek[p]; ok {
				head = "$" + g + "$"
			}
			out = append(out, column{name: n, plain: p, latex: head, kind: input, get: func(r study.Result) cell {
				v, ok := r.Params[p]
				if !ok {
					return cell{}
				}
				return num(v)
			}})
			continue
		}
		c, ok := byName[n]
		if !ok {
			known := ColumnNames()
			sort.Strings(known)
			return nil, fmt.Errorf("tables: unknown column %q (known: %s, or %sNAME)", n, strings.Join(known, ", "), ParamPrefix)
		}
		out = append(out, c)
	}
	return out, nil
}
