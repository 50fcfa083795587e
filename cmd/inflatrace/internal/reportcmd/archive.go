package reportcmd

import (
	"context"

	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/stages/study"
)

// ArchiveExtra writes the tables (archiveTables) and figures
// (archiveFigures) of a run into an export folder.
func ArchiveExtra(l func() (*ledger.Ledger, error)) func(ctx context.Context, dir string, run ledger.RunDetail, results []study.Result) error {
	return func(ctx context.Context, dir string, run ledger.RunDetail, results []study.Result) error {
		if err := archiveTables(dir, results); err != nil {
			return err
		}
		led, err := l()
		if err != nil {
			return err
		}
		defer led.Close()
		return archiveFigures(ctx, led, dir, run, results)
	}
}
