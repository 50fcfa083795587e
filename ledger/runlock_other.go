//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package ledger

import (
	"errors"
	"os"
)

// tryLock: no flock(2) here, so run locks are not used and the process
// check and the heartbeat decide whether a run is alive.
func tryLock(*os.File) (bool, error) {
	return false, errors.New("file locks not supported on this system")
}
