package reportcmd

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
	"github.com/inflatrace/inflatrace/stages/study"
)

// TableOptions are the parsed flags of table.
type TableOptions struct {
	Env     *app.Env
	Globals *app.Globals
	Run     string
	Format  string
	Columns []string
	Digits  int
	Exact   bool
	Out     string
}

// NewTableCmd returns the table command.
func NewTableCmd(env *app.Env, g *app.Globals) *cobra.Command {
	o := &TableOptions{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "table RUN [--format csv|json|markdown|latex] [--columns a,b,...] [--digits N] [--exact]",
		Short: "Write a run's results as a paper table (the LaTeX output is a complete tabular to \\input)",
		Long:  "Columns: " + strings.Join(tables.ColumnNames(), ", ") + ", or param.NAME for one model parameter.",
		Args:  cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o.Run = args[0]
			return Table(c.Context(), o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Format, "format", tables.Markdown, "csv, json, markdown or latex")
	f.StringSliceVar(&o.Columns, "columns", nil, "columns to write (default: "+strings.Join(tables.DefaultColumns, ",")+")")
	f.IntVar(&o.Digits, "digits", 0, fmt.Sprintf("significant digits (default %d)", tables.DefaultDigits))
	f.BoolVar(&o.Exact, "exact", false, "write every number exactly (shortest round-trip form)")
	f.StringVar(&o.Out, "out", "", "file to write (default stdout)")
	return cmd
}

// Table writes the table.
func Table(ctx context.Context, o *TableOptions) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	id, err := l.ResolveRun(ctx, o.Run)
	if err != nil {
		return err
	}
	results, err := app.RecordedResults(ctx, l, id)
	if err != nil {
		return err
	}
	w := o.Env.Stdout
	if o.Out != "" {
		f, err := os.Create(o.Out)
		if err != nil {
			return err
		}
		defer f.Close()
		w = f
	}
	if err := tables.Write(w, results, tables.Options{Format: o.Format, Columns: o.Columns, Digits: o.Digits, Exact: o.Exact}); err != nil {
		return app.Usage(err)
	}
	return nil
}

// archiveTables writes results.csv (exact) and results.tex of a run into
// an export folder.
func archiveTables(dir string, results []study.Result) error {
	for _, t := range []struct{ name, format string }{{"results.csv", tables.CSV}, {"results.tex", tables.LaTeX}} {
		f, err := os.Create(filepath.Join(dir, t.name))
		if err != nil {
			return err
		}
		cols := append([]string{"label"}, tables.DefaultColumns...)
		werr := tables.Write(f, results, tables.Options{Format: t.format, Columns: cols, Exact: t.format == tables.CSV})
		if cerr := f.Close(); werr == nil {
			werr = cerr
		}
		if werr != nil {
			return werr
		}
	}
	return nil
}
