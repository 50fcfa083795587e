// Package exportcmd implements "inflatrace export RUN --out FILE.tar.gz|DIR"
// and "inflatrace import FILE|DIR": release archives of one run, checked
// against their manifest on import and merged without duplicating nodes.
package exportcmd

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
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/infertable"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/sshsig"
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
	// AllowUnsigned and AllowUntrusted accept an archive without a
	// signature, or signed by a key the user does not trust.
	AllowUnsigned, AllowUntrusted bool
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
	cmd.Flags().BoolVar(&opts.AllowUnsigned, "allow-unsigned", false, "import an archive that carries no signature")
	cmd.Flags().BoolVar(&opts.AllowUntrusted, "allow-untrusted", false, "import an archive signed by a key you do not trust (not yours, not in allowed_signers)")
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
	// Signing a run the user has not vouched for would lend it their key.
	if why, marked, err := l.Unverified(ctx, id); err != nil {
		return err
	} else if marked {
		return &app.RunFailedError{Run: id, Failed: 1, First: fmt.Errorf("run %s is unverified (%s): \"inflatrace verify %s\" recomputes it before it can be exported under your signature", id, why, id)}
	}
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
	rec, err := recordOf(ctx, l, run, results)
	if err != nil {
		f.Close()
		return err
	}
	err = app.JSON(f, rec)
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
	signer, err := o.Env.SigningKey()
	if err != nil {
		return err
	}
	sig, err := sshsig.Sign(signer, archive.SignatureNamespace, m.Raw)
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(dir, archive.SignatureName), sig, 0o644); err != nil {
		return err
	}
	if isTarball(o.Out) {
		if err := archive.Pack(dir, o.Out, run.Started); err != nil {
			return err
		}
	}
	fmt.Fprintf(o.Env.Stderr, "exported run %s to %s: %d files, signed by %s\n", id, o.Out, len(m.Files)+2, sshsig.Fingerprint(signer.PublicKey()))
	fmt.Fprintf(o.Env.Stderr, "a referee checks it with OpenSSH: put the line\n  %s\ninto allowed_signers, then (in the unpacked archive)\n  ssh-keygen -Y verify -f allowed_signers -I %s -n %s -s %s < %s\n",
		sshsig.AllowedLine(o.Env.Principal(), signer.PublicKey()), o.Env.Principal(), archive.SignatureNamespace, archive.SignatureName, archive.ManifestName)
	return nil
}

// checkSignature checks an archive's signature of its manifest, and that
// its key is trusted, and describes the signer. An archive without a
// signature, or signed by a key the user does not trust, is refused
// unless the options allow it; a signature that does not match is always
// refused.
func checkSignature(o *Options, from string, m archive.Manifest) (string, bool, error) {
	if m.Signature == nil {
		if o.AllowUnsigned {
			return "unsigned (accepted: --allow-unsigned)", false, nil
		}
		return "", false, &TrustError{Archive: from, Msg: "it carries no signature (" + archive.SignatureName + "): --allow-unsigned imports it anyway"}
	}
	pub, err := sshsig.Verify(m.Signature, archive.SignatureNamespace, m.Raw)
	if err != nil {
		return "", false, &archive.TamperError{Archive: from, File: archive.SignatureName, Msg: err.Error() + ": the manifest was changed after it was signed, or the signature is not one"}
	}
	trusted, file, err := o.Env.TrustedSigners()
	if err != nil {
		return "", false, err
	}
	fp := sshsig.Fingerprint(pub)
	if s, ok := sshsig.Find(trusted, pub); ok {
		return "signed by " + s.Principals + " (" + fp + ")", true, nil
	}
	if o.AllowUntrusted {
		return "signed by " + fp + ", a key you do not trust (accepted: --allow-untrusted)", false, nil
	}
	return "", false, &TrustError{Archive: from,
		Msg: fmt.Sprintf("signed by %s, a key you do not trust: if it is the authors' key (compare the fingerprint with the one they published), add the line %q to %s, or pass --allow-untrusted",
			fp, sshsig.AllowedLine("authors", pub), file)}
}

// crossCheck compares the archive's results.json with what its own ledger
// records for the run: an archive whose files were edited consistently
// with its manifest (and signed again) but not with its ledger is refused.
func crossCheck(ctx context.Context, from, ledgerPath, resultsPath string, m archive.Manifest) error {
	want, err := os.ReadFile(resultsPath)
	if err != nil {
		return err
	}
	l, err := ledger.Open(ledgerPath)
	if err != nil {
		return err
	}
	defer l.Close()
	run, results, err := app.LoadRun(ctx, l, m.Run)
	if err != nil {
		return &archive.TamperError{Archive: from, File: archive.LedgerName, Msg: fmt.Sprintf("does not hold the run the manifest names (%s): %v", m.Run, err)}
	}
	rec, err := recordOf(ctx, l, run, results)
	if err != nil {
		return &archive.TamperError{Archive: from, File: archive.LedgerName, Msg: fmt.Sprintf("its run %s cannot be read back: %v", m.Run, err)}
	}
	var got bytes.Buffer
	if err := app.JSON(&got, rec); err != nil {
		return err
	}
	if !bytes.Equal(got.Bytes(), want) {
		return &archive.TamperError{Archive: from, File: "results.json", Msg: "differs from the results the archive's own ledger records for the run"}
	}
	return nil
}

// Checked is an archive that passed every check: its manifest, who signed
// it, and a checked copy of its ledger in a private folder (Close removes
// it).
type Checked struct {
	Manifest archive.Manifest
	Signed   string // "signed by NAME (SHA256:...)", or how it was accepted
	Trusted  bool   // signed by a trusted key
	Ledger   string
	tmp      string
}

