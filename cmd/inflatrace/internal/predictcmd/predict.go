// Package predictcmd implements "inflatrace predict": one model's
// prediction from flags, without a configuration file. The flags are
// written into an equivalent study configuration, which is recorded with
// the run, so the prediction can be regenerated with "inflatrace run".
package predictcmd

import (
	"context"
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/stages/study"
)

// DefaultConstraint is the constraint set predict compares with.
const DefaultConstraint = "cmb-combined-2025"

// Options are the parsed flags of predict.
type Options struct {
	Env        *app.Env
	Globals    *app.Globals
	Family     string
	Params     []string // k=v
	Efolds     float64  // 0: not given
	Instant    bool
	Constraint string
	As         float64
	FieldRange []float64
	Method     string
	End        string
	Potential  string
	Kinetic    string
	Field      string
	Domain     []float64
	Origin     float64
	JSON       bool
}

// NewCmd returns the predict command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "predict (--family NAME | --potential EXPR [--kinetic EXPR] --field-range lo,hi) [--param k=v]... [--efolds N | --instantaneous]",
		Short: "Predict one model without a configuration file (and record it)",
		Example: `  inflatrace predict --family e-model --param alpha=1 --efolds 55 --json
  inflatrace predict --family t-model --param alpha=7/3 --instantaneous
  inflatrace predict --potential "(chi^2/(6*a))" --kinetic "1/(1-chi^2/(6*a))^2" --field chi \
      --domain=-2.449,2.449 --field-range 0.01,2.4489 --param a=1 --efolds 55`,
		Args: cobra.NoArgs,
		RunE: func(c *cobra.Command, _ []string) error {
			if c.Flags().Changed("efolds") && opts.Efolds <= 0 {
				return app.Usage(errors.New("--efolds must be positive"))
			}
			return run(c.Context(), opts)
		},
	}
	f := cmd.Flags()
	f.StringVar(&opts.Family, "family", "", "model family (see README for the list)")
	f.StringArrayVar(&opts.Params, "param", nil, "family parameter as name=value; value may be a ratio such as 1/3 (repeatable)")
	f.Float64Var(&opts.Efolds, "efolds", 0, "fixed number of e-folds N* of the pivot before the end of inflation")
	f.BoolVar(&opts.Instant, "instantaneous", false, "solve N* for instantaneous reheating (the default without --efolds)")
	f.StringVar(&opts.Constraint, "constraint", DefaultConstraint, "shipped constraint set to compare with")
	f.Float64Var(&opts.As, "A_s", 2.1e-9, "scalar amplitude the potential is normalised to")
	f.Float64SliceVar(&opts.FieldRange, "field-range", nil, "canonical field range lo,hi [M_p] searched for inflation")
	f.StringVar(&opts.Method, "method", "first", "slow-roll method: first, second or exact")
	f.StringVar(&opts.End, "end", "", "end of inflation: epsilon_V=1, epsilon_H=1 (second, exact) or eta_V=1 (default: epsilon_V=1 at first order, epsilon_H=1 otherwise)")
	f.BoolVar(&opts.JSON, "json", false, "print the result as one JSON object")
	f.StringVar(&opts.Potential, "potential", "", "a user-written potential V(field), e.g. \"(1 - exp(-sqrt(2/3)*phi))^2\" (instead of --family)")
	f.StringVar(&opts.Kinetic, "kinetic", "", "a user-written kinetic function K(field); the canonical field is computed numerically")
	f.StringVar(&opts.Field, "field", "phi", "the field's name in --potential and --kinetic")
	f.Float64SliceVar(&opts.Domain, "domain", nil, "the open domain lo,hi of the field (with --kinetic; default unbounded)")
	f.Float64Var(&opts.Origin, "origin", 0, "the field value where the canonical field is 0 (with --kinetic)")
	return cmd
}

