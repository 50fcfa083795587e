package ledger

import (
	"context"
	"database/sql"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"
	"time"
)

func TestOpenPragmasReadBack(t *testing.T) {
	l, _ := openTest(t)
	var mode string
	var fk, busy int
	if err := l.db.QueryRow("PRAGMA journal_mode").Scan(&mode); err != nil {
		t.Fatal(err)
	}
	if err := l.db.QueryRow("PRAGMA foreign_keys").Scan(&fk); err != nil {
		t.Fatal(err)
	}
	if err := l.db.QueryRow("PRAGMA busy_timeout").Scan(&busy); err != nil {
		t.Fatal(err)
	}
	if mode != "wal" || fk != 1 || busy != 10000 {
		t.Errorf("journal_mode=%q foreign_keys=%d busy_timeout=%d, want wal 1 10000", mode, fk, busy)
	}
}

// TestCheckPragmasRejectsWeakConnections opens connections that miss one
// setting each and checks that the read-back notices.
func TestCheckPragmasRejectsWeakConnections(t *testing.T) {
	for _, tc := range []struct {
		name, options, want string
	}{
		{"rollback journal", "_journal_mode=DELETE&_foreign_keys=1&_busy_timeout=10000", "journal_mode"},
		{"no foreign keys", "_journal_mode=WAL&_foreign_keys=0&_busy_timeout=10000", "foreign_keys"},
		{"short busy timeout", "_journal_mode=WAL&_foreign_keys=1&_busy_timeout=5000", "busy_timeout"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			db, err := sql.Open("sqlite3", fileURI(filepath.Join(t.TempDir(), "x.db"))+"?"+tc.options)
			if err != nil {
				t.Fatal(err)
			}
			defer db.Close()
			err = checkPragmas(context.Background(), db)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("checkPragmas = %v, want an error about %s", err, tc.want)
			}
		})
	}
}

func TestOpenMissingDirectory(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "no", "such", "dir")
	path := filepath.Join(dir, "ledger.db")
	l, err := Open(path)
	if err == nil {
		l.Close()
		t.Fatal("Open succeeded in a missing directory")
	}
	if !strings.Contains(err.Error(), dir) || !strings.Contains(err.Error(), "does not exist") {
		t.Errorf("error %q does not name the missing directory %s", err, dir)
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("Open created %s: %v", dir, err)
	}
}

func TestOpenDirectoryAsFile(t *testing.T) {
	dir := t.TempDir()
	if _, err := Open(dir); err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Errorf("Open(%s) = %v, want an error saying it is a directory", dir, err)
	}
}

func TestOpenRefusesForeignFiles(t *testing.T) {
	t.Run("not sqlite", func(t *testing.T) {
		path := filepath.Join(t.TempDir(), "notes.txt")
		if err := os.WriteFile(path, []byte(strings.Repeat("not a database\n", 100)), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := Open(path)
		if err == nil || !strings.Contains(err.Error(), path) {
			t.Fatalf("Open = %v, want an error naming %s", err, path)
		}
	})
	t.Run("other application", func(t *testing.T) {
		path := filepath.Join(t.TempDir(), "other.db")
		db, err := sql.Open("sqlite3", fileURI(path))
		if err != nil {
			t.Fatal(err)
		}
		if _, err := db.Exec("CREATE TABLE accounts (id INTEGER PRIMARY KEY)"); err != nil {
			t.Fatal(err)
		}
		db.Close()
		_, err = Open(path)
		if err == nil || !strings.Contains(err.Error(), "not an inflatrace ledger") {
			t.Fatalf("Open = %v, want a refusal", err)
		}
		// The refusal came before the file was touched: still a rollback journal.
		db, err = sql.Open("sqlite3", fileURI(path))
		if err != nil {
			t.Fatal(err)
		}
		defer db.Close()
		var mode string
		if err := db.QueryRow("PRAGMA journal_mode").Scan(&mode); err != nil {
			t.Fatal(err)
		}
		if mode != "delete" {
			t.Errorf("journal_mode of the refused file is %q, want delete", mode)
		}
	})
}

func TestOpenPathWithURICharacters(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "odd dir?x=1#frag%41")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "led ger.db")
	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	beginRun(t, l, "r1", testClock)
	if err := l.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(path); err != nil {
		t.Fatalf("ledger file not at the given path: %v", err)
	}
	l, err = Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if _, err := l.Run(context.Background(), "r1"); err != nil {
		t.Errorf("run lost on reopen: %v", err)
	}
}

type migrationRow struct {
	version   int
	name      string
	appliedAt string
}

