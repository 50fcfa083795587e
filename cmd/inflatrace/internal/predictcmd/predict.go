// Package predictcmd implements "inflatrace predict": one model's
// prediction from flags, without a configuration file. The flags are
// written into an equivalent study configuration, which is recorded with
// the run, so the prediction can be regenerated with "inflatrace run".
//
// Every reheating history of a study has its flags; the history is the one
// the given flags belong to (instantaneous reheating when none is given).
// The configuration's own checks apply to the text predict writes, and
// their complaints are reported against the flag that supplied the key.
package predictcmd

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/stages/study"
)

// DefaultConstraint is the constraint set predict compares with when no
// --constraint or --constraint-file is given.
const DefaultConstraint = "cmb-combined-2025"

// ConfigName is the name the written configuration is recorded under.
const ConfigName = "predict flags"

// Options are the parsed flags of predict.
type Options struct {
	Env     *app.Env
	Globals *app.Globals

	// The model.
	Family     string
	Params     []string // k=v
	Label      string
	Potential  string
	Kinetic    string
	Field      string
	Domain     []float64
	Origin     float64
	FieldRange []float64

	// Slow roll and normalisation.
	Method string
	End    string
	EndPhi float64
	As     float64

	// Reheating: the history follows from which of these were given.
	Efolds    float64 // fixed-efolds
	Instant   bool    // instantaneous
	WReh      float64 // temperature, duration
	TRehGeV   float64 // temperature, kination
	NReh      float64 // duration
	Kination  bool
	Band      bool
	WRehMin   float64 // band
	WRehMax   float64
	NW, NT    int
	TMinGeV   float64
	KPivot    float64 // thermal keys: every history but fixed-efolds
	T0K       float64
	GS0       float64
	GReh      float64
	GSReh     float64
	TBBNGeV   float64
	Constrain []string // shipped constraint sets
	ConFiles  []string // constraint files
	Forecasts []string // shipped forecasts
	ForeFiles []string // forecast files

	JSON bool

	// Given holds the names of the flags given on the command line; only
	// those are written into the configuration.
	Given map[string]bool
}

