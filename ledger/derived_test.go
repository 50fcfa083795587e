package ledger

import (
	"context"
	"database/sql"
	"errors"
	"path/filepath"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// beginDerived begins run id derived from the run from.
func beginDerived(t *testing.T, l *Ledger, id string, from pipeline.RunID, started time.Time) pipeline.RunID {
	t.Helper()
	info := runInfo(id, started)
	info.DerivedFrom = from
	if err := l.BeginRun(context.Background(), info); err != nil {
		t.Fatal(err)
	}
	return info.ID
}

// derived_from round-trips; a run given directly has none; a run derived
// from an unknown run is refused with ErrNotFound and not written.
func TestDerivedFrom(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	a := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	b := beginDerived(t, l, "20261202T050001Z-bbbbbb", a, testClock.Add(time.Second))
	tests := []struct {
		run, want string
	}{
		{string(a), ""},
		{string(b), string(a)},
	}
	for _, tc := range tests {
		got, err := l.DerivedFrom(ctx, pipeline.RunID(tc.run))
		if err != nil || string(got) != tc.want {
			t.Errorf("DerivedFrom(%s) = %q, %v; want %q", tc.run, got, err, tc.want)
		}
	}
	info := runInfo("20261202T050003Z-cccccc", testClock)
	info.DerivedFrom = "20261202T050002Z-nosuch"
	if err := l.BeginRun(ctx, info); !errors.Is(err, ErrNotFound) {
		t.Errorf("BeginRun derived from an unknown run: %v, want ErrNotFound", err)
	}
	if _, err := l.DerivedFrom(ctx, info.ID); !errors.Is(err, ErrNotFound) {
		t.Errorf("the refused run was written: %v", err)
	}
	if _, err := l.DerivedFrom(ctx, "20261202T050002Z-nosuch"); !errors.Is(err, ErrNotFound) {
		t.Errorf("DerivedFrom of an unknown run: %v, want ErrNotFound", err)
	}
}

// AllDerivedFrom agrees with DerivedFrom for every run, including a chain
// (c from b from a) and a run derived from nothing, which is absent.
func TestAllDerivedFrom(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	a := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	b := beginDerived(t, l, "20261202T050001Z-bbbbbb", a, testClock.Add(time.Second))
	c := beginDerived(t, l, "20261202T050002Z-cccccc", b, testClock.Add(2*time.Second))
	all, err := l.AllDerivedFrom(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(all) != 2 {
		t.Errorf("AllDerivedFrom has %d entries, want 2: %v", len(all), all)
	}
	if _, ok := all[a]; ok {
		t.Errorf("run %s, derived from nothing, is in the map as derived from %q", a, all[a])
	}
	for _, run := range []pipeline.RunID{a, b, c} {
		want, err := l.DerivedFrom(ctx, run)
		if err != nil {
			t.Fatal(err)
		}
		if all[run] != want {
			t.Errorf("AllDerivedFrom[%s] = %q, DerivedFrom says %q", run, all[run], want)
		}
	}
	if all[c] != b || all[b] != a {
		t.Errorf("AllDerivedFrom = %v, want %s→%s and %s→%s", all, c, b, b, a)
	}
}

// A run begun with DerivedFrom and Parts reads them back; a reference to
// an unknown run refuses the run with ErrNotFound and writes nothing; a
// merge into another ledger carries both where that ledger holds the
// runs referred to.
func TestBeginRunLinks(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	a := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	b := beginRun(t, l, "20261202T050001Z-bbbbbb", testClock.Add(time.Second))
	for _, id := range []pipeline.RunID{a, b} {
		if err := l.FinishRun(ctx, id, pipeline.RunSucceeded, testClock.Add(3*time.Second), ""); err != nil {
			t.Fatal(err)
		}
	}
	info := runInfo("20261202T050002Z-cccccc", testClock.Add(2*time.Second))
	info.DerivedFrom, info.Parts = a, []pipeline.RunID{b, a}
	if err := l.BeginRun(ctx, info); err != nil {
		t.Fatal(err)
	}
	l.FinishRun(ctx, info.ID, pipeline.RunSucceeded, testClock.Add(4*time.Second), "")
	d, err := l.Run(ctx, info.ID)
	if err != nil || d.DerivedFrom != a || len(d.Parts) != 2 || d.Parts[0] != b || d.Parts[1] != a {
		t.Fatalf("read back: derived %q parts %v (%v)", d.DerivedFrom, d.Parts, err)
	}
	if all, _ := l.AllParts(ctx); len(all) != 1 || len(all[info.ID]) != 2 {
		t.Errorf("AllParts = %v", all)
	}
	for _, bad := range []pipeline.RunInfo{
		func() pipeline.RunInfo {
			i := runInfo("20261202T050003Z-dddddd", testClock)
			i.DerivedFrom = "nosuch"
			return i
		}(),
		func() pipeline.RunInfo {
			i := runInfo("20261202T050004Z-eeeeee", testClock)
			i.Parts = []pipeline.RunID{a, "nosuch"}
			return i
		}(),
	} {
		if err := l.BeginRun(ctx, bad); !errors.Is(err, ErrNotFound) {
			t.Errorf("BeginRun with an unknown link: %v, want ErrNotFound", err)
		}
		if _, err := l.Run(ctx, bad.ID); !errors.Is(err, ErrNotFound) {
			t.Errorf("refused run %s was written", bad.ID)
		}
	}
	other, _ := openTest(t)
	if _, err := other.Merge(ctx, l.Path()); err != nil {
		t.Fatal(err)
	}
	if d, err := other.Run(ctx, info.ID); err != nil || d.DerivedFrom != a || len(d.Parts) != 2 {
		t.Errorf("merged: derived %q parts %v (%v)", d.DerivedFrom, d.Parts, err)
	}
}

// A ledger written before run_links (migrations up to 0007, derived_from a
// column of runs) reads its derived runs back after the migration.
func TestDerivedFromMigratesToRunLinks(t *testing.T) {
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for i, m := range ms {
		if m.version == 7 {
			n = i + 1
		}
	}
	if n == 0 {
		t.Fatal("no migration 0007")
	}
	path := filepath.Join(t.TempDir(), "old.db")
	db, err := sql.Open("sqlite3", dsn(path))
	if err != nil {
		t.Fatal(err)
	}
	if err := migrate(ctx, db, ms[:n], fixedClock); err != nil {
		t.Fatal(err)
	}
	for _, id := range []string{"ra", "rb"} {
		info := runInfo(id, testClock)
		if _, err := db.Exec(`INSERT INTO runs (id, started_at, finished_at, tool_version, config_path, config_text, config_hash, status, error)
			VALUES (?, ?, ?, ?, ?, ?, ?, 'succeeded', '')`, id, formatTime(testClock), formatTime(testClock), info.ToolVersion, info.ConfigPath, info.ConfigText, info.ConfigHash); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := db.Exec("UPDATE runs SET derived_from = 'ra' WHERE id = 'rb'"); err != nil {
		t.Fatal(err)
	}
	db.Close()
	l, err := Open(path, WithClock(fixedClock))
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if got, err := l.DerivedFrom(ctx, "rb"); err != nil || got != "ra" {
		t.Errorf("after migration rb is derived from %q (%v), want ra", got, err)
	}
	if all, _ := l.AllDerivedFrom(ctx); len(all) != 1 {
		t.Errorf("AllDerivedFrom after migration: %v", all)
	}
}
