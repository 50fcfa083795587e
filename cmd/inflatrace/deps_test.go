package main

import (
	"os/exec"
	"strings"
	"testing"
)

// TestDependencyDirections enforces the layout rules of DEVELOPERS.md
// with `go list -deps`.
func TestDependencyDirections(t *testing.T) {
	const mod = "github.com/inflatrace/inflatrace/"
	rules := []struct {
		pkg       string
		forbidden []string
	}{
		{"stages/num", []string{mod + "pipeline", mod + "ledger", mod + "cmd", mod + "stages/model", "github.com/mattn/go-sqlite3", "github.com/pelletier/go-toml", "github.com/spf13/cobra"}},
		{"stages/model", []string{mod + "pipeline", mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/pelletier/go-toml", "github.com/spf13/cobra"}},
		{"stages/canonical", []string{mod + "pipeline", mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/pelletier/go-toml", "github.com/spf13/cobra"}},
		{"stages/slowroll", []string{mod + "pipeline", mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/pelletier/go-toml", "github.com/spf13/cobra"}},
		{"stages/reheat", []string{mod + "pipeline", mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/pelletier/go-toml", "github.com/spf13/cobra"}},
		{"stages/compare", []string{mod + "pipeline", mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/pelletier/go-toml", "github.com/spf13/cobra"}},
		{"stages/nodes", []string{mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/spf13/cobra"}},
		{"stages/study", []string{mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/spf13/cobra"}},
		{"stages/study/revision", []string{mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/spf13/cobra"}},
		{"pipeline", []string{mod + "stages", mod + "ledger", mod + "cmd", "github.com/mattn/go-sqlite3", "github.com/spf13/cobra", "github.com/pelletier/go-toml", "github.com/goccy/go-graphviz"}},
		{"ledger", []string{mod + "stages", mod + "cmd", "github.com/spf13/cobra"}},
	}
	for _, r := range rules {
		out, err := exec.Command("go", "list", "-deps", mod+r.pkg).Output()
		if err != nil {
			t.Fatalf("go list -deps %s: %v", r.pkg, err)
		}
		for _, dep := range strings.Fields(string(out)) {
			for _, f := range r.forbidden {
				if dep == f || strings.HasPrefix(dep, f+"/") {
					t.Errorf("%s imports %s", r.pkg, dep)
				}
			}
		}
	}
}
