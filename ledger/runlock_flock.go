//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package ledger

import (
	"errors"
	"os"
	"syscall"
)

// tryLock takes an exclusive flock(2) on f without waiting: held reports
// whether it was taken (false: another open file holds it).
func tryLock(f *os.File) (held bool, err error) {
	for {
		err = syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB)
		if !errors.Is(err, syscall.EINTR) {
			break
		}
	}
	switch {
	case err == nil:
		return true, nil
	case errors.Is(err, syscall.EWOULDBLOCK):
		return false, nil
	}
	return false, err
}
