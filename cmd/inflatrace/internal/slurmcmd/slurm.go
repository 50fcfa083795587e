// Package slurmcmd implements "inflatrace slurm CONFIG --tasks N": the
// scripts that run a study's shards as a Slurm job array, each into its own
// ledger, and a dependent job that merges them.
package slurmcmd

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/stages/study"
)

// MaxTasks is the largest job array written: Slurm's default MaxArraySize
// (1001) allows indices up to 1000, and sites often lower it.
const MaxTasks = 1000

// Options are the parsed flags of slurm.
type Options struct {
	Env       *app.Env
	Config    string
	Tasks     int
	Dir       string
	CPUs      int
	Time      string
	Mem       string
	Partition string
	Bin       string
}

// NewCmd returns the slurm command.
func NewCmd(env *app.Env) *cobra.Command {
	o := &Options{Env: env}
	cmd := &cobra.Command{
		Use:   "slurm CONFIG --tasks N [--dir DIR]",
		Short: "Write Slurm scripts: a job array running N shards, and a dependent merge job",
		Long: `slurm writes into DIR: scan.sbatch (a job array of N tasks; task I runs
"inflatrace run CONFIG --shard I/N" into DIR/shard-I.db), merge.sbatch (merges
every shard ledger into DIR/merged.db, refusing a missing or unfinished shard)
and submit.sh (submits the array, then the merge with --dependency=afterok and
--kill-on-invalid-dep=yes, so a failed shard cancels the merge instead of
leaving it pending). Paths are absolute. Run "bash DIR/submit.sh" on the
cluster's login node.`,
		Args: cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o.Config = args[0]
			return Run(c.Context(), o)
		},
	}
	f := cmd.Flags()
	f.IntVar(&o.Tasks, "tasks", 0, fmt.Sprintf("number of shards (array tasks), 1 to %d", MaxTasks))
	f.StringVar(&o.Dir, "dir", "", "folder for the scripts, logs and ledgers (default slurm-<config name>)")
	f.IntVar(&o.CPUs, "cpus", 2, "CPUs per task (and the run's -j)")
	f.StringVar(&o.Time, "time", "01:00:00", "time limit per task")
	f.StringVar(&o.Mem, "mem", "2G", "memory per task")
	f.StringVar(&o.Partition, "partition", "", "partition (default: the cluster's)")
	f.StringVar(&o.Bin, "bin", "", "inflatrace executable on the cluster (default: this one)")
	return cmd
}

func quote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

// Scripts returns the three scripts' texts.
func Scripts(bin, config, dir string, o *Options) (scan, merge, submit string) {
	n := strconv.Itoa(o.Tasks)
	var b strings.Builder
	b.WriteString("#!/usr/bin/env bash\n")
	b.WriteString("# Written by inflatrace slurm: one shard of the study per array task.\n")
	fmt.Fprintf(&b, "#SBATCH --job-name=inflatrace-scan\n#SBATCH --array=1-%s\n#SBATCH --cpus-per-task=%d\n#SBATCH --mem=%s\n#SBATCH --time=%s\n", n, o.CPUs, o.Mem, o.Time)
	fmt.Fprintf(&b, "#SBATCH --output=%s/logs/shard-%%a.out\n", dir)
	if o.Partition != "" {
		fmt.Fprintf(&b, "#SBATCH --partition=%s\n", o.Partition)
	}
	b.WriteString("set -euo pipefail\n")
	fmt.Fprintf(&b, "exec %s --ledger %s/shard-\"$SLURM_ARRAY_TASK_ID\".db run %s --shard \"$SLURM_ARRAY_TASK_ID\"/%s -j %d\n",
		quote(bin), quote(dir), quote(config), n, o.CPUs)
	scan = b.String()

	b.Reset()
	b.WriteString("#!/usr/bin/env bash\n")
	b.WriteString("# Written by inflatrace slurm: merges the shard ledgers once every task succeeded.\n")
	fmt.Fprintf(&b, "#SBATCH --job-name=inflatrace-merge\n#SBATCH --cpus-per-task=1\n#SBATCH --mem=%s\n#SBATCH --time=%s\n", o.Mem, o.Time)
	fmt.Fprintf(&b, "#SBATCH --output=%s/logs/merge.out\n", dir)
	if o.Partition != "" {
		fmt.Fprintf(&b, "#SBATCH --partition=%s\n", o.Partition)
	}
	b.WriteString("set -euo pipefail\n")
	fmt.Fprintf(&b, "shards=()\nfor i in $(seq 1 %s); do\n  f=%s/shard-$i.db\n  [ -s \"$f\" ] || { echo \"shard $i missing: $f\" >&2; exit 3; }\n  shards+=(\"$f\")\ndone\n", n, quote(dir))
	fmt.Fprintf(&b, "exec %s --ledger %s/merged.db merge \"${shards[@]}\"\n", quote(bin), quote(dir))
	merge = b.String()

	b.Reset()
	b.WriteString("#!/usr/bin/env bash\n# Written by inflatrace slurm: submit the shards, then the merge.\nset -euo pipefail\n")
	fmt.Fprintf(&b, "mkdir -p %s/logs\n", quote(dir))
	fmt.Fprintf(&b, "jid=$(sbatch --parsable %s/scan.sbatch)\njid=${jid%%%%;*}\n", quote(dir))
	fmt.Fprintf(&b, "mid=$(sbatch --parsable --dependency=afterok:\"$jid\" --kill-on-invalid-dep=yes %s/merge.sbatch)\n", quote(dir))
	b.WriteString("echo \"scan job $jid, merge job ${mid%%;*}\"\n")
	submit = b.String()
	return
}

// Run writes the scripts.
func Run(_ context.Context, o *Options) error {
	if o.Tasks < 1 || o.Tasks > MaxTasks {
		return app.Usage(fmt.Errorf("--tasks %d: want 1 to %d (a larger scan gives each task a bigger share)", o.Tasks, MaxTasks))
	}
	if o.CPUs < 1 {
		return app.Usage(errors.New("--cpus must be at least 1"))
	}
	s, err := study.Load(o.Config)
	if err != nil {
		return app.Usage(err)
	}
	if s.NumModels() < o.Tasks {
		return app.Usage(fmt.Errorf("%d tasks for %d model points: some shards would be empty", o.Tasks, s.NumModels()))
	}
	config, err := filepath.Abs(o.Config)
	if err != nil {
		return err
	}
	dir := o.Dir
	if dir == "" {
		dir = "slurm-" + strings.TrimSuffix(filepath.Base(o.Config), filepath.Ext(o.Config))
	}
	if dir, err = filepath.Abs(dir); err != nil {
		return err
	}
	bin := o.Bin
	if bin == "" {
		if bin, err = os.Executable(); err != nil {
			return err
		}
	}
	if err := os.MkdirAll(filepath.Join(dir, "logs"), 0o755); err != nil {
		return err
	}
	scan, merge, submit := Scripts(bin, config, dir, o)
	for name, text := range map[string]string{"scan.sbatch": scan, "merge.sbatch": merge, "submit.sh": submit} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o755); err != nil {
			return err
		}
	}
	fmt.Fprintf(o.Env.Stderr, "wrote %s/{scan.sbatch,merge.sbatch,submit.sh}: %d tasks over %d model points; submit with: bash %s/submit.sh\n",
		dir, o.Tasks, s.NumModels(), dir)
	return nil
}
