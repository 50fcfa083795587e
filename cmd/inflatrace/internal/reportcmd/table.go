package reportcmd

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
	"github.com/inflatrace/inflatrace/stages/study"
)

// TableOptions are the parsed flags of table: the run, the file to write
// and the table's options.
type TableOptions struct {
	Env     *app.Env
	Globals *app.Globals
	Run     string
	Out     string
	tables.Options
}

// NewTableCmd returns the table command.
func NewTableCmd(env *app.Env, g *app.Globals) *cobra.Command {
	o := &TableOptions{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "table RUN [--format csv|json|markdown|latex] [--layout wide|long] [--columns a,b,...] [--where COND]... [--sort [-]COL,...] [--digits N] [--exact]",
		Short: "Write a run's results as a paper or data table (LaTeX: booktabs and siunitx, to \\input)",
		Long: "One row per prediction with a column group per constraint set and forecast (--layout wide, the default), or one row per result (--layout long).\n" +
			"Columns: " + strings.Join(tables.ColumnNames(), ", ") + ", or param.NAME for one model parameter;\n" +
			"in the wide layout a comparison column of one set is NAME[SET] in --where and --sort, and in CSV and JSON headers.\n" +
			"--where COLUMN OP VALUE (OP = != < <= > >=; numbers compared as numbers, text ignoring case; several are ANDed).\n" +
			"CSV and JSON write numbers exactly unless --digits is given; Markdown and LaTeX round to --digits (default " + fmt.Sprint(tables.DefaultDigits) + ").\n" +
			"A LaTeX table needs \\usepackage{" + strings.Join(tables.LaTeXPackages, ",") + "} in the document's preamble (longtable for --longtable only).",
		Args: cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o.Run = args[0]
			return Table(c.Context(), o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Format, "format", tables.Markdown, "csv, json, markdown or latex")
	f.StringVar(&o.Layout, "layout", tables.Wide, "wide (a row per prediction, a column group per constraint set) or long (a row per result)")
	f.StringSliceVar(&o.Columns, "columns", nil, "columns to write (default: "+strings.Join(tables.DefaultColumns, ",")+"; LaTeX: "+strings.Join(tables.DefaultLaTeXColumns, ",")+")")
	f.StringArrayVar(&o.Where, "where", nil, "keep rows where COLUMN OP VALUE holds, e.g. 'r<0.01' or 'model=t-model' (repeatable: all must hold)")
	f.StringSliceVar(&o.Sort, "sort", nil, "sort rows by columns, -COLUMN descending (stable; missing values last)")
	f.IntVar(&o.Digits, "digits", 0, fmt.Sprintf("significant digits (default: exact in csv and json, %d in markdown and latex)", tables.DefaultDigits))
	f.BoolVar(&o.Exact, "exact", false, "write every number exactly (shortest round-trip form)")
	f.BoolVar(&o.LongTable, "longtable", false, "LaTeX: a longtable, its head repeated on every page (for scans)")
	f.StringVar(&o.Caption, "caption", "", "LaTeX: the table's caption (LaTeX text)")
	f.StringVar(&o.Label, "label", "", "LaTeX: the table's \\label key")
	f.StringVar(&o.Out, "out", "", "file to write (default stdout)")
	return cmd
}

// Table writes the table. The whole table is made before --out is
// created, so that a bad option leaves no file behind.
func Table(ctx context.Context, o *TableOptions) error {
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	id, err := l.ResolveRun(ctx, o.Run)
	if err != nil {
		return err
	}
	var b bytes.Buffer
	if rows, ok, err := infertable.Recorded(ctx, l, id); err != nil {
		return err
	} else if ok {
		// A run of inferences: its own table (inflatrace infer's).
		digits := o.Options.Digits
		if digits == 0 {
			digits = 3
		}
		if err := infertable.Write(&b, o.Options.Format, digits, id, rows); err != nil {
			return err
		}
		return o.write(b.Bytes())
	}
	results, err := app.RecordedResults(ctx, l, id)
	if err != nil {
		return err
	}
	if err := tables.Write(&b, results, o.Options); err != nil {
		var oe *tables.OptionError
		if errors.As(err, &oe) {
			return app.Usage(err)
		}
		return err
	}
	return o.write(b.Bytes())
}

// write writes the finished table to --out or stdout.
func (o *TableOptions) write(b []byte) error {
	if o.Out == "" {
		_, err := o.Env.Stdout.Write(b)
		return err
	}
	if err := os.WriteFile(o.Out, b, 0o644); err != nil {
		return fmt.Errorf("table --out: %w", err)
	}
	return nil
}

// archiveTables writes a run's results as tables into an export folder:
// results.csv (exact numbers), results.md, results.tex (booktabs) and
// results-table.json (the table's columns; results.json beside it is the
// export's full record of each result), all in the wide layout with the
// default columns and the row label.
func archiveTables(dir string, results []study.Result) error {
	for _, t := range []struct{ name, format string }{
		{"results.csv", tables.CSV}, {"results-table.json", tables.JSON}, {"results.md", tables.Markdown}, {"results.tex", tables.LaTeX},
	} {
		cols := tables.DefaultColumns
		if t.format == tables.LaTeX {
			cols = tables.DefaultLaTeXColumns
		}
		if t.format != tables.LaTeX && t.format != tables.Markdown {
			cols = append([]string{"label"}, cols...)
		}
		var b bytes.Buffer
		if err := tables.Write(&b, results, tables.Options{Format: t.format, Columns: cols}); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, t.name), b.Bytes(), 0o644); err != nil {
			return err
		}
	}
	return nil
}
