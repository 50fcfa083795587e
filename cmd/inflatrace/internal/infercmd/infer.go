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
}

// NewCmd returns the infer command; run, when not nil, replaces Run (for
// tests of the flags).
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	o := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "infer STUDY",
		Short: "Infer each [[inference]] of a study against its constraint sets: evidences, Bayes factors, intervals, predictive r, detection odds",
		Long: `infer evaluates the [[inference]] tables of a study: for each model family,
with a prior on each parameter (a value, {uniform = [lo, hi]} or
{log_uniform = [lo, hi]}) and on reheating (w_reh a value or
{uniform = [lo, hi]}; T_reh log-uniform between T_reh_min_GeV, the BBN
bound by default, and the point's instantaneous maximum), against each
Gaussian constraint set it names (every one by default). The integrals are
taken by a deterministic adaptive cubature to ln Z within "tolerance"
(0.01 by default), so a re-run gives the same bits; each inference is a
node of the ledger, reused when nothing it depends on changed.

The table has one row per inference and constraint set: ln Z with its
numerical error; ln B against the model marked reference = true, with its
grade on Jeffreys' scale; each free parameter's median and 68% credible
interval; N* and log10 T_reh/GeV (median, 68%); the 95% predictive range of
r; and for each [[forecast]] the probability of a 3 sigma detection of r.
JSON carries every recorded number with its error estimate.`,
		Args: func(_ *cobra.Command, args []string) error {
			if len(args) != 1 {
				return app.Usage(fmt.Errorf("give one STUDY file"))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Config = args[0]
			return run(cmd.Context(), o)
		},
	}
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
	s, err := study.Load(o.Config)
	if err != nil {
		return app.Usage(err)
	}
	if len(s.Inferences) == 0 {
		return app.Usage(fmt.Errorf("%s: no [[inference]] table (see inflatrace infer --help)", o.Config))
	}
	graph, err := s.InferenceGraph()
	if err != nil {
		return app.Usage(fmt.Errorf("%s: %w", o.Config, err))
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