func readMigrations(t *testing.T, db *sql.DB) []migrationRow {
	t.Helper()
	rows, err := db.Query("SELECT version, name, applied_at FROM schema_migrations ORDER BY version")
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	var out []migrationRow
	for rows.Next() {
		var r migrationRow
		if err := rows.Scan(&r.version, &r.name, &r.appliedAt); err != nil {
			t.Fatal(err)
		}
		out = append(out, r)
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

func TestMigrationsRecordedAndIdempotent(t *testing.T) {
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "ledger.db")
	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	first := readMigrations(t, l.db)
	if len(first) != len(ms) {
		t.Fatalf("%d migrations recorded, %d embedded", len(first), len(ms))
	}
	for i, r := range first {
		if r.version != ms[i].version || r.name != ms[i].name {
			t.Errorf("row %d = %d %s, want %d %s", i, r.version, r.name, ms[i].version, ms[i].name)
		}
		if at, err := time.Parse(time.RFC3339Nano, r.appliedAt); err != nil || !at.Equal(testClock) {
			t.Errorf("applied_at %q, want %v (%v)", r.appliedAt, testClock, err)
		}
	}
	if err := l.Close(); err != nil {
		t.Fatal(err)
	}
	later := func() time.Time { return testClock.Add(time.Hour) }
	for range 2 {
		l, err = Open(path, WithClock(later))
		if err != nil {
			t.Fatal(err)
		}
		again := readMigrations(t, l.db)
		if len(again) != len(first) {
			t.Fatalf("reopen: %d migration rows, want %d", len(again), len(first))
		}
		for i := range again {
			if again[i] != first[i] {
				t.Errorf("reopen changed migration row %d: %+v, was %+v", i, again[i], first[i])
			}
		}
		if err := l.Close(); err != nil {
			t.Fatal(err)
		}
	}
}

func TestTooNewSchemaRefused(t *testing.T) {
	l, path := openTest(t)
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		t.Fatal(err)
	}
	future := len(ms) + 1
	if _, err := l.db.Exec("INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)",
		future, "9999_from_the_future.sql", formatTime(testClock)); err != nil {
		t.Fatal(err)
	}
	l2, err := Open(path)
	if err == nil {
		l2.Close()
		t.Fatal("Open accepted a schema newer than the code")
	}
	if !errors.Is(err, ErrSchemaTooNew) {
		t.Errorf("error %v does not wrap ErrSchemaTooNew", err)
	}
	for _, want := range []string{path, "9999_from_the_future.sql"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q does not mention %q", err, want)
		}
	}
}

func TestRenamedMigrationRefused(t *testing.T) {
	l, path := openTest(t)
	if _, err := l.db.Exec("UPDATE schema_migrations SET name = '0001_something_else.sql' WHERE version = 1"); err != nil {
		t.Fatal(err)
	}
	l2, err := Open(path)
	if err == nil {
		l2.Close()
		t.Fatal("Open accepted a ledger whose migration 1 has another name")
	}
	if !strings.Contains(err.Error(), "0001_something_else.sql") {
		t.Errorf("error %q does not name the recorded migration", err)
	}
}

func TestLoadMigrationsRejectsBadSets(t *testing.T) {
	file := func(s string) *fstest.MapFile { return &fstest.MapFile{Data: []byte(s)} }
	for _, tc := range []struct {
		name string
		fsys fstest.MapFS
		want string
	}{
		{"empty", fstest.MapFS{}, "no migrations"},
		{"gap", fstest.MapFS{"migrations/0001_a.sql": file("SELECT 1"), "migrations/0003_c.sql": file("SELECT 1")}, "want 2"},
		{"repeat", fstest.MapFS{"migrations/0001_a.sql": file("SELECT 1"), "migrations/0001_b.sql": file("SELECT 1")}, "want 2"},
		{"not from one", fstest.MapFS{"migrations/0002_a.sql": file("SELECT 1")}, "want 1"},
		{"bad name", fstest.MapFS{"migrations/1_init.sql": file("SELECT 1")}, "must look like"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := loadMigrations(tc.fsys)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("loadMigrations = %v, want an error containing %q", err, tc.want)
			}
		})
	}
}

// TestMigrationIsAtomic applies a migration that fails halfway: none of it
// may remain, and it must not be recorded.
func TestMigrationIsAtomic(t *testing.T) {
	fsys := fstest.MapFS{
		"migrations/0001_good.sql": {Data: []byte("CREATE TABLE one (x INTEGER);")},
		"migrations/0002_bad.sql":  {Data: []byte("CREATE TABLE two (x INTEGER);\nINSERT INTO missing_table VALUES (1);")},
	}
	ms, err := loadMigrations(fsys)
	if err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("sqlite3", dsn(filepath.Join(t.TempDir(), "m.db")))
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	db.SetMaxOpenConns(1)
	err = migrate(context.Background(), db, ms, fixedClock)
	if err == nil || !strings.Contains(err.Error(), "0002_bad.sql") {
		t.Fatalf("migrate = %v, want an error naming 0002_bad.sql", err)
	}
	rows := readMigrations(t, db)
	if len(rows) != 1 || rows[0].version != 1 {
		t.Errorf("recorded migrations %+v, want only version 1", rows)
	}
	var n int
	if err := db.QueryRow("SELECT count(*) FROM sqlite_schema WHERE name = 'two'").Scan(&n); err != nil {
		t.Fatal(err)
	}
	if n != 0 {
		t.Error("table two from the failed migration survived")
	}
}
