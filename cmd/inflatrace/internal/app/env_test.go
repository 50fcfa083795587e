package app

import (
	"errors"
	"fmt"
	"io/fs"
	"syscall"
	"testing"
)

// The errors of an open without write access, and only those, send a
// read-only command to the read-only ledger (SQLite's messages as the
// driver words them: "attempt to write a readonly database", "unable to
// open database file"; the rest are the operating system's).
func TestCannotWrite(t *testing.T) {
	for err, want := range map[error]bool{
		fmt.Errorf("open: %w", fs.ErrPermission):                           true,
		fmt.Errorf("open: %w", syscall.EROFS):                              true,
		errors.New("migrate: attempt to write a readonly database"):        true,
		errors.New("set page size: unable to open database file"):          true,
		errors.New("application_id is 0x1, want 0x494e464c: not a ledger"): false,
		errors.New("journal_mode is \"delete\", want \"wal\""):             false,
	} {
		if got := cannotWrite(err); got != want {
			t.Errorf("cannotWrite(%v) = %v, want %v", err, got, want)
		}
	}
}
