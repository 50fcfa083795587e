// Package verifycmd implements "inflatrace verify": recompute a run's
// nodes with the cache bypassed and compare output hashes, or (--ledger)
// re-derive every stored hash and report rows edited after they were
// written.
package verifycmd

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/exportcmd"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/sshsig"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// Options are the parsed flags and arguments of verify.
type Options struct {
	Env       *app.Env
	Globals   *app.Globals
	Run       string
	Ledger    bool
	Tolerance float64
	JSON      bool
	// For an archive: accept it unsigned, or signed by an untrusted key.
	AllowUnsigned, AllowUntrusted bool
}

// NewCmd returns the verify command.
func NewCmd(env *app.Env, g *app.Globals, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "verify [RUN | ARCHIVE | --all]",
		Short: "Recompute a run and compare output hashes, or audit every stored hash",
		Long: `verify RUN recomputes every node of the run from its recorded parameters and
its inputs' recorded outputs, with the cache bypassed, and reports each node as
identical, equal within --tolerance (relative, with the largest difference), or
different, saying whether the stage or the tool version changed since.
verify --all re-derives every stored key and output hash and reports rows
edited after they were written. verify ARCHIVE (a .tar.gz, or a folder, that
export wrote) checks a release as import does, without importing it: every
file against the manifest, the manifest's signature and whether you trust its
key, its results against its own ledger, and that ledger's every row and seal.
Exit code 3 when anything differs.`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.Run = args[0]
			}
			if (opts.Run == "") == !opts.Ledger {
				return app.Usage(fmt.Errorf("give a RUN or --all"))
			}
			return run(c.Context(), opts)
		},
	}
	cmd.Flags().BoolVar(&opts.Ledger, "all", false, "audit the whole ledger: re-derive every stored hash")
	cmd.Flags().Float64Var(&opts.Tolerance, "tolerance", 1e-12, "relative tolerance for \"equal within tolerance\"")
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the report as JSON")
	cmd.Flags().BoolVar(&opts.AllowUnsigned, "allow-unsigned", false, "ARCHIVE: accept an archive that carries no signature")
	cmd.Flags().BoolVar(&opts.AllowUntrusted, "allow-untrusted", false, "ARCHIVE: accept an archive signed by a key you do not trust")
	return cmd
}

// Verdicts of a node.
const (
	Identical = "identical"
	Within    = "within-tolerance"
	Different = "different"
	Skipped   = "skipped"
)

// NodeReport is the JSON shape of one node's verdict.
type NodeReport struct {
	Stage   string   `json:"stage"`
	Key     string   `json:"key"`
	Verdict string   `json:"verdict"`
	MaxRel  float64  `json:"max_rel_diff,omitempty"`
	Worst   string   `json:"worst,omitempty"`
	Changed []string `json:"changed,omitempty"`
	Why     string   `json:"why,omitempty"`
}

// IsArchive says whether a verify argument names a release archive (a
// .tar.gz or .tgz file, or a folder holding a manifest) rather than a run.
func IsArchive(arg string) bool {
	if strings.HasSuffix(arg, ".tar.gz") || strings.HasSuffix(arg, ".tgz") {
		return true
	}
	_, err := os.Stat(filepath.Join(arg, archive.ManifestName))
	return err == nil
}

// Archive checks a release archive as import does, without importing it.
func Archive(ctx context.Context, o *Options) error {
	ao := &exportcmd.Options{Env: o.Env, Globals: o.Globals, From: o.Run, MaxSize: exportcmd.Size(archive.DefaultMaxBytes),
		AllowUnsigned: o.AllowUnsigned, AllowUntrusted: o.AllowUntrusted}
	c, err := exportcmd.Check(ctx, ao)
	if err != nil {
		return err
	}
	defer c.Close()
	m := c.Manifest
	if o.JSON {
		return app.JSON(o.Env.Stdout, map[string]any{"archive": o.Run, "run": m.Run, "tool_version": m.ToolVersion, "files": len(m.Files), "signature": c.Signed, "verdict": "intact"})
	}
	fmt.Fprintf(o.Env.Stdout, "archive %s: intact: run %s (inflatrace %s), %d files as listed, %s; its results match its ledger, and every ledger row its hashes and seals\n",
		o.Run, m.Run, m.ToolVersion, len(m.Files), c.Signed)
	return nil
}

