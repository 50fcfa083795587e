// Package graphcmd implements "inflatrace graph RUN": the run's stage DAG
// as DOT, SVG or PNG.
package graphcmd

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/dag"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tracecmd"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Renderer is the name of the separate program that runs Graphviz.
const Renderer = "inflatrace-graphviz"

// RendererEnv names the renderer's path explicitly.
const RendererEnv = "INFLATRACE_GRAPHVIZ"

// Options are the parsed flags and arguments of graph.
type Options struct {
	Env     *app.Env
	Globals *app.Globals
	Run     string
	Format  string
	Out     string
	Result  string
}

// NewCmd returns the graph command. png renders the layout with the given
// function (nil: PNG unavailable).
func NewCmd(env *app.Env, g *app.Globals, png func(plain []byte, w io.Writer) error) *cobra.Command {
	opts := &Options{Env: env, Globals: g}
	cmd := &cobra.Command{
		Use:   "graph RUN [--format dot|svg|png] [--out FILE] [--result RUN#N|KEY]",
		Short: "Draw the run's stage graph: one node per stage execution, marked computed, reused or failed",
		Long: `graph writes the DOT language itself; SVG and PNG use Graphviz through the
separate program inflatrace-graphviz (build it with
"go build -o $(dirname $(which inflatrace)) ./cmd/inflatrace-graphviz", or name it
with $` + RendererEnv + `), so that Graphviz's start-up cost is paid by this command only.`,
		Args: cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Run = args[0]
			return Run(c.Context(), opts, png)
		},
	}
	cmd.Flags().StringVar(&opts.Format, "format", "dot", "dot, svg or png")
	cmd.Flags().StringVar(&opts.Out, "out", "", "file to write (default stdout)")
	cmd.Flags().StringVar(&opts.Result, "result", "", "highlight one result's lineage (RUN#N or a node key)")
	return cmd
}

// FindRenderer locates inflatrace-graphviz: $INFLATRACE_GRAPHVIZ, beside
// the running executable, or on PATH.
func FindRenderer(getenv func(string) string) (string, error) {
	if p := getenv(RendererEnv); p != "" {
		return p, nil
	}
	if exe, err := os.Executable(); err == nil {
		p := filepath.Join(filepath.Dir(exe), Renderer)
		if _, err := os.Stat(p); err == nil {
			return p, nil
		}
	}
	if p, err := exec.LookPath(Renderer); err == nil {
		return p, nil
	}
	return "", fmt.Errorf("%s not found (set $%s, or build it beside inflatrace: go build -o <dir of inflatrace> ./cmd/%s)", Renderer, RendererEnv, Renderer)
}

// Render runs the renderer on DOT.
func Render(ctx context.Context, renderer string, dot []byte, format string) ([]byte, error) {
	cmd := exec.CommandContext(ctx, renderer, "-T", format)
	cmd.Stdin = bytes.NewReader(dot)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		return nil, fmt.Errorf("%s -T %s: %v: %s", renderer, format, err, bytes.TrimSpace(errb.Bytes()))
	}
	return out.Bytes(), nil
}

// Run draws the graph.
func Run(ctx context.Context, o *Options, png func([]byte, io.Writer) error) error {
	switch o.Format {
	case "dot", "svg", "png":
	default:
		return app.Usage(fmt.Errorf("--format %q: want dot, svg or png", o.Format))
	}
	l, err := o.Env.OpenLedgerRead(o.Globals)
	if err != nil {
		return err
	}
	defer l.Close()
	id, err := l.ResolveRun(ctx, o.Run)
	if err != nil {
		return err
	}
	nodes, err := l.RunNodes(ctx, id)
	if err != nil {
		return err
	}
	opts := dag.Options{Title: "inflatrace run " + string(id)}
	if o.Result != "" {
		key, _, err := tracecmd.ResolveResult(ctx, l, o.Result)
		if err != nil {
			return err
		}
		lin, err := l.Lineage(ctx, key)
		if err != nil {
			return err
		}
		opts.Lineage = map[pipeline.KeyID]bool{}
		for _, n := range lin {
			opts.Lineage[n.Key] = true
		}
	}
	var dot bytes.Buffer
	if err := dag.Write(&dot, nodes, opts); err != nil {
		return err
	}
	var data []byte
	switch o.Format {
	case "dot":
		data = dot.Bytes()
	case "svg", "png":
		renderer, err := FindRenderer(o.Env.Getenv)
		if err != nil {
			return err
		}
		if o.Format == "svg" {
			if data, err = Render(ctx, renderer, dot.Bytes(), "svg"); err != nil {
				return err
			}
			break
		}
		if png == nil {
			return errors.New("PNG output is not available in this build")
		}
		plain, err := Render(ctx, renderer, dot.Bytes(), "plain")
		if err != nil {
			return err
		}
		var buf bytes.Buffer
		if err := png(plain, &buf); err != nil {
			return err
		}
		data = buf.Bytes()
	}
	if o.Out == "" {
		_, err = o.Env.Stdout.Write(data)
		return err
	}
	if err := os.WriteFile(o.Out, data, 0o644); err != nil {
		return err
	}
	fmt.Fprintf(o.Env.Stderr, "graph of run %s (%d nodes) written to %s\n", id, len(nodes), o.Out)
	return nil
}
