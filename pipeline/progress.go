package pipeline

import "context"

// ProgressFunc receives the progress of one long computation inside a
// node (the histories of a reheating band, say): done of total units,
// done never decreasing. It is called from the goroutine that started the
// report, and must be cheap: a stage may call it once per unit.
type ProgressFunc func(done, total int64)

// ProgressStarter starts the report of one computation inside a node and
// returns where the computation reports its progress and the function
// that ends the report, called once, whether the computation finished or
// failed.
type ProgressStarter func() (report ProgressFunc, end func())

type progressKey struct{}

// WithProgress returns a copy of ctx carrying start, so that the stages
// run under it (Session.Execute passes its context to every Run) can
// report progress from inside their nodes. Reporting is output only: a
// stage's outputs must not depend on whether, or to whom, it reports.
func WithProgress(ctx context.Context, start ProgressStarter) context.Context {
	return context.WithValue(ctx, progressKey{}, start)
}

// Progress starts a report on the starter ctx carries (WithProgress).
// Without one, report is nil (stage numerics take nil for none) and end
// does nothing.
func Progress(ctx context.Context) (report ProgressFunc, end func()) {
	if start, ok := ctx.Value(progressKey{}).(ProgressStarter); ok && start != nil {
		return start()
	}
	return nil, func() {}
}