// NewCmd returns the predict command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "predict (--family NAME | --potential EXPR [--kinetic EXPR] --field-range lo,hi) [--param k=v]... [reheating flags] [--constraint NAME]... [--forecast NAME]...",
		Short: "Predict one model without a configuration file (and record it)",
		Long: `Predict one model without a configuration file (and record it).

The reheating history follows from the flags given:
  --efolds N                      fixed-efolds: N* given
  (none) or --instantaneous       instantaneous reheating
  --w-reh W --T-reh-GeV T         temperature: constant w_reh until T_reh
  --w-reh W --N-reh N             duration: constant w_reh for N_reh e-folds
  --kination --T-reh-GeV T        kination: w_reh = 1 until T_reh
  --band [--w-reh-min ...]        band: sweep w_reh and T_reh
The thermal flags (--k-pivot-per-Mpc, --T0-K, --g-s0, --g-reh, --g-s-reh,
--T-bbn-GeV) apply to every history but fixed-efolds. With more than one
constraint set or forecast, --json prints a list of results.`,
		Example: `  inflatrace predict --family e-model --param alpha=1 --efolds 55 --json
  inflatrace predict --family t-model --param alpha=7/3 --instantaneous
  inflatrace predict --family starobinsky --w-reh 0 --T-reh-GeV 1e9 --constraint planck2018-bk18 --forecast litebird
  inflatrace predict --family two-plateau --param alpha=7/3 --param gamma=40 --kination --T-reh-GeV 1e7
  inflatrace predict --potential "(chi^2/(6*a))" --kinetic "1/(1-chi^2/(6*a))^2" --field chi \
      --domain=-2.449,2.449 --field-range 0.01,2.4489 --param a=1 --efolds 55`,
		Args: cobra.NoArgs,
		RunE: func(c *cobra.Command, _ []string) error {
			opts.Given = map[string]bool{}
			c.Flags().Visit(func(f *pflag.Flag) { opts.Given[f.Name] = true })
			return run(c.Context(), opts)
		},
	}
	f := cmd.Flags()
	f.StringVar(&opts.Family, "family", "", "model family (see README for the list)")
	f.StringArrayVar(&opts.Params, "param", nil, "family parameter as name=value; value may be a ratio such as 1/3 (repeatable)")
	f.StringVar(&opts.Label, "label", "", "the model's label in the results (default: the family's name)")
	f.StringVar(&opts.Potential, "potential", "", "a user-written potential V(field), e.g. \"(1 - exp(-sqrt(2/3)*phi))^2\" (instead of --family)")
	f.StringVar(&opts.Kinetic, "kinetic", "", "a user-written kinetic function K(field); the canonical field is computed numerically")
	f.StringVar(&opts.Field, "field", "phi", "the field's name in --potential and --kinetic")
	f.Float64SliceVar(&opts.Domain, "domain", nil, "the open domain lo,hi of the field (with --kinetic; default unbounded)")
	f.Float64Var(&opts.Origin, "origin", 0, "the field value where the canonical field is 0 (with --kinetic)")
	f.Float64SliceVar(&opts.FieldRange, "field-range", nil, "canonical field range lo,hi [M_p] searched for inflation")

	f.StringVar(&opts.Method, "method", "first", "slow-roll method: first, second or exact")
	f.StringVar(&opts.End, "end", "", "end of inflation: epsilon_V=1, epsilon_H=1, eta_V=1 or field (with --end-phi) (default: epsilon_V=1 at first order, epsilon_H=1 otherwise)")
	f.Float64Var(&opts.EndPhi, "end-phi", 0, "with --end field: the canonical field value [M_p] where inflation ends")
	f.Float64Var(&opts.As, "A_s", 2.1e-9, "scalar amplitude the potential is normalised to")

	f.Float64Var(&opts.Efolds, "efolds", 0, "fixed-efolds history: N* of the pivot before the end of inflation (5 to 200)")
	f.BoolVar(&opts.Instant, "instantaneous", false, "instantaneous reheating (the default without other reheating flags)")
	f.Float64Var(&opts.WReh, "w-reh", 0, "equation of state during reheating, -1/3 < w_reh <= 1 (with --T-reh-GeV or --N-reh)")
	f.Float64Var(&opts.TRehGeV, "T-reh-GeV", 0, "reheating temperature [GeV] (with --w-reh or --kination)")
	f.Float64Var(&opts.NReh, "N-reh", 0, "e-folds of reheating, 0 to 150 (with --w-reh)")
	f.BoolVar(&opts.Kination, "kination", false, "kination history: w_reh = 1 until --T-reh-GeV")
	f.BoolVar(&opts.Band, "band", false, "band history: sweep w_reh and T_reh and report the span of (N*, n_s, r)")
	f.Float64Var(&opts.WRehMin, "w-reh-min", 0, "with --band: lowest w_reh (default 0)")
	f.Float64Var(&opts.WRehMax, "w-reh-max", 1.0/3, "with --band: highest w_reh (default 1/3)")
	f.IntVar(&opts.NW, "n-w", 100, "with --band: number of w_reh values")
	f.IntVar(&opts.NT, "n-T", 100, "with --band: number of T_reh values, log-spaced from --T-min-GeV to the maximum")
	f.Float64Var(&opts.TMinGeV, "T-min-GeV", 0, "with --band: lowest T_reh [GeV] (default: the BBN bound)")
	f.Float64Var(&opts.KPivot, "k-pivot-per-Mpc", 0, "pivot scale k* [Mpc^-1] (default 0.05)")
	f.Float64Var(&opts.T0K, "T0-K", 0, "CMB temperature today [K] (default 2.7255)")
	f.Float64Var(&opts.GS0, "g-s0", 0, "entropy degrees of freedom today (default 43/11)")
	f.Float64Var(&opts.GReh, "g-reh", 0, "relativistic degrees of freedom at reheating (default 106.75)")
	f.Float64Var(&opts.GSReh, "g-s-reh", 0, "entropy degrees of freedom at reheating (default: --g-reh)")
	f.Float64Var(&opts.TBBNGeV, "T-bbn-GeV", 0, "results with T_reh below this [GeV] are flagged (default 4.1e-3)")

	f.StringArrayVar(&opts.Constrain, "constraint", nil, "shipped constraint set to compare with (repeatable; default "+DefaultConstraint+")")
	f.StringArrayVar(&opts.ConFiles, "constraint-file", nil, "constraint file to compare with (repeatable)")
	f.StringArrayVar(&opts.Forecasts, "forecast", nil, "shipped forecast: detection significance of r (repeatable)")
	f.StringArrayVar(&opts.ForeFiles, "forecast-file", nil, "forecast file (repeatable)")
	f.BoolVar(&opts.JSON, "json", false, "print the result as one JSON object (a list with several constraint sets or forecasts)")
	return cmd
}