// Run verifies.
func Run(ctx context.Context, o *Options) error {
	if o.Run != "" && IsArchive(o.Run) {
		return Archive(ctx, o)
	}
	l, err := o.Env.OpenLedger(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	if o.Ledger {
		probs, err := l.Audit(ctx)
		if err != nil {
			return err
		}
		sealProbs, unsealed, err := l.SealProblems(ctx)
		if err != nil {
			return err
		}
		probs = append(probs, sealProbs...)
		sigProbs, err := checkSealSignatures(ctx, o, l)
		if err != nil {
			return err
		}
		probs = append(probs, sigProbs...)
		macProbs, without, err := l.MACProblems(ctx)
		if err != nil {
			return err
		}
		probs = append(probs, macProbs...)
		if without > 0 {
			fmt.Fprintf(o.Env.Stderr, "%d node(s) carry no authentication code of yours (merged from runs you have not vouched for, or written before codes): a run computes them again rather than reuse them\n", without)
		}
		if len(unsealed) > 0 {
			fmt.Fprintf(o.Env.Stderr, "%d finished run(s) carry no seal (finished before seals): their node rows are checked, their run rows cannot be\n", len(unsealed))
		}
		if o.JSON {
			if err := app.JSON(o.Env.Stdout, map[string]any{"problems": probs}); err != nil {
				return err
			}
		} else {
			for _, p := range probs {
				fmt.Fprintf(o.Env.Stdout, "%s\t%s\t%s\n", p.Table, p.ID, p.What)
			}
		}
		fmt.Fprintf(o.Env.Stderr, "ledger %s: %d row(s) no longer match their hashes\n", l.Path(), len(probs))
		if len(probs) > 0 {
			return &app.RunFailedError{Run: "ledger", Failed: len(probs), First: fmt.Errorf("%s %s: %s", probs[0].Table, probs[0].ID, probs[0].What)}
		}
		return nil
	}
	id, err := l.ResolveRun(ctx, o.Run)
	if err != nil {
		return err
	}
	run, err := l.Run(ctx, id)
	if err != nil {
		return err
	}
	links, err := l.RunNodes(ctx, id)
	if err != nil {
		return err
	}
	stages := nodes.Stages()
	outputs := map[pipeline.KeyID]pipeline.Values{}
	var reports []NodeReport
	counts := map[string]int{}
	for _, ln := range links {
		rec := ln.NodeRecord
		rep := NodeReport{Stage: rec.Stage, Key: string(rec.Key)}
		st, ok := stages[rec.Stage]
		switch {
		case rec.Status != pipeline.NodeOK:
			rep.Verdict, rep.Why = Skipped, "recorded as failed: "+rec.Error
		case !ok:
			rep.Verdict, rep.Why = Different, "stage "+rec.Stage+" no longer exists"
		default:
			ins := make([]pipeline.Values, len(rec.Inputs))
			for i, in := range rec.Inputs {
				v, ok := outputs[in.Key]
				if !ok {
					up, found, err := l.Node(ctx, in.Key)
					if err != nil || !found {
						return fmt.Errorf("verify %s: input %s: %v", rec.Key, in.Key, err)
					}
					v = up.Outputs
				}
				ins[i] = v
			}
			out, hash, err := pipeline.Replay(ctx, st, rec, ins)
			switch {
			case err != nil:
				rep.Verdict, rep.Why = Different, "recomputation fails: "+err.Error()
			case hash == rec.OutputHash:
				rep.Verdict = Identical
			default:
				d := pipeline.Compare(rec.Outputs, out)
				rep.MaxRel, rep.Worst, rep.Changed = d.MaxRel, d.Worst, d.Changed
				rep.Verdict = Different
				if !d.Structural && d.MaxRel <= o.Tolerance {
					rep.Verdict = Within
				}
			}
			if rep.Verdict != Identical {
				if v := st.Spec().Version; v != rec.Version {
					rep.Why = fmt.Sprintf("stage %s version changed: recorded v%d, now v%d", rec.Stage, rec.Version, v)
				} else if run.ToolVersion != app.Version {
					rep.Why = fmt.Sprintf("tool version changed: recorded %s, now %s", run.ToolVersion, app.Version)
				} else if rep.Why == "" {
					rep.Why = "same stage and tool version: the stage is not deterministic, or the ledger row was edited"
				}
			}
			outputs[rec.Key] = rec.Outputs
		}
		counts[rep.Verdict]++
		reports = append(reports, rep)
	}
	sealed, sealProblem, err := l.CheckSeal(ctx, id)
	if err != nil {
		return err
	}
	sealText := "intact"
	switch {
	case !sealed:
		sealText = "none (finished before seals, or still running)"
	case sealProblem != nil:
		sealText = "broken: " + sealProblem.What
	}
	if o.JSON {
		if err := app.JSON(o.Env.Stdout, map[string]any{"run": id, "tolerance": o.Tolerance, "counts": counts, "nodes": reports, "seal": sealText}); err != nil {
			return err
		}
	} else {
		rows := make([][]string, len(reports))
		for i, r := range reports {
			detail := r.Why
			if r.Verdict == Within || (r.Verdict == Different && r.Worst != "") {
				detail = fmt.Sprintf("max rel %.3g in %s; %s", r.MaxRel, r.Worst, r.Why)
			}
			rows[i] = []string{r.Stage, pipeline.KeyID(r.Key).Short(), r.Verdict, detail}
		}
		if err := o.Env.Table(o.Env.Stdout, []string{"stage", "key", "verdict", "detail"}, rows); err != nil {
			return err
		}
	}
	fmt.Fprintf(o.Env.Stderr, "verify %s: %d identical, %d within tolerance %g, %d different, %d skipped\n",
		id, counts[Identical], counts[Within], o.Tolerance, counts[Different], counts[Skipped])
	fmt.Fprintf(o.Env.Stderr, "verify %s: seal %s\n", id, sealText)
	if sealProblem != nil {
		return &app.RunFailedError{Run: id, Failed: 1, First: fmt.Errorf("run %s: %s", id, sealProblem.What)}
	}
	if counts[Different] > 0 {
		return &app.RunFailedError{Run: id, Failed: counts[Different], First: fmt.Errorf("recomputed outputs differ")}
	}
	// Every node recomputed as recorded, the seal intact: the run's nodes
	// earn this user's authentication codes.
	if _, err := l.Vouch(ctx, id); err != nil && sealed {
		return err
	}
	if why, marked, err := l.Unverified(ctx, id); err != nil {
		return err
	} else if marked {
		if err := l.ClearUnverified(ctx, id); err != nil {
			return err
		}
		fmt.Fprintf(o.Env.Stderr, "verify %s: every node recomputed as recorded: the run is no longer marked unverified (it was %s)\n", id, why)
	}
	return nil
}

// checkSealSignatures checks every seal's signature: one that does not
// sign the stored seal is a problem (the seal was rewritten after it was
// signed); runs sealed without a key, or by keys the user does not trust,
// are reported on stderr.
func checkSealSignatures(ctx context.Context, o *Options, l *ledger.Ledger) ([]ledger.Problem, error) {
	sealed, err := l.Sealed(ctx)
	if err != nil {
		return nil, err
	}
	trusted, file, err := o.Env.TrustedSigners()
	if err != nil {
		return nil, err
	}
	var probs []ledger.Problem
	unsigned := 0
	untrusted := map[string]int{}
	for _, s := range sealed {
		if s.Signature == "" {
			unsigned++
			continue
		}
		pub, err := app.SealSigner(s.Run, s.Seal, s.Signature)
		if err != nil {
			probs = append(probs, ledger.Problem{Table: "runs", ID: string(s.Run),
				What: "the seal's signature does not sign the stored seal: the seal was rewritten after it was signed (" + err.Error() + ")"})
			continue
		}
		if !app.Trusted(trusted, pub) {
			untrusted[sshsig.Fingerprint(pub)]++
		}
	}
	if unsigned > 0 {
		fmt.Fprintf(o.Env.Stderr, "%d sealed run(s) carry no seal signature (sealed before seals were signed): a consistent edit of their rows and seal would not show\n", unsigned)
	}
	for fp, n := range untrusted {
		fmt.Fprintf(o.Env.Stderr, "%d run(s) sealed by %s, a key you do not trust (add its line to %s if it is a colleague's)\n", n, fp, file)
	}
	return probs, nil
}
