package ledger

import (
	"context"
	"database/sql"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net/url"
	"os"
	"time"
)

// ErrReadOnly marks a write refused because the ledger was opened read-only.
var ErrReadOnly = errors.New("the ledger is open read-only")

// OpenReadOnly opens an existing ledger for reading only, writing nothing
// to its file or directory: for a ledger on read-only media, in a
// directory the user cannot write, or received from someone else. SQLite
// is told the file is immutable (nothing else changes it while it is
// open), so no -wal or -shm file is made; a write-ahead log left beside
// it by a crash must first be checkpointed by opening the ledger with
// write access. Its schema must be the current one (an older ledger is
// migrated by opening it with write access once).
func OpenReadOnly(path string, opts ...Option) (*Ledger, error) {
	if err := checkPath(path); err != nil {
		return nil, fmt.Errorf("open ledger %s read-only: %w", path, err)
	}
	fi, err := os.Stat(path)
	if errors.Is(err, fs.ErrNotExist) || err == nil && fi.Size() == 0 {
		return nil, fmt.Errorf("open ledger %s read-only: no ledger there", path)
	}
	if err != nil {
		return nil, fmt.Errorf("open ledger %s read-only: %w", path, err)
	}
	if wal, err := os.Stat(path + "-wal"); err == nil && wal.Size() > 0 {
		return nil, fmt.Errorf("open ledger %s read-only: it has an unmerged write-ahead log (%s-wal); open it once with write access to fold it in", path, path)
	}
	q := url.Values{}
	q.Set("mode", "ro")
	q.Set("immutable", "1")
	q.Set("_foreign_keys", "1")
	q.Set("_query_only", "1")
	db, err := sql.Open("sqlite3", fileURI(path)+"?"+q.Encode())
	if err != nil {
		return nil, fmt.Errorf("open ledger %s read-only: %w", path, err)
	}
	db.SetMaxOpenConns(4)
	db.SetMaxIdleConns(4)
	l := &Ledger{db: db, rdb: db, path: path, now: time.Now, readOnly: true}
	for _, o := range opts {
		o(l)
	}
	if err := checkOwner(context.Background(), db); err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s read-only: %w", path, err)
	}
	if err := l.checkCurrentSchema(context.Background()); err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s read-only: %w", path, err)
	}
	return l, nil
}

// ReadOnly reports whether the ledger was opened with OpenReadOnly.
func (l *Ledger) ReadOnly() bool { return l.readOnly }

// checkCurrentSchema refuses a ledger whose migrations are not all applied.
func (l *Ledger) checkCurrentSchema(ctx context.Context) error {
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		return err
	}
	var n int
	var latest sql.NullInt64
	if err := l.db.QueryRowContext(ctx, "SELECT count(*), max(version) FROM schema_migrations").Scan(&n, &latest); err != nil {
		return fmt.Errorf("read its schema version: %w", err)
	}
	want := ms[len(ms)-1].version
	if n != len(ms) || !latest.Valid || int(latest.Int64) != want {
		return fmt.Errorf("its schema is at version %d of %d: open it once with write access to migrate it", latest.Int64, want)
	}
	return nil
}

// LooksLikeLedger reports whether the file at path starts as an
// inflatrace ledger does: the SQLite 3 header, with inflatrace's
// application id at offset 68 of it (SQLite file format, "The Database
// Header"). It reads 100 bytes and opens nothing, for a file received
// from elsewhere (an archive's) before any SQLite code touches it.
func LooksLikeLedger(path string) (bool, error) {
	f, err := os.Open(path)
	if err != nil {
		return false, err
	}
	defer f.Close()
	var h [100]byte
	if _, err := io.ReadFull(f, h[:]); err != nil {
		return false, nil
	}
	if string(h[:16]) != "SQLite format 3\x00" {
		return false, nil
	}
	return binary.BigEndian.Uint32(h[68:72]) == applicationID, nil
}
