package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io/fs"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
	_ "github.com/mattn/go-sqlite3" // registers the "sqlite3" driver
)

// softHeapLimit bounds the memory SQLite keeps in this process (bytes).
const softHeapLimit = 160 << 20

// BusyTimeout is how long a transaction waits for another process's lock
// before failing.
const BusyTimeout = 10 * time.Second

// applicationID marks an SQLite file as an inflatrace ledger ("inft"); it is
// set by migration 0001.
const applicationID = 0x696e6674

// Ledger is an open provenance database. Its methods are safe for
// concurrent use; each exported method runs in one transaction.
type Ledger struct {
	db   *sql.DB // the writer: one connection, immediate transactions
	rdb  *sql.DB // readers: several connections, reading in WAL snapshots
	path string
	now  func() time.Time
	// readOnly is set by OpenReadOnly: db and rdb are one read-only pool.
	readOnly bool
	// What LookupMany just found, for the writer a moment later: rows
	// (their ids, statuses and output hashes; ids never change and ok rows
	// never change, so an entry cannot go stale) and keys not stored at
	// all, with the largest node id of the snapshot that found them so (an
	// entry can go stale when another writer records the key; the batch
	// then finds the key stored and is recorded again reading every key).
	seen    keyMemo[storedNode]
	missing keyMemo[int64]
	// recent holds the rows recent batches wrote or read (committed): the
	// inputs of the next batches' nodes and the nodes of their works.
	recent keyMemo[storedNode]
	// suspect holds the keys whose rows a look-up found edited, with the
	// problem: taken as missing, computed again, and rewritten (the row as
	// found kept in quarantine) when the computation is recorded.
	suspect keyMemo[string]
	// marks tells a key taken as absent that nobody wrote since (writeMarks).
	marks writeMarks
	// sealSigner, when set, signs every seal the ledger writes.
	sealSigner func(msg []byte) ([]byte, error)
	// macKey, when set, authenticates nodes (WithNodeKey).
	macKey []byte
	// shapes holds the packed-value shapes met so far (pack.go).
	shapes shapeBook
	// kinds holds the ids of the node kinds met so far.
	kinds kindBook
	// retiredMacKeys are the secrets of the user's retired keys, whose
	// codes still vouch for a node (WithRetiredNodeKeys).
	retiredMacKeys [][]byte
	// macs pools HMAC states keyed with macKey: a reset state skips
	// hashing the key's pads again.
	macs sync.Pool
}

var _ pipeline.Recorder = (*Ledger)(nil)

// Option adjusts how Open sets up a Ledger.
type Option func(*Ledger)

// WithClock sets the clock used for the times the ledger itself stamps
// (when a node row or a migration was written). It must be safe for
// concurrent use. The default (also when now is nil) is time.Now.
func WithClock(now func() time.Time) Option {
	return func(l *Ledger) {
		if now != nil {
			l.now = now
		}
	}
}

