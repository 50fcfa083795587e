package app

import (
	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"

	"github.com/inflatrace/inflatrace/pipeline"
)

// progress returns a callback that advances a progress bar (nodes done of
// total, rate and ETA) on stderr, and a function that closes it. On
// anything but a terminal both do nothing: piped output stays clean.
func (e *Env) progress(total int) (func(pipeline.NodeOutcome), func()) {
	if !e.StderrTerminal || total < 200 {
		return func(pipeline.NodeOutcome) {}, func() {}
	}
	p := mpb.New(mpb.WithOutput(e.Stderr), mpb.WithWidth(40))
	bar := p.AddBar(int64(total),
		mpb.PrependDecorators(decor.Name("nodes "), decor.CountersNoUnit("%d / %d")),
		mpb.AppendDecorators(decor.AverageSpeed(0, " %.0f/s"), decor.Name("  ETA "), decor.AverageETA(decor.ET_STYLE_GO)),
	)
	return func(pipeline.NodeOutcome) { bar.Increment() }, func() {
		bar.SetTotal(-1, true)
		p.Wait()
	}
}