// Config writes the options as a study configuration.
func (o *Options) Config() (string, error) {
	if o.Efolds > 0 && o.Instant {
		return "", errors.New("give --efolds or --instantaneous, not both")
	}
	var b strings.Builder
	fmt.Fprintf(&b, "# written by inflatrace predict\ntitle = %s\n\n", strconv.Quote("predict "+o.Family))
	fmt.Fprintf(&b, "[slow_roll]\nmethod = %s\n", strconv.Quote(o.Method))
	if o.End != "" {
		fmt.Fprintf(&b, "end = %s\n", strconv.Quote(o.End))
	}
	fmt.Fprintf(&b, "\n[normalisation]\nA_s = %s\n\n", strconv.FormatFloat(o.As, 'g', -1, 64))
	if o.Efolds > 0 {
		fmt.Fprintf(&b, "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = %s\n\n", tomlFloat(o.Efolds))
	} else {
		b.WriteString("[[reheating]]\nhistory = \"instantaneous\"\n\n")
	}
	fmt.Fprintf(&b, "[[constraint]]\nuse = %s\n\n", strconv.Quote(o.Constraint))
	switch {
	case (o.Family == "") == (o.Potential == ""):
		return "", errors.New("give --family or --potential (one of them)")
	case o.Family != "":
		fmt.Fprintf(&b, "[[model]]\nfamily = %s\n", strconv.Quote(o.Family))
	default:
		fmt.Fprintf(&b, "[[model]]\npotential = %s\nfield = %s\n", strconv.Quote(o.Potential), strconv.Quote(o.Field))
		if o.Kinetic != "" {
			fmt.Fprintf(&b, "kinetic = %s\norigin = %s\n", strconv.Quote(o.Kinetic), tomlFloat(o.Origin))
		}
		if o.Domain != nil {
			if len(o.Domain) != 2 {
				return "", errors.New("--domain: want lo,hi")
			}
			fmt.Fprintf(&b, "domain = [%s, %s]\n", tomlFloat(o.Domain[0]), tomlFloat(o.Domain[1]))
		}
	}
	seen := map[string]bool{}
	params := append([]string(nil), o.Params...)
	sort.Strings(params)
	for _, p := range params {
		k, v, ok := strings.Cut(p, "=")
		k, v = strings.TrimSpace(k), strings.TrimSpace(v)
		if !ok || k == "" || v == "" {
			return "", fmt.Errorf("--param %q: want name=value", p)
		}
		if !validKey(k) {
			return "", fmt.Errorf("--param %q: invalid parameter name %q", p, k)
		}
		if seen[k] {
			return "", fmt.Errorf("--param %s given twice", k)
		}
		seen[k] = true
		fmt.Fprintf(&b, "%s = %s\n", k, strconv.Quote(v))
	}
	if o.FieldRange != nil {
		if len(o.FieldRange) != 2 {
			return "", errors.New("--field-range: want lo,hi")
		}
		fmt.Fprintf(&b, "field_range = [%s, %s]\n", tomlFloat(o.FieldRange[0]), tomlFloat(o.FieldRange[1]))
	}
	return b.String(), nil
}

func tomlFloat(x float64) string {
	s := strconv.FormatFloat(x, 'g', -1, 64)
	if !strings.ContainsAny(s, ".eEn") {
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

// Run predicts, records and prints one result.
func Run(ctx context.Context, o *Options) error {
	text, err := o.Config()
	if err != nil {
		return app.Usage(err)
	}
	s, err := study.Parse("predict flags", []byte(text), ".")
	if err != nil {
		return app.Usage(err)
	}
	out, err := o.Env.ExecuteStudy(ctx, o.Globals, s, 1)
	if out == nil {
		return err
	}
	if len(out.Results) != 1 {
		return fmt.Errorf("predict: expected one result, got %d", len(out.Results))
	}
	r := out.Results[0]
	if o.JSON {
		if jerr := app.JSON(o.Env.Stdout, r); jerr != nil {
			return jerr
		}
		return err
	}
	if terr := o.Env.Table(o.Env.Stdout, app.ResultHeader, app.ResultRows(out.Results)); terr != nil {
		return terr
	}
	return err
}
