package app

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"
	"golang.org/x/term"

	"github.com/inflatrace/inflatrace/pipeline"
)

// ProgressDelay is how long a run goes before its progress bar is drawn:
// a run that ends sooner leaves no bar behind.
var ProgressDelay = 300 * time.Millisecond

// progressRefresh is how often the bar is drawn again.
const progressRefresh = 150 * time.Millisecond

// progressAge is the number of recent nodes the bar's rate and time left
// are averaged over (exponentially weighted).
const progressAge = 60

// progress draws a progress bar on stderr when it is a terminal: nodes
// settled of total (an estimate, corrected at the end), rate, time left
// and time spent, and, once a node reports progress from inside (a
// reheating band, pipeline.WithProgress), a second line with the work
// done inside the nodes running. It returns ctx carrying the in-node
// reporter, the callback of settled nodes and the function that ends the
// bar. On anything but a terminal ctx is returned as it is and both
// functions do nothing: piped output stays clean.
func (e *Env) progress(ctx context.Context, total int) (context.Context, func(pipeline.NodeOutcome), func()) {
	if !e.StderrTerminal {
		return ctx, func(pipeline.NodeOutcome) {}, func() {}
	}
	delay := make(chan any)
	timer := time.AfterFunc(ProgressDelay, func() { close(delay) })
	p := mpb.New(mpb.WithConsoleWriter(newConsole(e.Stderr)), mpb.WithWidth(40),
		mpb.WithRefreshRate(progressRefresh), mpb.WithRenderDelay(delay))
	bar := p.AddBar(int64(max(total, 1)),
		mpb.PrependDecorators(decor.Name("nodes "), decor.CountersNoUnit("%d / %d")),
		mpb.AppendDecorators(decor.EwmaSpeed(0, " %.0f/s", progressAge), decor.Name("  ETA "), decor.EwmaETA(decor.ET_STYLE_GO, progressAge),
			decor.Name("  spent "), decor.Elapsed(decor.ET_STYLE_GO)),
	)
	w := &inNodes{}
	var line sync.Once
	var inside *mpb.Bar // the second line, once added
	starter := func() (pipeline.ProgressFunc, func()) {
		line.Do(func() {
			// Added by the first node that reports: most runs never
			// show it. It goes when the bar ends.
			inside, _ = p.Add(0, mpb.NopStyle().Build(), mpb.BarRemoveOnComplete(),
				mpb.PrependDecorators(decor.Any(func(decor.Statistics) string { return w.String() })))
		})
		return w.start()
	}
	// Rate and time left follow the recent nodes (their kinds differ by
	// orders of magnitude in cost): each node counts with the time since
	// the one before (OnNode is never called concurrently).
	last := time.Now()
	onNode := func(pipeline.NodeOutcome) {
		now := time.Now()
		bar.EwmaIncrement(now.Sub(last))
		last = now
	}
	return pipeline.WithProgress(ctx, starter), onNode, func() {
		timer.Stop()
		line.Do(func() {}) // what the first report did is seen here
		if inside != nil {
			inside.SetTotal(-1, true)
		}
		bar.SetTotal(-1, true)
		p.Wait()
	}
}

// inNodes sums the progress that running nodes report from inside: each
// report adds its done and total while it runs and takes them back when
// it ends.
type inNodes struct {
	running, done, total atomic.Int64
}

// start begins one node's report; its functions are called from the
// node's goroutine.
func (w *inNodes) start() (pipeline.ProgressFunc, func()) {
	w.running.Add(1)
	var done, total int64 // this report's share of w
	report := func(d, t int64) {
		w.done.Add(d - done)
		w.total.Add(t - total)
		done, total = d, t
	}
	end := func() {
		w.done.Add(-done)
		w.total.Add(-total)
		done, total = 0, 0
		w.running.Add(-1)
	}
	return report, end
}

// String is the second line of the bar: "  inside 1 running node:
// [=====>-----]  45%  4500000 / 10000000".
func (w *inNodes) String() string {
	n, done, total := w.running.Load(), w.done.Load(), w.total.Load()
	if n <= 0 || total <= 0 {
		return "  inside running nodes: nothing reported"
	}
	done = min(max(done, 0), total)
	const width = 30
	fill := int(int64(width) * done / total)
	b := strings.Repeat("=", fill)
	if fill < width {
		b += ">" + strings.Repeat("-", width-fill-1)
	}
	nodes := "nodes"
	if n == 1 {
		nodes = "node"
	}
	return fmt.Sprintf("  inside %d running %s: [%s] %3d%%  %d / %d", n, nodes, b, 100*done/total, done, total)
}

// console is the bar's writer: it keeps each frame, writes it whole, and
// moves back up over it before the next one, as mpb's own writer does,
// but it takes the terminal's size for 80 x 24 when the terminal reports
// none (a pseudo-terminal nobody sized reports 0 x 0, which mpb would
// take for room for no line at all, and draw nothing).
type console struct {
	bytes.Buffer
	out io.Writer
	fd  int // -1: out is not a file
}

func newConsole(out io.Writer) *console {
	c := &console{out: out, fd: -1}
	if f, ok := out.(*os.File); ok {
		c.fd = int(f.Fd())
	}
	return c
}

// IsTerminal is true: a console is made only for a terminal.
func (c *console) IsTerminal() bool { return true }

// GetTermSize returns the terminal's size, or 80 x 24 when it reports
// none.
func (c *console) GetTermSize() (width, height int, err error) {
	if c.fd >= 0 {
		if w, h, err := term.GetSize(c.fd); err == nil && w > 0 && h > 0 {
			return w, h, nil
		}
	}
	return 80, 24, nil
}

// Flush writes the frame held, then holds the request to move back up
// over its lines and clear them, written before the next frame.
func (c *console) Flush(lines int) error {
	if _, err := c.WriteTo(c.out); err != nil {
		return err
	}
	if lines > 0 {
		fmt.Fprintf(&c.Buffer, "\x1b[%dA\x1b[J", lines)
	}
	return nil
}
