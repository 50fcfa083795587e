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
	if path := os.Getenv(profileEnv); path != "" {
		f, err := os.Create(path)
		if err == nil {
			err = pprof.StartCPUProfile(f)
		}
		if err != nil {
			fmt.Fprintf(os.Stderr, "inflatrace: %s: %v\n", profileEnv, err)
			os.Exit(app.ExitError)
		}
		code := root.Main(app.System(), os.Args[1:])
		pprof.StopCPUProfile()
		f.Close()
		os.Exit(code)
	}
	os.Exit(root.Main(app.System(), os.Args[1:]))
}
