package ledger

import (
	"context"
	"database/sql"
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"path"
	"regexp"
	"sort"
	"strconv"
	"time"
)

//go:embed migrations/*.sql
var migrationFiles embed.FS

// migration is one numbered schema change.
type migration struct {
	version int
	name    string // the file name without directory
	sql     string
}

var migrationName = regexp.MustCompile(`^([0-9]{4})_([a-z0-9_]+)\.sql$`)

// loadMigrations reads migrations/*.sql from fsys. Versions must be unique
// and run 1, 2, 3... without gaps, so that the recorded maximum says exactly
// which files have been applied.
func loadMigrations(fsys fs.FS) ([]migration, error) {
	names, err := fs.Glob(fsys, "migrations/*.sql")
	if err != nil {
		return nil, fmt.Errorf("list migrations: %w", err)
	}
	var ms []migration
	for _, p := range names {
		base := path.Base(p)
		m := migrationName.FindStringSubmatch(base)
		if m == nil {
			return nil, fmt.Errorf("migration %s: name must look like 0001_description.sql", base)
		}
		v, _ := strconv.Atoi(m[1])
		text, err := fs.ReadFile(fsys, p)
		if err != nil {
			return nil, fmt.Errorf("migration %s: %w", base, err)
		}
		ms = append(ms, migration{version: v, name: base, sql: string(text)})
	}
	sort.Slice(ms, func(i, j int) bool { return ms[i].version < ms[j].version })
	for i, m := range ms {
		if m.version != i+1 {
			return nil, fmt.Errorf("migration %s: version %d, want %d (versions start at 1 and have no gaps or repeats)", m.name, m.version, i+1)
		}
	}
	if len(ms) == 0 {
		return nil, errors.New("no migrations found")
	}
	return ms, nil
}

const createMigrationsTable = `CREATE TABLE IF NOT EXISTS schema_migrations (
    version    INTEGER PRIMARY KEY NOT NULL CHECK (version > 0),
    name       TEXT NOT NULL,
    applied_at TEXT NOT NULL
)`

// migrate applies the migrations not yet recorded, each in its own
// transaction together with its schema_migrations row. It refuses a
// database recorded at a version newer than ms knows, and one whose record
// of an applied migration names a different file.
func migrate(ctx context.Context, db *sql.DB, ms []migration, now func() time.Time) error {
	if _, err := db.ExecContext(ctx, createMigrationsTable); err != nil {
		return fmt.Errorf("create schema_migrations: %w", err)
	}
	applied, err := appliedMigrations(ctx, db)
	if err != nil {
		return err
	}
	latest := ms[len(ms)-1].version
	if top := maxKey(applied); top > latest {
		return fmt.Errorf("%w: the database is at schema version %d (%s), this inflatrace knows up to %d; use a newer inflatrace",
			ErrSchemaTooNew, top, applied[top], latest)
	}
	for v, name := range applied {
		if want := ms[v-1].name; name != want {
			return fmt.Errorf("schema version %d was applied as %s, but this inflatrace's migration %d is %s", v, name, v, want)
		}
	}
	for _, m := range ms {
		if _, ok := applied[m.version]; ok {
			continue
		}
		if err := applyMigration(ctx, db, m, now); err != nil {
			return err
		}
	}
	return nil
}

func appliedMigrations(ctx context.Context, db *sql.DB) (map[int]string, error) {
	rows, err := db.QueryContext(ctx, "SELECT version, name FROM schema_migrations")
	if err != nil {
		return nil, fmt.Errorf("read schema_migrations: %w", err)
	}
	defer rows.Close()
	applied := map[int]string{}
	for rows.Next() {
		var v int
		var name string
		if err := rows.Scan(&v, &name); err != nil {
			return nil, fmt.Errorf("read schema_migrations: %w", err)
		}
		applied[v] = name
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("read schema_migrations: %w", err)
	}
	return applied, nil
}

func maxKey(m map[int]string) int {
	top := 0
	for k := range m {
		top = max(top, k)
	}
	return top
}

// applyMigration runs one migration and records it, in one transaction. It
// checks again inside the transaction, so two processes opening a fresh
// ledger at once apply each migration once.
func applyMigration(ctx context.Context, db *sql.DB, m migration, now func() time.Time) error {
	tx, err := db.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("migration %s: begin: %w", m.name, err)
	}
	defer tx.Rollback()
	var n int
	if err := tx.QueryRowContext(ctx, "SELECT count(*) FROM schema_migrations WHERE version = ?", m.version).Scan(&n); err != nil {
		return fmt.Errorf("migration %s: %w", m.name, err)
	}
	if n > 0 {
		return nil
	}
	if _, err := tx.ExecContext(ctx, m.sql); err != nil {
		return fmt.Errorf("migration %s: %w", m.name, err)
	}
	if _, err := tx.ExecContext(ctx, "INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)",
		m.version, m.name, formatTime(now())); err != nil {
		return fmt.Errorf("migration %s: record: %w", m.name, err)
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("migration %s: commit: %w", m.name, err)
	}
	return nil
}