// Open opens the ledger at path, creating the file (but not its directory)
// if needed, checks the connection settings and applies any pending
// migrations.
func Open(path string, opts ...Option) (*Ledger, error) {
	if err := checkPath(path); err != nil {
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	// Look before touching: the DSN below switches the file to WAL, which
	// must not happen to a database that is not ours.
	if err := probeOwner(path); err != nil {
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	if err := createWithPageSize(path); err != nil {
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	db, err := sql.Open("sqlite3", dsn(path))
	if err != nil {
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	// One connection: SQLite allows one writer anyway, and a single
	// connection serialises the engine's goroutines inside this process
	// without lock contention. Other processes wait on the busy timeout.
	db.SetMaxOpenConns(1)
	db.SetConnMaxLifetime(0)
	l := &Ledger{db: db, path: path, now: time.Now}
	for _, o := range opts {
		o(l)
	}
	ctx := context.Background()
	if err := l.setUp(ctx); err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	// SQLite's memory (page caches: 64 MiB for the writer, 16 MiB for each
	// reader) is held near softHeapLimit for the whole process.
	if _, err := db.ExecContext(ctx, fmt.Sprintf("PRAGMA soft_heap_limit = %d", softHeapLimit)); err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	// Checkpoint the WAL into the database every ~40 MB rather than every
	// ~4 MB: each checkpoint syncs the file, and a large scan writes a lot.
	if _, err := db.ExecContext(ctx, "PRAGMA wal_autocheckpoint = 10000"); err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	if err := l.marks.start(ctx, db); err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s: %w", path, err)
	}
	rdb, err := sql.Open("sqlite3", readDSN(path))
	if err != nil {
		db.Close()
		return nil, fmt.Errorf("open ledger %s for reading: %w", path, err)
	}
	rdb.SetMaxOpenConns(4)
	// Keep the readers (and their page caches) open between look-ups
	// rather than opening new ones: each new connection starts cold and
	// leaves its freed cache to the C allocator.
	rdb.SetMaxIdleConns(4)
	l.rdb = rdb
	return l, nil
}

func (l *Ledger) setUp(ctx context.Context) error {
	if err := checkPragmas(ctx, l.db); err != nil {
		return err
	}
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		return err
	}
	if err := migrate(ctx, l.db, ms, l.now); err != nil {
		return err
	}
	var id int64
	if err := l.db.QueryRowContext(ctx, "PRAGMA application_id").Scan(&id); err != nil {
		return fmt.Errorf("read application_id: %w", err)
	}
	if id != applicationID {
		return fmt.Errorf("application_id is %#x after migration, want %#x", id, applicationID)
	}
	return nil
}

// Path returns the file the ledger was opened from.
func (l *Ledger) Path() string { return l.path }

// Close closes the database.
func (l *Ledger) Close() error {
	if l.rdb != nil && l.rdb != l.db {
		l.rdb.Close()
	}
	if err := l.db.Close(); err != nil {
		return fmt.Errorf("close ledger %s: %w", l.path, err)
	}
	return nil
}

// PageSize is the page size of a new ledger file. Measured on first-order
// scans (2 cores): 1e5 points take the same time with 4 or 16 KiB pages,
// 1e6 points 365 s with 16 KiB against 414 s with 4 KiB (fewer, larger
// pages: a shallower key index and fewer system calls per WAL frame).
// Existing files keep their page size.
const PageSize = 16384

// createWithPageSize gives a new or empty ledger file its page size. It
// must be set before the file is switched to WAL, which the normal
// connection does as it connects.
func createWithPageSize(path string) error {
	if fi, err := os.Stat(path); err == nil && fi.Size() > 0 {
		return nil
	}
	db, err := sql.Open("sqlite3", fileURI(path))
	if err != nil {
		return err
	}
	defer db.Close()
	if _, err := db.Exec(fmt.Sprintf("PRAGMA page_size = %d; PRAGMA journal_mode = WAL", PageSize)); err != nil {
		return fmt.Errorf("set page size: %w", err)
	}
	return nil
}

// checkPath refuses an empty path, a path that is a directory and a path
// whose directory does not exist (SQLite would only say "unable to open").
func checkPath(path string) error {
	if path == "" {
		return errors.New("empty path")
	}
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return errors.New("the path is a directory, not a ledger file")
	}
	dir := filepath.Dir(path)
	fi, err := os.Stat(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("directory %s does not exist (create it first)", dir)
	}
	if err != nil {
		return err
	}
	if !fi.IsDir() {
		return fmt.Errorf("%s is not a directory", dir)
	}
	return nil
}

// dsn builds an SQLite URI for path. The path is percent-escaped, so a '?'
// or '#' in a file name is not mistaken for the start of the options.
func dsn(path string) string {
	q := url.Values{}
	q.Set("_journal_mode", "WAL")
	q.Set("_foreign_keys", "1")
	q.Set("_busy_timeout", fmt.Sprint(BusyTimeout.Milliseconds()))
	q.Set("_txlock", "immediate")
	// In WAL mode, NORMAL keeps every commit atomic and the file
	// consistent after a crash of the process; only a power loss or OS
	// crash may lose the last commits (which a re-run recomputes). FULL
	// would add an fsync to every commit.
	q.Set("_synchronous", "NORMAL")
	// Keys are SHA-256 hashes, so inserts land at random places in the
	// key indexes: a 64 MiB page cache keeps a large scan's indexes in
	// memory instead of re-reading pages.
	q.Set("_cache_size", "-65536")
	return fileURI(path) + "?" + q.Encode()
}

// readDSN is the DSN of the reader pool: deferred (read) transactions.
func readDSN(path string) string {
	q := url.Values{}
	q.Set("_foreign_keys", "1")
	q.Set("_busy_timeout", fmt.Sprint(BusyTimeout.Milliseconds()))
	// Look-ups land at random places in the key index: a reader keeps
	// 16 MiB of pages instead of SQLite's default 2 MiB.
	q.Set("_cache_size", "-16384")
	return fileURI(path) + "?" + q.Encode()
}

// fileURI is path as an SQLite "file:" URI without options.
func fileURI(path string) string {
	u := url.URL{Path: filepath.ToSlash(path)}
	return "file:" + u.EscapedPath()
}

// checkPragmas reads back the settings the DSN asked for and fails if any
// is not in effect.
func checkPragmas(ctx context.Context, db *sql.DB) error {
	var mode string
	if err := db.QueryRowContext(ctx, "PRAGMA journal_mode").Scan(&mode); err != nil {
		return fmt.Errorf("read journal_mode: %w", err)
	}
	if mode != "wal" {
		return fmt.Errorf("journal_mode is %q, want \"wal\" (is the file on a file system without shared memory?)", mode)
	}
	var fk int
	if err := db.QueryRowContext(ctx, "PRAGMA foreign_keys").Scan(&fk); err != nil {
		return fmt.Errorf("read foreign_keys: %w", err)
	}
	if fk != 1 {
		return fmt.Errorf("foreign_keys is %d, want 1", fk)
	}
	var busy int64
	if err := db.QueryRowContext(ctx, "PRAGMA busy_timeout").Scan(&busy); err != nil {
		return fmt.Errorf("read busy_timeout: %w", err)
	}
	if busy != BusyTimeout.Milliseconds() {
		return fmt.Errorf("busy_timeout is %d ms, want %d ms", busy, BusyTimeout.Milliseconds())
	}
	var sync int
	if err := db.QueryRowContext(ctx, "PRAGMA synchronous").Scan(&sync); err != nil {
		return fmt.Errorf("read synchronous: %w", err)
	}
	if sync != 1 {
		return fmt.Errorf("synchronous is %d, want 1 (NORMAL)", sync)
	}
	return nil
}

// probeOwner opens an existing, non-empty file read-only and refuses it
// unless it is an inflatrace ledger or an empty database.
func probeOwner(path string) error {
	fi, err := os.Stat(path)
	if errors.Is(err, fs.ErrNotExist) || (err == nil && fi.Size() == 0) {
		return nil
	}
	if err != nil {
		return err
	}
	db, err := sql.Open("sqlite3", fileURI(path)+"?mode=ro")
	if err != nil {
		return err
	}
	defer db.Close()
	return checkOwner(context.Background(), db)
}

// checkOwner refuses an SQLite database that belongs to something else: one
// with a foreign application_id, or one that has tables but no inflatrace
// mark.
func checkOwner(ctx context.Context, db *sql.DB) error {
	var id int64
	if err := db.QueryRowContext(ctx, "PRAGMA application_id").Scan(&id); err != nil {
		return fmt.Errorf("read application_id: %w", err)
	}
	if id == applicationID {
		return nil
	}
	if id != 0 {
		return fmt.Errorf("not an inflatrace ledger: application_id is %#x, want %#x", id, applicationID)
	}
	var n int
	if err := db.QueryRowContext(ctx, "SELECT count(*) FROM sqlite_schema").Scan(&n); err != nil {
		return fmt.Errorf("read schema: %w", err)
	}
	if n > 0 {
		return fmt.Errorf("not an inflatrace ledger: the database holds %d schema objects but no inflatrace mark", n)
	}
	return nil
}

// qtx is a transaction whose statements are prepared once per query text
// and reused for the rest of the transaction: a batch of a thousand nodes
// runs the same few statements thousands of times, and preparing each
// anew would cost more than running it.
type qtx struct {
	*sql.Tx
	stmts map[string]*sql.Stmt
	// newShapes are the shapes this transaction stored (pack.go), and
	// onCommit what becomes true of the ledger's memory once it commits.
	newShapes map[string]int64
	newKinds  map[nodeKind]int64
	onCommit  []func()
	// nodeTop is the largest node id before the transaction wrote any,
	// once topRead (Ledger.nodeTop).
	nodeTop int64
	topRead bool
}

func (q *qtx) stmt(ctx context.Context, query string) (*sql.Stmt, error) {
	if s, ok := q.stmts[query]; ok {
		return s, nil
	}
	s, err := q.Tx.PrepareContext(ctx, query)
	if err != nil {
		return nil, err
	}
	q.stmts[query] = s
	return s, nil
}

// ExecContext runs a prepared statement.
func (q *qtx) ExecContext(ctx context.Context, query string, args ...any) (sql.Result, error) {
	s, err := q.stmt(ctx, query)
	if err != nil {
		return nil, err
	}
	return s.ExecContext(ctx, args...)
}

// QueryRowContext runs a prepared single-row query. A preparation error
// surfaces through the returned row's Scan.
func (q *qtx) QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row {
	s, err := q.stmt(ctx, query)
	if err != nil {
		return q.Tx.QueryRowContext(ctx, query, args...)
	}
	return s.QueryRowContext(ctx, args...)
}

// inTx runs fn in one transaction, committing only if fn succeeds.
func (l *Ledger) inTx(ctx context.Context, fn func(*qtx) error) error {
	sqlTx, err := l.db.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("begin transaction: %w", err)
	}
	tx := &qtx{Tx: sqlTx, stmts: map[string]*sql.Stmt{}}
	defer tx.Rollback()
	if err := fn(tx); err != nil {
		if l.readOnly && (strings.Contains(err.Error(), "readonly") || strings.Contains(err.Error(), "read-only") || strings.Contains(err.Error(), "query_only")) {
			return fmt.Errorf("%w (%s): %v", ErrReadOnly, l.path, err)
		}
		return err
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("commit: %w", err)
	}
	for _, f := range tx.onCommit {
		f()
	}
	return nil
}

// inReadTx runs fn in a read transaction of the reader pool: a consistent
// WAL snapshot that does not wait for the writer.
func (l *Ledger) inReadTx(ctx context.Context, fn func(*qtx) error) error {
	sqlTx, err := l.rdb.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return fmt.Errorf("begin read transaction: %w", err)
	}
	tx := &qtx{Tx: sqlTx, stmts: map[string]*sql.Stmt{}}
	defer tx.Rollback()
	return fn(tx)
}

// timeLayout is RFC 3339 with a fixed nine-digit fraction: any RFC 3339
// parser reads it, and text order is time order.
const timeLayout = "2006-01-02T15:04:05.000000000Z07:00"

func formatTime(t time.Time) string { return t.UTC().Format(timeLayout) }

func parseTime(s string) (time.Time, error) {
	t, err := time.Parse(time.RFC3339Nano, s)
	if err != nil {
		return time.Time{}, fmt.Errorf("%w: stored time %q: %v", ErrIntegrity, s, err)
	}
	return t.UTC(), nil
}
