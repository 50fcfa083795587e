package ledger

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"github.com/inflatrace/inflatrace/pipeline"
)

// A running run holds an exclusive lock on a file of its own beside the
// ledger, <ledger>.runlocks/<run id>, for as long as its process lives:
// the operating system releases the lock when the process ends, however it
// ends (kill -9 included), and no other process can hold it meanwhile, so
// a free lock proves the run's process gone even where its pid has been
// reused. A lock file that is missing (a run of an older version, a
// folder another host does not share) leaves the decision to the process
// check and the heartbeat.

// lockState is what a run's lock file says of its process.
type lockState int

const (
	lockAbsent lockState = iota // no lock file: ask the process and the heartbeat
	lockHeld                    // another process holds it: the run is alive
	lockFree                    // the file is there and nobody holds it: the run's process is gone
)

// RunLock is a held run lock; Release lets it go.
type RunLock struct {
	f    *os.File
	path string
}

// lockDir is the folder of a ledger's run locks, there only while a run
// holds one or a killed run left its file.
func (l *Ledger) lockDir() string { return l.path + ".runlocks" }

// lockPath is the lock file of run.
func (l *Ledger) lockPath(run pipeline.RunID) string {
	return filepath.Join(l.lockDir(), string(run))
}

// HoldRunLock takes run's lock for the life of this process (until
// Release). Call it before BeginRun, so that the run is never recorded as
// running without its lock.
func (l *Ledger) HoldRunLock(run pipeline.RunID) (*RunLock, error) {
	if l.readOnly {
		return nil, fmt.Errorf("ledger: lock of run %s: %w", run, ErrReadOnly)
	}
	p := l.lockPath(run)
	var f *os.File
	// The folder goes when its last lock is released (Release), so
	// another run may remove it between these two steps: try again.
	for try := 0; ; try++ {
		if err := os.MkdirAll(l.lockDir(), 0o755); err != nil {
			return nil, fmt.Errorf("ledger: lock of run %s: %w", run, err)
		}
		var err error
		f, err = os.OpenFile(p, os.O_RDWR|os.O_CREATE, 0o644)
		if err == nil {
			break
		}
		if !errors.Is(err, os.ErrNotExist) || try == 10 {
			return nil, fmt.Errorf("ledger: lock of run %s: %w", run, err)
		}
	}
	held, err := tryLock(f)
	if err != nil || !held {
		f.Close()
		if err == nil {
			err = errors.New("held by another process")
		}
		return nil, fmt.Errorf("ledger: lock of run %s (%s): %w", run, p, err)
	}
	return &RunLock{f: f, path: p}, nil
}

// Release removes the lock file and lets the lock go. Call it after the
// run is finished in the ledger: until then its lock says it is alive.
func (r *RunLock) Release() error {
	if r == nil || r.f == nil {
		return nil
	}
	err := os.Remove(r.path)
	if cerr := r.f.Close(); err == nil {
		err = cerr
	}
	r.f = nil
	os.Remove(filepath.Dir(r.path)) // only if empty: other runs' locks keep it
	if err != nil && !errors.Is(err, os.ErrNotExist) {
		return fmt.Errorf("ledger: release lock %s: %w", r.path, err)
	}
	return nil
}

// runLock reports the state of run's lock; the probe's own brief hold of
// a free lock is let go before it returns.
func (l *Ledger) runLock(run pipeline.RunID) lockState {
	f, err := os.OpenFile(l.lockPath(run), os.O_RDWR, 0)
	if err != nil {
		return lockAbsent
	}
	defer f.Close()
	held, err := tryLock(f)
	switch {
	case err != nil:
		return lockAbsent // locks unsupported here: the process and the heartbeat decide
	case !held:
		return lockHeld
	}
	return lockFree
}
