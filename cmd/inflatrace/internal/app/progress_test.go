package app

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"github.com/inflatrace/inflatrace/pipeline"
)

// The line of progress inside nodes sums the reports of the nodes running
// and forgets a report once it ends, finished or not.
func TestInNodesSumsRunningReports(t *testing.T) {
	var w inNodes
	if s := w.String(); !strings.Contains(s, "nothing reported") {
		t.Errorf("no report: %q", s)
	}
	r1, end1 := w.start()
	r2, end2 := w.start()
	r1(10, 100)
	r2(30, 300)
	r1(40, 100)
	if s := w.String(); !strings.Contains(s, "inside 2 running nodes") || !strings.Contains(s, " 17%  70 / 400") {
		t.Errorf("two reports at 40/100 and 30/300: %q", s)
	}
	end1() // ended part-way (a failed band, say)
	if s := w.String(); !strings.Contains(s, "inside 1 running node:") || !strings.Contains(s, " 10%  30 / 300") {
		t.Errorf("one report left at 30/300: %q", s)
	}
	r2(300, 300)
	end2()
	if n, d, tot := w.running.Load(), w.done.Load(), w.total.Load(); n != 0 || d != 0 || tot != 0 {
		t.Errorf("after both ended: %d running, %d of %d", n, d, tot)
	}
}

// Off a terminal the progress leaves the context without a reporter, so
// that no stage spends anything reporting; on one it carries one.
func TestProgressReporterOnlyOnTerminal(t *testing.T) {
	var errb bytes.Buffer
	e := &Env{Stderr: &errb}
	ctx, onNode, end := e.progress(context.Background(), 10)
	if r, _ := pipeline.Progress(ctx); r != nil {
		t.Error("a reporter off a terminal")
	}
	onNode(pipeline.NodeOutcome{})
	end()
	if errb.Len() != 0 {
		t.Errorf("wrote %q off a terminal", errb.String())
	}
	e.StderrTerminal = true
	ctx, _, end = e.progress(context.Background(), 10)
	r, stop := pipeline.Progress(ctx)
	if r == nil {
		t.Fatal("no reporter on a terminal")
	}
	r(1, 2)
	stop()
	end()
}

// A console whose writer is no file, or a terminal reporting no size, is
// given 80 x 24: mpb draws no line in a height of 0.
func TestConsoleSizeFallback(t *testing.T) {
	c := newConsole(&bytes.Buffer{})
	if w, h, err := c.GetTermSize(); err != nil || w != 80 || h != 24 {
		t.Errorf("size %d x %d (%v), want 80 x 24", w, h, err)
	}
	var out bytes.Buffer
	c = newConsole(&out)
	c.WriteString("frame 1\n")
	c.Flush(1)
	c.WriteString("frame 2\n")
	c.Flush(1)
	if want := "frame 1\n\x1b[1A\x1b[Jframe 2\n"; out.String() != want {
		t.Errorf("wrote %q, want %q", out.String(), want)
	}
}