// history is one reheating history's flags.
type history struct {
	name     string
	own      []string // flags that may be given with it
	required []string // flags that must be given
}

// thermalFlags are the flags of the thermal keys, in config order.
var thermalFlags = []string{"k-pivot-per-Mpc", "T0-K", "g-s0", "g-reh", "g-s-reh", "T-bbn-GeV"}

var histories = []history{
	{"fixed-efolds", []string{"efolds"}, []string{"efolds"}},
	{"instantaneous", append([]string{"instantaneous"}, thermalFlags...), nil},
	{"temperature", append([]string{"w-reh", "T-reh-GeV"}, thermalFlags...), []string{"w-reh", "T-reh-GeV"}},
	{"duration", append([]string{"w-reh", "N-reh"}, thermalFlags...), []string{"w-reh", "N-reh"}},
	{"kination", append([]string{"kination", "T-reh-GeV"}, thermalFlags...), []string{"kination", "T-reh-GeV"}},
	{"band", append([]string{"band", "w-reh-min", "w-reh-max", "n-w", "n-T", "T-min-GeV"}, thermalFlags...), []string{"band"}},
}

// historyFlags are every reheating flag, in the order they are reported.
var historyFlags = []string{"efolds", "instantaneous", "kination", "band", "w-reh", "T-reh-GeV", "N-reh",
	"w-reh-min", "w-reh-max", "n-w", "n-T", "T-min-GeV", "k-pivot-per-Mpc", "T0-K", "g-s0", "g-reh", "g-s-reh", "T-bbn-GeV"}

// flagKeys maps a reheating flag to its configuration key (markers such as
// --kination have none).
var flagKeys = map[string]string{
	"efolds": "N_star", "w-reh": "w_reh", "T-reh-GeV": "T_reh_GeV", "N-reh": "N_reh",
	"w-reh-min": "w_reh_min", "w-reh-max": "w_reh_max", "n-w": "n_w", "n-T": "n_T", "T-min-GeV": "T_min_GeV",
	"k-pivot-per-Mpc": "k_pivot_per_Mpc", "T0-K": "T_0_K", "g-s0": "g_s0", "g-reh": "g_reh", "g-s-reh": "g_s_reh",
	"T-bbn-GeV": "T_bbn_GeV",
}

func contains(list []string, s string) bool {
	for _, e := range list {
		if e == s {
			return true
		}
	}
	return false
}

func dashed(names []string) string {
	out := make([]string, len(names))
	for i, n := range names {
		out[i] = "--" + n
	}
	return strings.Join(out, " and ")
}

// History returns the reheating history the given flags select, or a
// usage error naming the flags that cannot go together or are missing.
func (o *Options) History() (string, error) {
	var given []string
	for _, f := range historyFlags {
		if o.Given[f] {
			given = append(given, f)
		}
	}
	var complete, partial []history
	for _, h := range histories {
		fits := true
		for _, f := range given {
			if !contains(h.own, f) {
				fits = false
				break
			}
		}
		if !fits {
			continue
		}
		missing := false
		for _, r := range h.required {
			if !o.Given[r] {
				missing = true
			}
		}
		if missing {
			partial = append(partial, h)
		} else {
			complete = append(complete, h)
		}
	}
	if len(complete) == 1 {
		return complete[0].name, nil
	}
	if len(complete) == 0 && len(partial) > 0 {
		// Name the first given flag that selects a history.
		first := given[0]
		for _, f := range given {
			if !contains(thermalFlags, f) {
				first = f
				break
			}
		}
		var alts []string
		for _, h := range partial {
			var miss []string
			for _, r := range h.required {
				if !o.Given[r] {
					miss = append(miss, r)
				}
			}
			alts = append(alts, dashed(miss)+" (history "+h.name+")")
		}
		return "", fmt.Errorf("--%s needs %s", first, strings.Join(alts, " or "))
	}
	// No history takes every given flag: name two that do not go together.
	of := func(f string) []string {
		var hs []string
		for _, h := range histories {
			if contains(h.own, f) {
				hs = append(hs, h.name)
			}
		}
		return hs
	}
	for i, a := range given {
		for _, b := range given[i+1:] {
			shared := false
			for _, h := range histories {
				if contains(h.own, a) && contains(h.own, b) {
					shared = true
				}
			}
			if !shared {
				return "", fmt.Errorf("--%s and --%s cannot be combined: --%s belongs to the history %s, --%s to %s",
					a, b, a, strings.Join(of(a), ", "), b, strings.Join(of(b), ", "))
			}
		}
	}
	return "", fmt.Errorf("%s cannot be combined in one reheating history", dashed(given))
}

