// Command inflatrace turns single-field inflation models into the numbers
// CMB data test, as a reproducible pipeline with a provenance ledger.
package main

import (
	"fmt"
	"os"
	"runtime/debug"
	"runtime/pprof"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/root"
)

// profileEnv names a file to write a CPU profile of the whole command to
// (for contributors measuring large scans; see DEVELOPERS.md).
const profileEnv = "INFLATRACE_CPUPROFILE"

// memoryLimit is the Go heap's soft limit unless GOMEMLIMIT says otherwise:
// with SQLite's page caches beside it, a scan of a million points stays
// under 500 MB resident, whatever the garbage collector's pace.
const memoryLimit = 320 << 20

func main() {
	if os.Getenv("GOMEMLIMIT") == "" {
		debug.SetMemoryLimit(memoryLimit)
	}
	stop, err := startProfile(os.Getenv(profileEnv))
	if err != nil {
		fmt.Fprintf(os.Stderr, "inflatrace: %s: %v\n", profileEnv, err)
		os.Exit(app.ExitError)
	}
	code := root.Main(app.System(), os.Args[1:])
	stop()
	os.Exit(code)
}

// startProfile starts a CPU profile written to path (nothing when path is
// empty) and returns the function that ends it.
func startProfile(path string) (stop func(), err error) {
	if path == "" {
		return func() {}, nil
	}
	f, err := os.Create(path)
	if err != nil {
		return nil, err
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return nil, err
	}
	return func() {
		pprof.StopCPUProfile()
		f.Close()
	}, nil
}
