// Package root assembles inflatrace's command tree and maps errors to exit
// codes.
package root

import (
	"context"
	"errors"
	"fmt"
	"os/signal"
	"syscall"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/dag"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/diffcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/exportcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/graphcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infercmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/keycmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/mergecmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/modelscmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/predictcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/reportcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/runcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/runscmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/showcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/slurmcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tagcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tracecmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/verifycmd"
	"github.com/inflatrace/inflatrace/ledger"
)

// NewCmd returns the root command with every subcommand.
func NewCmd(env *app.Env) *cobra.Command {
	g := &app.Globals{}
	root := &cobra.Command{
		Use:   "inflatrace",
		Short: "Inflation models to CMB predictions, as a reproducible pipeline with a provenance ledger",
		Long: `inflatrace turns single-field inflation models into the numbers CMB data
test (N*, n_s, r, alpha_s, n_t, V*^1/4, H*), consistently with a reheating
history, compares them with published constraints, and records every result
with its inputs in an SQLite ledger so it can be regenerated and audited.`,
		Version:       app.Version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(env.Stdout)
	root.SetErr(env.Stderr)
	root.PersistentFlags().StringVar(&g.Ledger, "ledger", "",
		fmt.Sprintf("ledger file (default $%s, else ./%s)", app.LedgerEnv, app.DefaultLedger))
	root.SetFlagErrorFunc(func(_ *cobra.Command, err error) error { return app.Usage(err) })
	root.AddCommand(
		runcmd.NewCmd(env, g, nil),
		predictcmd.NewCmd(env, g, nil),
		runscmd.NewCmd(env, g, nil),
		showcmd.NewCmd(env, g, nil),
		modelscmd.NewCmd(env, nil),
		tagcmd.NewCmd(env, g, nil),
		tracecmd.NewCmd(env, g, nil),
		verifycmd.NewCmd(env, g, nil),
		diffcmd.NewCmd(env, g, nil),
		exportcmd.NewExportCmd(env, g, reportcmd.ArchiveExtra(func() (*ledger.Ledger, error) { return env.OpenLedger(g) })),
		mergecmd.NewCmd(env, g),
		slurmcmd.NewCmd(env),
		reportcmd.NewTableCmd(env, g),
		reportcmd.NewPlotCmd(env, g),
		exportcmd.NewImportCmd(env, g),
		graphcmd.NewCmd(env, g, dag.PNG),
		keycmd.NewCmd(env),
		infercmd.NewCmd(env, g, nil),
	)
	return root
}

// Main runs the command line and returns the exit code.
func Main(env *app.Env, args []string) int {
	ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGINT, syscall.SIGTERM)
	defer stop()
	return Execute(ctx, env, args)
}

// Execute runs the command line in ctx and returns the exit code; errors
// are printed to stderr.
func Execute(ctx context.Context, env *app.Env, args []string) int {
	root := NewCmd(env)
	root.SetArgs(args)
	err := root.ExecuteContext(ctx)
	if err != nil {
		fmt.Fprintf(env.Stderr, "inflatrace: %v\n", err)
		if errors.Is(err, ledger.ErrIntegrity) {
			fmt.Fprintln(env.Stderr, "inflatrace: the ledger holds rows edited after they were written: \"inflatrace verify --all\" lists them; "+
				"running a study that uses an edited node computes it again and rewrites its row (the row as found is kept in table quarantine)")
		}
		if isArgError(err) {
			return app.ExitUsage
		}
	}
	return app.ExitCode(err)
}