// check refuses what the configuration's checks cannot put in flag terms:
// a non-finite number in any flag, and flags that only make sense
// together.
func (o *Options) check() error {
	for _, f := range []struct {
		name string
		v    []float64
	}{
		{"origin", []float64{o.Origin}}, {"domain", o.Domain}, {"field-range", o.FieldRange},
		{"end-phi", []float64{o.EndPhi}}, {"A_s", []float64{o.As}}, {"efolds", []float64{o.Efolds}},
		{"w-reh", []float64{o.WReh}}, {"T-reh-GeV", []float64{o.TRehGeV}}, {"N-reh", []float64{o.NReh}},
		{"w-reh-min", []float64{o.WRehMin}}, {"w-reh-max", []float64{o.WRehMax}}, {"T-min-GeV", []float64{o.TMinGeV}},
		{"k-pivot-per-Mpc", []float64{o.KPivot}}, {"T0-K", []float64{o.T0K}}, {"g-s0", []float64{o.GS0}},
		{"g-reh", []float64{o.GReh}}, {"g-s-reh", []float64{o.GSReh}}, {"T-bbn-GeV", []float64{o.TBBNGeV}},
	} {
		if !o.Given[f.name] {
			continue
		}
		for _, x := range f.v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("--%s %g: want a finite number", f.name, x)
			}
		}
	}
	switch {
	case (o.Family == "") == (o.Potential == ""):
		return errors.New("give --family or --potential (one of them)")
	case o.Family != "":
		for _, f := range []string{"kinetic", "domain", "origin", "field"} {
			if o.Given[f] {
				return fmt.Errorf("--%s is for a user-written --potential, not with --family", f)
			}
		}
	case o.Kinetic == "":
		for _, f := range []string{"domain", "origin"} {
			if o.Given[f] {
				return fmt.Errorf("--%s needs --kinetic (the domain and origin of a non-canonical field)", f)
			}
		}
	}
	if o.Given["end-phi"] && o.End != "field" {
		return errors.New("--end-phi needs --end field")
	}
	if o.End == "field" && !o.Given["end-phi"] {
		return errors.New("--end field needs --end-phi (the canonical field value [M_p] where inflation ends)")
	}
	if o.Given["label"] && strings.TrimSpace(o.Label) == "" {
		return errors.New("--label: want a non-empty label")
	}
	for _, f := range []struct {
		name string
		v    []float64
	}{{"domain", o.Domain}, {"field-range", o.FieldRange}} {
		if o.Given[f.name] && len(f.v) != 2 {
			return fmt.Errorf("--%s: want lo,hi", f.name)
		}
	}
	return nil
}

// source names the flag behind each configuration key path.
type source map[string]string

