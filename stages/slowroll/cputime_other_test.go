//go:build !unix

package slowroll

import "time"

// exProcessCPU reports no CPU time where the platform gives none.
func exProcessCPU() (time.Duration, bool) { return 0, false }
