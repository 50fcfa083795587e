// Package exportcmd implements "inflatrace export RUN --out FILE.tar.gz|DIR"
// and "inflatrace import FILE|DIR": release archives of one run, checked
// against their manifest on import and merged without duplicating nodes.
package exportcmd

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Options are the parsed flags and arguments of export and import.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Run     string
	Out     string
	From    string
	// MaxSize caps the total size of an imported archive's files.
	MaxSize Size
}

// Extra writes further files (tables, figures) of a run into an archive
// folder; the root command supplies it so that this package does not
// depend on the renderers.
type Extra func(ctx context.Context, dir string, run ledger.RunDetail, results []study.Result) error

// NewExportCmd returns the export command.
func NewExportCmd(env *app.Env, g *app.Globals, extra Extra) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "export RUN --out FILE.tar.gz|DIR",
		Short: "Archive a run: configuration, results, figures, its own ledger and a manifest of SHA-256 sums",
		Args:  cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Run = args[0]
			if opts.Out == "" {
				return app.Usage(errors.New("--out is required"))
			}
			return Export(c.Context(), opts, extra)
		},
	}
	cmd.Flags().StringVar(&opts.Out, "out", "", "archive to write: a path ending in .tar.gz or .tgz, or a new folder")
	return cmd
}

// NewImportCmd returns the import command.
func NewImportCmd(env *app.Env, g *app.Globals) *cobra.Command {
	opts := &Options{Env: env, Globals: g, MaxSize: Size(archive.DefaultMaxBytes)}
	cmd := &cobra.Command{
		Use:   "import FILE.tar.gz|DIR [--max-size SIZE]",
		Short: "Check an archive against its manifest and merge its ledger into this one",
		Args:  cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.From = args[0]
			return Import(c.Context(), opts)
		},
	}
	cmd.Flags().Var(&opts.MaxSize, "max-size", "refuse an archive whose files total more than SIZE (bytes, or with a unit: 500MB, 2GiB)")
	return cmd
}

func isTarball(p string) bool { return strings.HasSuffix(p, ".tar.gz") || strings.HasSuffix(p, ".tgz") }

// Export writes the archive.
func Export(ctx context.Context, o *Options, extra Extra) error {
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	run, results, err := app.LoadRun(ctx, l, o.Run)
	if err != nil {
		return err
	}
	id := run.ID
	dir := o.Out
	if isTarball(o.Out) {
		if _, err := os.Stat(o.Out); err == nil {
			return app.Usage(fmt.Errorf("%s already exists", o.Out))
		}
		if dir, err = os.MkdirTemp("", "inflatrace-export-"); err != nil {
			return err
		}
		defer os.RemoveAll(dir)
	} else {
		if entries, err := os.ReadDir(dir); err == nil && len(entries) > 0 {
			return app.Usage(fmt.Errorf("folder %s is not empty", dir))
		}
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return err
		}
	}
	if err := os.WriteFile(filepath.Join(dir, "config.toml"), []byte(run.ConfigText), 0o644); err != nil {
		return err
	}
	f, err := os.Create(filepath.Join(dir, "results.json"))
	if err != nil {
		return err
	}
	err = app.JSON(f, map[string]any{"run": id, "tool_version": run.ToolVersion, "config_hash": run.ConfigHash, "results": results})
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return err
	}
	if extra != nil {
		if err := extra(ctx, dir, run, results); err != nil {
			return err
		}
	}
	if _, err := l.ExportRun(ctx, id, filepath.Join(dir, archive.LedgerName)); err != nil {
		return err
	}
	// The exported ledger's WAL side files are checkpointed on close;
	// none may remain in the archive.
	for _, side := range []string{"-wal", "-shm"} {
		os.Remove(filepath.Join(dir, archive.LedgerName+side))
	}
	m, err := archive.WriteManifest(dir, app.Version, id, o.Env.Now())
	if err != nil {
		return err
	}
	if isTarball(o.Out) {
		if err := archive.Pack(dir, o.Out, run.Started); err != nil {
			return err
		}
	}
	fmt.Fprintf(o.Env.Stderr, "exported run %s to %s: %d files\n", id, o.Out, len(m.Files)+1)
	return nil
}