// Config writes the options as a study configuration, with the flag each
// key came from. Only given flags are written: the rest take the
// configuration's defaults.
func (o *Options) Config() (string, source, error) {
	if o.Given == nil {
		o.Given = map[string]bool{}
	}
	kind, err := o.History()
	if err != nil {
		return "", nil, err
	}
	src := source{
		"slow_roll.method": "--method", "slow_roll.end": "--end", "slow_roll.end_phi": "--end-phi",
		"normalisation.A_s": "--A_s", "reheating[0]": historyFlag(kind), "reheating[0].history": historyFlag(kind),
	}
	var b strings.Builder
	title := o.Family
	if title == "" {
		title = "user-written potential"
	}
	fmt.Fprintf(&b, "# written by inflatrace predict\ntitle = %s\n\n", strconv.Quote("predict "+title))
	fmt.Fprintf(&b, "[slow_roll]\nmethod = %s\n", strconv.Quote(o.Method))
	if o.End != "" {
		fmt.Fprintf(&b, "end = %s\n", strconv.Quote(o.End))
	}
	if o.Given["end-phi"] {
		fmt.Fprintf(&b, "end_phi = %s\n", tomlFloat(o.EndPhi))
	}
	fmt.Fprintf(&b, "\n[normalisation]\nA_s = %s\n\n", tomlFloat(o.As))

	fmt.Fprintf(&b, "[[reheating]]\nhistory = %s\n", strconv.Quote(kind))
	values := map[string]string{
		"efolds": tomlFloat(o.Efolds), "w-reh": tomlFloat(o.WReh), "T-reh-GeV": tomlFloat(o.TRehGeV),
		"N-reh": tomlFloat(o.NReh), "w-reh-min": tomlFloat(o.WRehMin), "w-reh-max": tomlFloat(o.WRehMax),
		"n-w": strconv.Itoa(o.NW), "n-T": strconv.Itoa(o.NT), "T-min-GeV": tomlFloat(o.TMinGeV),
		"k-pivot-per-Mpc": tomlFloat(o.KPivot), "T0-K": tomlFloat(o.T0K), "g-s0": tomlFloat(o.GS0),
		"g-reh": tomlFloat(o.GReh), "g-s-reh": tomlFloat(o.GSReh), "T-bbn-GeV": tomlFloat(o.TBBNGeV),
	}
	for _, f := range historyFlags {
		key, ok := flagKeys[f]
		if !ok || !o.Given[f] {
			continue
		}
		fmt.Fprintf(&b, "%s = %s\n", key, values[f])
		src["reheating[0]."+key] = "--" + f
	}
	b.WriteString("\n")

	constraints := o.Constrain
	if len(o.Constrain) == 0 && len(o.ConFiles) == 0 {
		constraints = []string{DefaultConstraint}
	}
	if err := writeSets(&b, src, "constraint", constraints, o.ConFiles); err != nil {
		return "", nil, err
	}
	if err := writeSets(&b, src, "forecast", o.Forecasts, o.ForeFiles); err != nil {
		return "", nil, err
	}

	m := "model[0]"
	if o.Family != "" {
		fmt.Fprintf(&b, "[[model]]\nfamily = %s\n", strconv.Quote(o.Family))
		src[m], src[m+".family"] = "--family "+o.Family, "--family "+o.Family
	} else {
		fmt.Fprintf(&b, "[[model]]\npotential = %s\nfield = %s\n", strconv.Quote(o.Potential), strconv.Quote(o.Field))
		src[m], src[m+".potential"], src[m+".field"] = "--potential", "--potential", "--field"
		if o.Kinetic != "" {
			fmt.Fprintf(&b, "kinetic = %s\norigin = %s\n", strconv.Quote(o.Kinetic), tomlFloat(o.Origin))
			src[m+".kinetic"], src[m+".origin"] = "--kinetic", "--origin"
		}
		if o.Domain != nil {
			fmt.Fprintf(&b, "domain = [%s, %s]\n", tomlFloat(o.Domain[0]), tomlFloat(o.Domain[1]))
			src[m+".domain"] = "--domain"
		}
	}
	if o.Given["label"] {
		fmt.Fprintf(&b, "label = %s\n", strconv.Quote(o.Label))
		src[m+".label"] = "--label"
	}
	seen := map[string]bool{}
	params := append([]string(nil), o.Params...)
	sort.Strings(params)
	for _, p := range params {
		k, v, ok := strings.Cut(p, "=")
		k, v = strings.TrimSpace(k), strings.TrimSpace(v)
		if !ok || k == "" || v == "" {
			return "", nil, fmt.Errorf("--param %q: want name=value", p)
		}
		if !validKey(k) {
			return "", nil, fmt.Errorf("--param %q: invalid parameter name %q", p, k)
		}
		if reservedKeys[k] {
			return "", nil, fmt.Errorf("--param %s: %q is not a parameter (give it with its own flag)", p, k)
		}
		if seen[k] {
			return "", nil, fmt.Errorf("--param %s given twice", k)
		}
		seen[k] = true
		fmt.Fprintf(&b, "%s = %s\n", k, strconv.Quote(v))
		src[m+"."+k] = "--param " + k
	}
	if o.FieldRange != nil {
		fmt.Fprintf(&b, "field_range = [%s, %s]\n", tomlFloat(o.FieldRange[0]), tomlFloat(o.FieldRange[1]))
		src[m+".field_range"] = "--field-range"
	}
	return b.String(), src, nil
}

// reservedKeys are model keys that are not parameters.
var reservedKeys = map[string]bool{"family": true, "label": true, "field_range": true, "combine": true,
	"potential": true, "kinetic": true, "field": true, "domain": true, "origin": true}

// table records that a table and its keys come from one flag.
func (s source) table(path, flag string) {
	s[path], s[path+".use"], s[path+".file"] = flag, flag, flag
}

