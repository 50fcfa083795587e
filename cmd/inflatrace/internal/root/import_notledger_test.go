package root

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
)

// An archive whose manifest is intact but whose ledger.db is not a ledger
// (the manifest rewritten over other bytes) is refused, exit 3, naming
// the file, before SQLite opens it; a real ledger still imports.
func TestImportRefusesANonLedger(t *testing.T) {
	h := newHarness(t)
	r := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	dir := filepath.Join(h.dir, "rel")
	h.mustRun("export", r.Run, "--out", dir)
	if err := os.WriteFile(filepath.Join(dir, archive.LedgerName), []byte(strings.Repeat("not a database ", 100)), 0o644); err != nil {
		t.Fatal(err)
	}
	os.Remove(filepath.Join(dir, archive.ManifestName))
	if _, err := archive.WriteManifest(dir, app.Version, "x", time.Unix(0, 0)); err != nil {
		t.Fatal(err)
	}
	other := filepath.Join(h.dir, "other.db")
	// The manifest was rewritten: its signature no longer matches.
	_, errs, code := h.run("--ledger", other, "import", dir)
	if code != app.ExitRunFailed || !strings.Contains(errs, "signature does not match") {
		t.Errorf("import with a rewritten manifest: exit %d, %q; want 3 naming the signature", code, errs)
	}
	// Without the signature (and accepted unsigned), the ledger check
	// refuses it before SQLite opens it.
	os.Remove(filepath.Join(dir, archive.SignatureName))
	_, errs, code = h.run("--ledger", other, "import", dir, "--allow-unsigned")
	if code != app.ExitRunFailed || !strings.Contains(errs, "not an inflatrace ledger") {
		t.Errorf("import of a non-ledger: exit %d, %q; want 3 naming ledger.db", code, errs)
	}
	good := filepath.Join(h.dir, "good")
	h.mustRun("export", r.Run, "--out", good)
	h.mustRun("--ledger", other, "import", good)
}
