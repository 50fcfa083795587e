// Package infercmd implements "inflatrace infer": a study's [[inference]]
// tables evaluated as one recorded run (one node per inference and
// constraint set) and written as a table of evidences, Bayes factors
// against the reference model, credible intervals of the parameters, of
// N* and of the reheating temperature, the predictive range of r and the
// forecasts' detection odds.
package infercmd

import (
	"context"
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Options are the parsed flags of infer.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Config  string
	Format  string
	Digits  int
	Jobs    int
	// OneOff, when its Family is set, replaces the study file.
	OneOff OneOff
}

// NewCmd returns the infer command; run, when not nil, replaces Run (for
// tests of the flags).
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	o := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "infer (STUDY | --family NAME [--prior name=SPEC]... [reheating flags] [--constraint NAME]... [--forecast NAME]...)",
		Short: "Infer each [[inference]] of a study against its constraint sets: evidences, Bayes factors, intervals, predictive r, detection odds",
		Long: `infer evaluates the [[inference]] tables of a study: for each model family,
with a prior on each parameter (a value, {uniform = [lo, hi]} or
{log_uniform = [lo, hi]}) and on reheating (w_reh a value or
{uniform = [lo, hi]}; T_reh log-uniform between T_reh_min_GeV, the BBN
bound by default, and the point's instantaneous maximum), against each
constraint set it names, Gaussian or sample-based (every one by default),
or their product with independent = true. The integrals are
taken by a deterministic adaptive cubature to ln Z within "tolerance"
(0.01 by default), so a re-run gives the same bits; each inference is a
node of the ledger, reused when nothing it depends on changed.

The table has one row per inference and constraint set: ln Z with its
numerical error; ln B against the model marked reference = true, with its
grade on Jeffreys' scale; each free parameter's median and 68% credible
interval; N* and log10 T_reh/GeV (median, 68%); the 95% predictive range of
r; and for each [[forecast]] the probability of a 3 sigma detection of r.
JSON carries every recorded number with its error estimate.

Without a STUDY file, --family infers one model from flags: each
--prior is name=VALUE (a ratio such as 1/3 is fine), name=uniform:lo,hi
or name=log_uniform:lo,hi, and a parameter not given takes the family's
default; --w-reh, --N-reh and --efolds (N*) take VALUE or uniform:lo,hi.
The study the flags describe is recorded with the run (inflatrace show
RUN prints it, ready to be kept as a file).`,
		Example: `  inflatrace infer paper.toml --format latex
  inflatrace infer --family e-model --prior alpha=log_uniform:0.01,100 --constraint planck2018-bk18 --forecast litebird
  inflatrace infer --family starobinsky --w-reh uniform:0,1 --constraint act-dr6-bk18-2025`,
		Args: func(_ *cobra.Command, args []string) error {
			switch {
			case len(args) == 1 && o.OneOff.Family != "":
				return app.Usage(fmt.Errorf("give a STUDY file or --family, not both"))
			case len(args) > 1 || (len(args) == 0 && o.OneOff.Family == ""):
				return app.Usage(fmt.Errorf("give one STUDY file, or --family NAME for a one-off inference"))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			check := oneOffFlagsOnly
			if len(args) == 1 {
				o.Config, check = args[0], studyFlagsOnly
			}
			if err := check(cmd); err != nil {
				return err
			}
			return run(cmd.Context(), o)
		},
	}
	f := cmd.Flags()
	oo := &o.OneOff
	f.StringVar(&oo.Family, "family", "", "one-off inference: the model family (see inflatrace models)")
	f.StringArrayVar(&oo.Params, "prior", nil, "one-off: a parameter's prior, name=VALUE, name=uniform:lo,hi or name=log_uniform:lo,hi (repeatable)")
	f.StringVar(&oo.WReh, "w-reh", "", "one-off: w_reh as VALUE or uniform:lo,hi (default 0)")
	f.StringVar(&oo.NReh, "N-reh", "", "one-off: a prior on the e-folds of reheating instead of T_reh, VALUE or uniform:lo,hi")
	f.StringVar(&oo.NStar, "efolds", "", "one-off: a prior on N* itself (no reheating history), VALUE or uniform:lo,hi")
	f.StringVar(&oo.TMinGeV, "T-reh-min-GeV", "", "one-off: lowest T_reh of its log-uniform prior [GeV] (default: the BBN bound)")
	f.StringArrayVar(&oo.Constraints, "constraint", nil, "one-off: shipped constraint set (repeatable; default cmb-combined-2025)")
	f.StringArrayVar(&oo.CFiles, "constraint-file", nil, "one-off: constraint file, Gaussian or samples (repeatable)")
	f.StringArrayVar(&oo.Forecasts, "forecast", nil, "one-off: shipped forecast (repeatable)")
	f.StringArrayVar(&oo.FFiles, "forecast-file", nil, "one-off: forecast file (repeatable)")
	f.BoolVar(&oo.Independent, "independent", false, "one-off: the constraint sets are independent; infer against their product")
	f.StringVar(&oo.Tolerance, "tolerance", "", "one-off: target error of ln Z (default 0.01)")
	f.StringVar(&oo.Label, "label", "", "one-off: the inference's label (default: the family's name)")
	cmd.Flags().StringVar(&o.Format, "format", "text", "output format: text, markdown, csv, json or latex")
	cmd.Flags().IntVar(&o.Digits, "digits", 3, "significant digits in text, markdown and latex")
	cmd.Flags().IntVarP(&o.Jobs, "jobs", "j", 0, "inferences evaluated at once (default: one per CPU)")
	return cmd
}