// historyFlag names the flags that chose a history.
func historyFlag(kind string) string {
	switch kind {
	case "fixed-efolds":
		return "--efolds"
	case "temperature":
		return "--w-reh/--T-reh-GeV"
	case "duration":
		return "--w-reh/--N-reh"
	case "kination":
		return "--kination"
	case "band":
		return "--band"
	}
	return "--instantaneous"
}

// flagError turns a complaint about the written configuration into one
// about the flag that supplied the key.
func (s source) flagError(err error) error {
	var ce *study.ConfigError
	if !errors.As(err, &ce) || ce.File != ConfigName {
		return err // an error in a named file (a constraint or forecast file) names it
	}
	for p := ce.Path; p != ""; {
		if flag, ok := s[p]; ok {
			return fmt.Errorf("%s: %s", flag, ce.Msg)
		}
		i := strings.LastIndexAny(p, ".[")
		if i < 0 {
			break
		}
		p = p[:i]
	}
	if ce.Path != "" {
		return fmt.Errorf("predict: %s: %s", ce.Path, ce.Msg)
	}
	return fmt.Errorf("predict: %s", ce.Msg)
}

// writeSets writes one [[table]] entry per shipped name (flag --table) and
// per file (flag --table-file, by absolute path), and records which flag
// gave each entry so that errors name it.
func writeSets(b *strings.Builder, src source, table string, uses, files []string) error {
	n := 0
	for _, c := range uses {
		fmt.Fprintf(b, "[[%s]]\nuse = %s\n\n", table, strconv.Quote(c))
		src.table(fmt.Sprintf("%s[%d]", table, n), "--"+table+" "+c)
		n++
	}
	for _, f := range files {
		abs, err := filepath.Abs(f)
		if err != nil {
			return fmt.Errorf("--%s-file %s: %w", table, f, err)
		}
		fmt.Fprintf(b, "[[%s]]\nfile = %s\n\n", table, strconv.Quote(abs))
		src.table(fmt.Sprintf("%s[%d]", table, n), "--"+table+"-file "+f)
		n++
	}
	return nil
}

// tomlFloat writes x as a TOML float (nan and inf spelt as TOML spells
// them, though check refuses them before).
func tomlFloat(x float64) string {
	switch {
	case math.IsNaN(x):
		return "nan"
	case math.IsInf(x, 1):
		return "inf"
	case math.IsInf(x, -1):
		return "-inf"
	}
	s := strconv.FormatFloat(x, 'g', -1, 64)
	if !strings.ContainsAny(s, ".eE") {
		s += ".0"
	}
	return s
}

func validKey(k string) bool {
	for _, r := range k {
		if !(r == '_' || r == '-' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9') {
			return false
		}
	}
	return true
}

// Study checks the options and returns the study they describe; every
// error is a usage error naming the flag.
func (o *Options) Study() (*study.Study, error) {
	if o.Given == nil {
		o.Given = map[string]bool{}
	}
	if err := o.check(); err != nil {
		return nil, app.Usage(err)
	}
	text, src, err := o.Config()
	if err != nil {
		return nil, app.Usage(err)
	}
	s, err := study.Parse(ConfigName, []byte(text), ".")
	if err != nil {
		return nil, app.Usage(src.flagError(err))
	}
	return s, nil
}

// Run predicts, records and prints the results (one per constraint set
// and forecast).
func Run(ctx context.Context, o *Options) error {
	s, err := o.Study()
	if err != nil {
		return err
	}
	out, err := o.Env.ExecuteStudy(ctx, o.Globals, s, 1)
	if out == nil {
		return err
	}
	if len(out.Results) == 0 {
		return fmt.Errorf("predict: the run gave no result")
	}
	if o.JSON {
		// Each result carries its N of RUN#N, as the text table's # column
		// numbers it; a failed result has none.
		row := 0
		for i := range out.Results {
			if out.Results[i].Error == "" {
				row++
				out.Results[i].Row = row
			}
		}
		var v any = out.Results
		if len(out.Results) == 1 {
			v = out.Results[0]
		}
		if jerr := app.JSON(o.Env.Stdout, v); jerr != nil {
			return jerr
		}
		return err
	}
	if terr := o.Env.Table(o.Env.Stdout, app.ResultHeader, app.ResultRows(out.Results)); terr != nil {
		return terr
	}
	return err
}
