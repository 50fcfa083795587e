package ledger

import (
	"context"
	"errors"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// derived_from round-trips; a run given directly has none; unknown runs on
// either side are refused with ErrNotFound and change nothing.
func TestDerivedFrom(t *testing.T) {
	l, _ := openTest(t)
	ctx := context.Background()
	a := beginRun(t, l, "20261202T050000Z-aaaaaa", testClock)
	b := beginRun(t, l, "20261202T050001Z-bbbbbb", testClock.Add(time.Second))
	if err := l.SetDerivedFrom(ctx, b, a); err != nil {
		t.Fatal(err)
	}
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
	bad := []struct{ run, from string }{
		{string(a), "20261202T050002Z-nosuch"},
		{"20261202T050002Z-nosuch", string(a)},
	}
	for _, tc := range bad {
		if err := l.SetDerivedFrom(ctx, pipeline.RunID(tc.run), pipeline.RunID(tc.from)); !errors.Is(err, ErrNotFound) {
			t.Errorf("SetDerivedFrom(%s, %s): %v, want ErrNotFound", tc.run, tc.from, err)
		}
	}
	if got, _ := l.DerivedFrom(ctx, a); got != "" {
		t.Errorf("a refused SetDerivedFrom changed run %s: derived from %q", a, got)
	}
	if _, err := l.DerivedFrom(ctx, "20261202T050002Z-nosuch"); !errors.Is(err, ErrNotFound) {
		t.Errorf("DerivedFrom of an unknown run: %v, want ErrNotFound", err)
	}
}
