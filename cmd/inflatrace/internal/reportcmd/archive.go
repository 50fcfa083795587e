package reportcmd

import (
	"bytes"
	"context"
	"os"
	"path/filepath"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/figures"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
)

// ArchiveExtra writes the tables (archiveTables) and figures
// (archiveFigures) of a run into an export folder; for a run of
// inferences, its inference table (archiveInferenceTables).
func ArchiveExtra(l func() (*ledger.Ledger, error)) func(ctx context.Context, dir string, run ledger.RunDetail, results []study.Result) error {
	return func(ctx context.Context, dir string, run ledger.RunDetail, results []study.Result) error {
		led, err := l()
		if err != nil {
			return err
		}
		defer led.Close()
		rows, ok, err := infertable.Recorded(ctx, led, run.ID)
		if err != nil {
			return err
		}
		if ok {
			if err := archiveInferenceTables(dir, run.ID, rows); err != nil {
				return err
			}
			built, err := inferenceFigures(run, rows)
			if err != nil {
				return err
			}
			return saveBuilt(filepath.Join(dir, "figures"), built)
		}
		if err := archiveTables(dir, results); err != nil {
			return err
		}
		return archiveFigures(ctx, led, dir, run, results)
	}
}

// archiveInferenceTables writes a run of inferences' table into an export
// folder: results.csv (exact numbers), results.md and results.tex.
func archiveInferenceTables(dir string, run pipeline.RunID, rows []infertable.Row) error {
	for _, t := range []struct{ name, format string }{{"results.csv", "csv"}, {"results.md", "markdown"}, {"results.tex", "latex"}} {
		var b bytes.Buffer
		if err := infertable.Write(&b, t.format, 3, run, rows); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, t.name), b.Bytes(), 0o644); err != nil {
			return err
		}
	}
	return nil
}

// saveBuilt writes figures into dir in every format.
func saveBuilt(dir string, built []Built) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for _, format := range figures.Formats {
		for _, b := range built {
			if err := figures.Save(b.Figure, filepath.Join(dir, b.Name+"."+format)); err != nil {
				return err
			}
		}
	}
	return nil
}