// Import checks an archive and merges its ledger. Only the archive's
// ledger is written to disk (into a private temporary folder, removed
// whatever happens); every other file is hashed as it streams by. Nothing
// is merged unless every file matches the manifest.
func Import(ctx context.Context, o *Options) error {
	info, err := os.Stat(o.From)
	switch {
	case err != nil:
		return app.Usage(fmt.Errorf("import %s: %w", o.From, err))
	case !info.IsDir() && !isTarball(o.From):
		return app.Usage(fmt.Errorf("import %s: neither a folder nor a .tar.gz or .tgz file", o.From))
	}
	tmp, err := os.MkdirTemp("", "inflatrace-import-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	lim := archive.Limits{MaxBytes: o.MaxSize.bytes()}
	keep := []string{archive.LedgerName}
	var m archive.Manifest
	if info.IsDir() {
		m, err = archive.VerifyDir(o.From, tmp, keep, lim)
	} else {
		m, err = archive.VerifyTar(o.From, tmp, keep, lim)
	}
	if err != nil {
		return refuse(err)
	}
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	// An archive whose ledger is not one (the manifest can vouch only for
	// its bytes) is refused before any SQLite code reads it.
	copyPath := filepath.Join(tmp, archive.LedgerName)
	if ok, err := ledger.LooksLikeLedger(copyPath); err != nil {
		return err
	} else if !ok {
		return refuse(&archive.TamperError{Archive: o.From, File: archive.LedgerName, Msg: "not an inflatrace ledger (no SQLite header with inflatrace's application id)"})
	}
	rep, err := l.Merge(ctx, copyPath)
	if err != nil {
		return refuse(err)
	}
	fmt.Fprintf(o.Env.Stderr, "imported run %s (inflatrace %s) from %s: %d run(s), %d node(s) new; %d node(s) already here\n",
		m.Run, m.ToolVersion, o.From, rep.Runs, rep.Nodes, rep.NodesKept)
	return nil
}

// refuse marks an archive refused on integrity or size as a refusal
// (exit 3), keeping its own message; a size refusal names the flag that
// raises the limit. Other errors (I/O, a full disk) pass unchanged.
func refuse(err error) error {
	var te *archive.TamperError
	var tl *archive.TooLargeError
	switch {
	case errors.As(err, &tl):
		return &refusal{fmt.Errorf("%w; import --max-size SIZE raises the limit", err)}
	case errors.As(err, &te) || errors.Is(err, ledger.ErrIntegrity):
		return &refusal{err}
	}
	return err
}

// refusal is an archive refused. Its message is the refusal's own; to
// app.ExitCode it is an *app.RunFailedError (exit 3), through the As
// method errors.As consults.
type refusal struct{ err error }

func (r *refusal) Error() string { return r.err.Error() }
func (r *refusal) Unwrap() error { return r.err }

// As lets errors.As see a refusal as the *app.RunFailedError of exit 3.
func (r *refusal) As(target any) bool {
	if p, ok := target.(**app.RunFailedError); ok {
		*p = &app.RunFailedError{Run: pipeline.RunID("import"), Failed: 1, First: r.err}
		return true
	}
	return false
}

// Size is a byte count given as a flag: plain bytes, or with a decimal
// (MB) or binary (MiB) unit (archive.ParseSize).
type Size int64

// String writes the size as it is shown in help.
func (s *Size) String() string { return archive.FormatSize(s.bytes()) }

// Set parses a flag value.
func (s *Size) Set(v string) error {
	n, err := archive.ParseSize(v)
	if err != nil {
		return err
	}
	*s = Size(n)
	return nil
}

// Type names the value in help.
func (s *Size) Type() string { return "SIZE" }

func (s *Size) bytes() int64 {
	if s == nil || *s <= 0 {
		return archive.DefaultMaxBytes
	}
	return int64(*s)
}