// Close removes the checked copy.
func (c *Checked) Close() { os.RemoveAll(c.tmp) }

// Check checks an archive without importing it: every file against the
// manifest (sizes first, streaming, within the size limit), the manifest's
// signature and its key's trust, that its ledger is a ledger, that its
// results.json is what that ledger records, and every row of that ledger
// against its hashes and seals. Only the ledger and results.json are
// written to disk (into a private temporary folder); every other file is
// hashed as it streams by.
func Check(ctx context.Context, o *Options) (*Checked, error) {
	info, err := os.Stat(o.From)
	switch {
	case err != nil:
		return nil, app.Usage(fmt.Errorf("%s: %w", o.From, err))
	case !info.IsDir() && !isTarball(o.From):
		return nil, app.Usage(fmt.Errorf("%s: neither a folder nor a .tar.gz or .tgz file", o.From))
	}
	tmp, err := os.MkdirTemp("", "inflatrace-import-")
	if err != nil {
		return nil, err
	}
	c := &Checked{tmp: tmp, Ledger: filepath.Join(tmp, archive.LedgerName)}
	fail := func(err error) (*Checked, error) {
		c.Close()
		return nil, err
	}
	lim := archive.Limits{MaxBytes: o.MaxSize.bytes()}
	keep := []string{archive.LedgerName, "results.json"}
	if info.IsDir() {
		c.Manifest, err = archive.VerifyDir(o.From, tmp, keep, lim)
	} else {
		c.Manifest, err = archive.VerifyTar(o.From, tmp, keep, lim)
	}
	if err != nil {
		return fail(refuse(err))
	}
	if c.Signed, c.Trusted, err = checkSignature(o, o.From, c.Manifest); err != nil {
		return fail(refuse(err))
	}
	// An archive whose ledger is not one (the manifest can vouch only for
	// its bytes) is refused before any SQLite code reads it.
	if ok, err := ledger.LooksLikeLedger(c.Ledger); err != nil {
		return fail(err)
	} else if !ok {
		return fail(refuse(&archive.TamperError{Archive: o.From, File: archive.LedgerName, Msg: "not an inflatrace ledger (no SQLite header with inflatrace's application id)"}))
	}
	if err := crossCheck(ctx, o.From, c.Ledger, filepath.Join(tmp, "results.json"), c.Manifest); err != nil {
		return fail(refuse(err))
	}
	if err := auditCopy(ctx, o.From, c.Ledger); err != nil {
		return fail(refuse(err))
	}
	return c, nil
}

// auditCopy checks every row of an archive's ledger against its hashes,
// and every run against its seal.
func auditCopy(ctx context.Context, from, path string) error {
	l, err := ledger.Open(path)
	if err != nil {
		return err
	}
	defer l.Close()
	probs, err := l.Audit(ctx)
	if err != nil {
		return err
	}
	seals, _, err := l.SealProblems(ctx)
	if err != nil {
		return err
	}
	if probs = append(probs, seals...); len(probs) > 0 {
		return &archive.TamperError{Archive: from, File: archive.LedgerName, Msg: fmt.Sprintf("%d row(s) no longer match their hashes or seals; first: %s %s: %s", len(probs), probs[0].Table, probs[0].ID, probs[0].What)}
	}
	return nil
}

// Import checks an archive (Check) and merges its ledger. Nothing is
// merged unless every check passes.
func Import(ctx context.Context, o *Options) error {
	c, err := Check(ctx, o)
	if err != nil {
		return err
	}
	defer c.Close()
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	rep, err := l.Merge(ctx, c.Ledger)
	if err != nil {
		return refuse(err)
	}
	m := c.Manifest
	if c.Trusted {
		// Signed by a trusted key: its nodes may be reused.
		for _, id := range rep.Written {
			if _, err := l.Vouch(ctx, id); err != nil {
				return err
			}
		}
	} else {
		if err := l.MarkUnverified(ctx, pipeline.RunID(m.Run), "imported from "+o.From+", "+c.Signed); err != nil {
			return err
		}
		fmt.Fprintf(o.Env.Stderr, "run %s is marked unverified (its nodes are not reused) until \"inflatrace verify %s\" recomputes it\n", m.Run, m.Run)
	}
	fmt.Fprintf(o.Env.Stderr, "imported run %s (inflatrace %s) from %s, %s: %d run(s), %d node(s) new; %d node(s) already here\n",
		m.Run, m.ToolVersion, o.From, c.Signed, rep.Runs, rep.Nodes, rep.NodesKept)
	return nil
}

// TrustError refuses an archive whose signature is missing or made by a
// key the user does not trust (exit 3, like a tampered archive).
type TrustError struct{ Archive, Msg string }

func (e *TrustError) Error() string { return fmt.Sprintf("archive %s refused: %s", e.Archive, e.Msg) }

// refuse marks an archive refused on integrity or size as a refusal
// (exit 3), keeping its own message; a size refusal names the flag that
// raises the limit. Other errors (I/O, a full disk) pass unchanged.
func refuse(err error) error {
	var te *archive.TamperError
	var tl *archive.TooLargeError
	var tr *TrustError
	switch {
	case errors.As(err, &tr):
		return &refusal{err}
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

// recordOf is an archive's results.json for run: its results, or for a
// run of inferences the rows of its inference table (infertable).
func recordOf(ctx context.Context, l *ledger.Ledger, run ledger.RunDetail, results []study.Result) (map[string]any, error) {
	rec := map[string]any{"run": run.ID, "tool_version": run.ToolVersion, "config_hash": run.ConfigHash}
	rows, ok, err := infertable.Recorded(ctx, l, run.ID)
	if err != nil {
		return nil, err
	}
	if ok {
		rec["inferences"] = rows
		return rec, nil
	}
	rec["results"] = results
	return rec, nil
}
