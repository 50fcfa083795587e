package ledger

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"regexp"

	"github.com/inflatrace/inflatrace/pipeline"
)

// tagName is the form of a tag: letters, digits, '.', '_' and '-', starting
// with a letter, so that a tag cannot be mistaken for a run id (which starts
// with a digit) or for the word "latest".
var tagName = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9._-]{0,99}$`)

// ErrBadTagName is wrapped by Tag when the name is not of the form a tag
// must have.
var ErrBadTagName = errors.New("bad tag name")

// TagTakenError is Tag's refusal to give a run a name that already names
// another run (without move).
type TagTakenError struct {
	Name   string         // the tag asked for
	Holder pipeline.RunID // the run it names now
}

func (e *TagTakenError) Error() string {
	return fmt.Sprintf("tag %q already names run %s (move it with --move)", e.Name, e.Holder)
}

// Tag gives run the name. A name already given to another run is refused
// unless move is set, in which case it is moved; giving a run a name it
// already has is a no-op.
func (l *Ledger) Tag(ctx context.Context, run pipeline.RunID, name string, move bool) error {
	if !tagName.MatchString(name) || name == Latest {
		return fmt.Errorf("ledger: tag %q: %w: want a letter followed by letters, digits, '.', '_' or '-' (and not %q)", name, ErrBadTagName, Latest)
	}
	err := l.inTx(ctx, func(tx *qtx) error {
		if _, err := readRun(ctx, tx, run); err != nil {
			return err
		}
		var cur string
		err := tx.QueryRowContext(ctx, "SELECT run_id FROM tags WHERE name = ?", name).Scan(&cur)
		switch {
		case errors.Is(err, sql.ErrNoRows):
			_, err = tx.ExecContext(ctx, "INSERT INTO tags (name, run_id, created_at) VALUES (?, ?, ?)", name, string(run), formatTime(l.now()))
			return err
		case err != nil:
			return err
		case cur == string(run):
			return nil
		case !move:
			return &TagTakenError{Name: name, Holder: pipeline.RunID(cur)}
		}
		_, err = tx.ExecContext(ctx, "UPDATE tags SET run_id = ?, created_at = ? WHERE name = ?", string(run), formatTime(l.now()), name)
		return err
	})
	if err != nil {
		return fmt.Errorf("ledger: tag run %s as %q: %w", run, name, err)
	}
	return nil
}

// TagsOf returns the names of a run, sorted.
func (l *Ledger) TagsOf(ctx context.Context, run pipeline.RunID) ([]string, error) {
	var out []string
	err := l.inTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT name FROM tags WHERE run_id = ? ORDER BY name", string(run))
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var n string
			if err := rows.Scan(&n); err != nil {
				return err
			}
			out = append(out, n)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: tags of run %s: %w", run, err)
	}
	return out, nil
}

// AllTags returns the names of every tagged run, each run's sorted; a run
// without tags has no entry.
func (l *Ledger) AllTags(ctx context.Context) (map[pipeline.RunID][]string, error) {
	out := map[pipeline.RunID][]string{}
	err := l.inTx(ctx, func(tx *qtx) error {
		rows, err := tx.QueryContext(ctx, "SELECT run_id, name FROM tags ORDER BY run_id, name")
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var id, n string
			if err := rows.Scan(&id, &n); err != nil {
				return err
			}
			out[pipeline.RunID(id)] = append(out[pipeline.RunID(id)], n)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, fmt.Errorf("ledger: list tags: %w", err)
	}
	return out, nil
}

// taggedRun returns the run a tag names, if it is one.
func taggedRun(ctx context.Context, tx *qtx, name string) (pipeline.RunID, bool, error) {
	var id string
	err := tx.QueryRowContext(ctx, "SELECT run_id FROM tags WHERE name = ?", name).Scan(&id)
	if errors.Is(err, sql.ErrNoRows) {
		return "", false, nil
	}
	if err != nil {
		return "", false, err
	}
	return pipeline.RunID(id), true, nil
}
