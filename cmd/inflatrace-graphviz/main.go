// Command inflatrace-graphviz renders DOT read from stdin with Graphviz
// (compiled to WebAssembly by github.com/goccy/go-graphviz) and writes the
// result to stdout: "inflatrace-graphviz -T svg" or "-T plain" (node and
// edge coordinates). It is a separate program because that library
// compiles its WebAssembly module at start-up; linked into inflatrace it
// would slow down every command, not only "inflatrace graph".
package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"github.com/goccy/go-graphviz"
)

func main() {
	format := flag.String("T", "svg", "output format: svg or plain")
	flag.Parse()
	if err := render(os.Stdin, os.Stdout, *format); err != nil {
		fmt.Fprintln(os.Stderr, "inflatrace-graphviz:", err)
		os.Exit(1)
	}
}

func render(r io.Reader, w io.Writer, format string) error {
	var f graphviz.Format
	switch format {
	case "svg":
		f = graphviz.SVG
	case "plain":
		f = graphviz.Format("plain")
	default:
		return fmt.Errorf("unknown format %q (svg, plain)", format)
	}
	dot, err := io.ReadAll(r)
	if err != nil {
		return err
	}
	ctx := context.Background()
	g, err := graphviz.New(ctx)
	if err != nil {
		return err
	}
	defer g.Close()
	graph, err := graphviz.ParseBytes(dot)
	if err != nil {
		return fmt.Errorf("parse DOT: %w", err)
	}
	defer graph.Close()
	var buf bytes.Buffer
	if err := g.Render(ctx, graph, f, &buf); err != nil {
		return fmt.Errorf("render %s: %w", format, err)
	}
	_, err = w.Write(buf.Bytes())
	return err
}
