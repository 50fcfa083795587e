package app

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
)

// Version is inflatrace's release version. It is part of the tool identity
// salted into every node key, so a new release recomputes rather than
// trusting results of an older one.
const Version = "0.1.0"

// ToolIdentity is the identity salted into node keys.
const ToolIdentity = "inflatrace/" + Version

// LedgerEnv is the environment variable naming the ledger file.
const LedgerEnv = "INFLATRACE_LEDGER"

// DefaultLedger is the ledger file used when neither --ledger nor
// INFLATRACE_LEDGER is set: in the working directory.
const DefaultLedger = "inflatrace-ledger.db"

// Env is everything a command takes from the outside world.
type Env struct {
	Stdout, Stderr io.Writer
	Getenv         func(string) string
	Now            func() time.Time
	Random         io.Reader // for run ids
	CPUs           int
	// StdoutTerminal reports whether stdout is a terminal (tables are
	// aligned only then); StderrTerminal whether stderr is (a progress bar
	// is drawn only then).
	StdoutTerminal, StderrTerminal bool
}

// System returns the real environment of the process.
func System() *Env {
	return &Env{
		Stdout: os.Stdout, Stderr: os.Stderr, Getenv: os.Getenv, Now: time.Now,
		Random: rand.Reader, CPUs: runtime.NumCPU(), StdoutTerminal: isTerminal(os.Stdout), StderrTerminal: isTerminal(os.Stderr),
	}
}

// Owner returns this process's identity, "host:pid", recorded with runs.
func (e *Env) Owner() string {
	host, _ := os.Hostname()
	return fmt.Sprintf("%s:%d", host, os.Getpid())
}

// Alive reports whether the process of an owner recorded by Owner still
// runs: on this host, by signalling its pid with signal 0; a process on
// another host is assumed alive.
func (e *Env) Alive(owner string) bool {
	host, pidText, ok := strings.Cut(owner, ":")
	if !ok {
		return true
	}
	if h, _ := os.Hostname(); h != host {
		return true
	}
	pid, err := strconv.Atoi(pidText)
	if err != nil || pid <= 0 {
		return true
	}
	if pid == os.Getpid() {
		return true
	}
	err = syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM) // EPERM: alive, another user's
}

// Globals are the flags every command shares.
type Globals struct {
	Ledger string
}

// LedgerPath resolves the ledger location: --ledger, then $INFLATRACE_LEDGER,
// then DefaultLedger.
func (e *Env) LedgerPath(g *Globals) string {
	if g.Ledger != "" {
		return g.Ledger
	}
	if p := e.Getenv(LedgerEnv); p != "" {
		return p
	}
	return DefaultLedger
}

// OpenLedger opens the resolved ledger.
func (e *Env) OpenLedger(g *Globals) (*ledger.Ledger, error) {
	path := e.LedgerPath(g)
	opts := []ledger.Option{ledger.WithClock(e.Now)}
	if nk, err := e.nodeKey(); err == nil {
		opts = append(opts, ledger.WithNodeKey(nk), ledger.WithRetiredNodeKeys(e.retiredNodeKeys()), ledger.WithSealSigner(e.signSeal))
	} else {
		// Without a key (a read-only home, say) nodes are neither given
		// codes nor checked for them; seals cannot be signed either.
		fmt.Fprintf(e.Stderr, "warning: no signing key (%v): nodes are recorded and reused without authentication codes, and seals are not signed\n", err)
	}
	l, err := ledger.Open(path, opts...)
	if err != nil {
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	return l, nil
}

// OpenLedgerRead opens the ledger for a command that only reads it. Where
// it cannot be opened for writing (a read-only directory or file system,
// someone else's file), it is opened read-only instead (ledger.OpenReadOnly),
// so that show, table, plot, runs, trace and diff work on a ledger the
// user may read but not write.
func (e *Env) OpenLedgerRead(g *Globals) (*ledger.Ledger, error) {
	path := e.LedgerPath(g)
	l, err := ledger.Open(path, ledger.WithClock(e.Now))
	if err == nil {
		return l, nil
	}
	if _, serr := os.Stat(path); serr != nil || !cannotWrite(err) {
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	ro, rerr := ledger.OpenReadOnly(path, ledger.WithClock(e.Now))
	if rerr != nil {
		return nil, fmt.Errorf("open ledger %s: %w (and read-only: %v)", path, err, rerr)
	}
	return ro, nil
}

// cannotWrite reports whether an open failed for want of write access.
func cannotWrite(err error) bool {
	if errors.Is(err, fs.ErrPermission) || errors.Is(err, syscall.EROFS) || errors.Is(err, syscall.EACCES) {
		return true
	}
	msg := err.Error()
	return strings.Contains(msg, "readonly database") || strings.Contains(msg, "read-only file system") ||
		strings.Contains(msg, "unable to open database file") || strings.Contains(msg, "permission denied")
}

// NewRunID returns a run id: the UTC start time and 6 random hex digits,
// e.g. 20261202T053012Z-3fa9c1.
func (e *Env) NewRunID(start time.Time) (pipeline.RunID, error) {
	b := make([]byte, 3)
	if _, err := io.ReadFull(e.Random, b); err != nil {
		return "", fmt.Errorf("run id: %w", err)
	}
	return pipeline.RunID(start.UTC().Format("20060102T150405Z") + "-" + hex.EncodeToString(b)), nil
}

// Exit codes.
const (
	ExitOK        = 0 // success
	ExitError     = 1 // failure of the tool itself: I/O, ledger, internal
	ExitUsage     = 2 // bad input: flags, configuration, model parameters
	ExitRunFailed = 3 // the run completed but some nodes failed (recorded as failed)
	ExitNotFound  = 4 // a run or result named on the command line is not in the ledger
)

// UsageError marks bad input from the user (exit code 2).
type UsageError struct{ Err error }

func (e *UsageError) Error() string { return e.Err.Error() }
func (e *UsageError) Unwrap() error { return e.Err }

// Usage wraps err as a UsageError.
func Usage(err error) error {
	if err == nil {
		return nil
	}
	return &UsageError{Err: err}
}

// RunFailedError reports a run with failed nodes (exit code 3).
type RunFailedError struct {
	Run    pipeline.RunID
	Failed int
	First  error
}

func (e *RunFailedError) Error() string {
	return fmt.Sprintf("run %s: %d node(s) failed; first: %v", e.Run, e.Failed, e.First)
}

// ExitCode maps an error to the documented exit code.
func ExitCode(err error) int {
	var ue *UsageError
	var rf *RunFailedError
	switch {
	case err == nil:
		return ExitOK
	case errors.As(err, &ue):
		return ExitUsage
	case errors.As(err, &rf):
		return ExitRunFailed
	case errors.Is(err, ledger.ErrNotFound):
		return ExitNotFound
	}
	return ExitError
}