// Run evaluates the study's inferences and writes the table.
func Run(ctx context.Context, o *Options) error {
	switch o.Format {
	case "text", "markdown", "csv", "json", "latex":
	default:
		return app.Usage(fmt.Errorf("--format %q: want text, markdown, csv, json or latex", o.Format))
	}
	if o.Digits < 1 || o.Digits > 17 {
		return app.Usage(fmt.Errorf("--digits %d: want 1 to 17", o.Digits))
	}
	if o.Jobs < 0 {
		return app.Usage(errors.New("--jobs must be at least 1"))
	}
	var s *study.Study
	var err error
	name := o.Config
	if o.OneOff.Family != "" {
		s, err = o.OneOff.Study()
		name = oneOffFile
	} else {
		s, err = study.Load(o.Config)
	}
	if err != nil {
		return app.Usage(err)
	}
	if len(s.Inferences) == 0 {
		return app.Usage(fmt.Errorf("%s: no [[inference]] table (see inflatrace infer --help)", o.Config))
	}
	graph, err := s.InferenceGraph()
	if err != nil {
		return app.Usage(fmt.Errorf("%s: %w", name, err))
	}
	out, err := o.Env.ExecuteGraph(ctx, o.Globals, s, graph, o.Jobs)
	var failed *app.RunFailedError
	if err != nil && !errors.As(err, &failed) {
		return err
	}
	rows := infertable.Rows(s, out.Outputs)
	if werr := infertable.Write(o.Env.Stdout, o.Format, o.Digits, out.Run, rows); werr != nil {
		return werr
	}
	return err
}

// oneOffNames are the flags that describe a one-off inference.
var oneOffNames = []string{"prior", "w-reh", "N-reh", "efolds", "T-reh-min-GeV", "constraint", "constraint-file", "forecast", "forecast-file", "independent", "tolerance", "label"}

// studyFlagsOnly refuses one-off flags beside a study file, which holds
// all of them itself.
func studyFlagsOnly(cmd *cobra.Command) error {
	for _, n := range append([]string{"family"}, oneOffNames...) {
		if cmd.Flags().Changed(n) {
			return app.Usage(fmt.Errorf("--%s describes a one-off inference: with a STUDY file, write it in the file's [[inference]] table", n))
		}
	}
	return nil
}

// oneOffFlagsOnly checks the one-off's flags against each other before
// they become a study: --N-reh and --efolds are two priors on the same
// e-folds, and one of them must go.
func oneOffFlagsOnly(cmd *cobra.Command) error {
	if cmd.Flags().Changed("N-reh") && cmd.Flags().Changed("efolds") {
		return app.Usage(errors.New("--N-reh and --efolds: give one (a prior on N_reh or on N* itself)"))
	}
	return nil
}
