//go:build !unix

package nodes

import "time"

// processCPU is not available here: false.
func processCPU() (time.Duration, bool) { return 0, false }
