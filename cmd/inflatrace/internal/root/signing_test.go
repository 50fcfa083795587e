package root

import (
	"crypto/sha256"
	"database/sql"
	"math/rand"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
	"github.com/inflatrace/inflatrace/pipeline"
)

// trust writes the signers line of h's key into other's allowed_signers.
func trust(t *testing.T, h, other *harness) {
	t.Helper()
	out := h.mustRun("key")
	var line string
	for _, l := range strings.Split(out, "\n") {
		if rest, ok := strings.CutPrefix(l, "signers line "); ok {
			line = rest
		}
	}
	if line == "" {
		t.Fatalf("key printed no signers line:\n%s", out)
	}
	dir := filepath.Join(other.dir, "config", "inflatrace")
	if err := os.MkdirAll(dir, 0o700); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "allowed_signers"), []byte("# a colleague\n"+line+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
}

// A release is signed with its author's key (made on first use, outside
// the ledger): a referee's ssh-keygen verifies it; another user's import
// refuses it until they trust the key (or say --allow-untrusted); an
// archive whose results were edited, its manifest rewritten and signed
// again with another key is refused even when that key is accepted,
// because its results no longer match its own ledger; rotating the key
// keeps the old one.
func TestSignedReleases(t *testing.T) {
	author := newHarness(t)
	r := decodeRun(t, author.mustRun("run", author.write("a.toml", studyA), "--json"))
	dir := filepath.Join(author.dir, "release")
	author.mustRun("export", r.Run, "--out", dir)
	if _, err := os.Stat(filepath.Join(dir, archive.SignatureName)); err != nil {
		t.Fatalf("the export carries no signature: %v", err)
	}
	if keygen, err := exec.LookPath("ssh-keygen"); err == nil {
		allowed := filepath.Join(author.dir, "allowed_signers")
		out := author.mustRun("key")
		line := out[strings.Index(out, "signers line ")+len("signers line "):]
		line = line[:strings.Index(line, "\n")]
		if err := os.WriteFile(allowed, []byte(line+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		principal := strings.Fields(line)[0]
		manifest, err := os.Open(filepath.Join(dir, archive.ManifestName))
		if err != nil {
			t.Fatal(err)
		}
		cmd := exec.Command(keygen, "-Y", "verify", "-f", allowed, "-I", principal, "-n", archive.SignatureNamespace, "-s", filepath.Join(dir, archive.SignatureName))
		cmd.Stdin = manifest
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Errorf("ssh-keygen -Y verify of an exported release: %v\n%s", err, out)
		}
		manifest.Close()
	} else if os.Getenv("INFLATRACE_SSH_E2E") != "" {
		t.Fatal("INFLATRACE_SSH_E2E is set but ssh-keygen is not installed")
	}

	referee := newHarness(t)
	if _, errs, code := referee.run("import", dir); code != app.ExitRunFailed || !strings.Contains(errs, "a key you do not trust") || !strings.Contains(errs, "allowed_signers") {
		t.Errorf("import signed by an unknown key: exit %d, %q; want 3 saying how to trust it", code, errs)
	}
	// Accepted from an untrusted key: marked unverified until verify RUN.
	skeptic := newHarness(t)
	skeptic.rng = rand.New(rand.NewSource(99)) // run ids of its own, not the author's
	if _, errs, code := skeptic.run("import", dir, "--allow-untrusted"); code != 0 || !strings.Contains(errs, "marked unverified") {
		t.Errorf("import --allow-untrusted: exit %d, %q", code, errs)
	}
	if out := skeptic.mustRun("show", r.Run); !strings.Contains(out, "UNVERIFIED") {
		t.Errorf("show of an unverified run says nothing:\n%s", out)
	}
	// Its nodes and works are not reused: the same study computes again
	// (and its outputs agree, which vouches for the rows).
	again := decodeRun(t, skeptic.mustRun("run", skeptic.write("a.toml", studyA), "--json"))
	if again.Computed == 0 || again.Reused != 0 {
		t.Errorf("a run over an unverified import: %d computed, %d reused; want nothing reused", again.Computed, again.Reused)
	}
	if third := decodeRun(t, skeptic.mustRun("run", skeptic.write("a.toml", studyA), "--json")); third.Computed != 0 {
		t.Errorf("after the recomputation agreed: %d computed, want 0", third.Computed)
	}
	if _, errs, code := skeptic.run("export", r.Run, "--out", filepath.Join(skeptic.dir, "laundered")); code == 0 || !strings.Contains(errs, "unverified") {
		t.Errorf("export of an unverified run under one's own signature: exit %d, %q; want a refusal", code, errs)
	}
	if _, errs, code := skeptic.run("verify", r.Run); code != 0 || !strings.Contains(errs, "no longer marked unverified") {
		t.Errorf("verify RUN of an unverified run: exit %d, %q", code, errs)
	}
	if out := skeptic.mustRun("show", r.Run); strings.Contains(out, "UNVERIFIED") {
		t.Error("the run is still marked unverified after verify RUN")
	}
	trust(t, author, referee)
	// verify ARCHIVE checks it as import does, without importing it.
	if out, errs, code := referee.run("verify", dir); code != 0 || !strings.Contains(out, "intact") {
		t.Errorf("verify ARCHIVE of an intact, trusted release: exit %d, %q %q", code, out, errs)
	}
	if referee.runs() != 0 {
		t.Error("verify ARCHIVE imported the archive")
	}
	if _, errs, code := referee.run("import", dir); code != 0 || !strings.Contains(errs, "signed by") {
		t.Errorf("import signed by a trusted key: exit %d, %q", code, errs)
	}

	// A forger edits results.json, rewrites the manifest and signs it with
	// a key of their own.
	forged := filepath.Join(author.dir, "forged")
	author.mustRun("export", r.Run, "--out", forged)
	res := filepath.Join(forged, "results.json")
	text, _ := os.ReadFile(res)
	edited := strings.Replace(string(text), `"n_s": 0.9`, `"n_s": 0.8`, 1)
	if edited == string(text) {
		t.Fatal("the edit changed nothing")
	}
	os.WriteFile(res, []byte(edited), 0o644)
	os.Remove(filepath.Join(forged, archive.ManifestName))
	os.Remove(filepath.Join(forged, archive.SignatureName))
	if _, err := archive.WriteManifest(forged, app.Version, pipeline.RunID(r.Run), time.Unix(0, 0)); err != nil {
		t.Fatal(err)
	}
	other := newHarness(t)
	if _, errs, code := other.run("import", forged, "--allow-unsigned"); code != app.ExitRunFailed || !strings.Contains(errs, "results.json") {
		t.Errorf("import of edited results with a rewritten manifest: exit %d, %q; want 3 naming results.json", code, errs)
	}
	if _, errs, code := other.run("verify", forged, "--allow-unsigned"); code != app.ExitRunFailed || !strings.Contains(errs, "results.json") {
		t.Errorf("verify ARCHIVE of edited results: exit %d, %q; want 3 naming results.json", code, errs)
	}
	if _, errs, code := other.run("import", forged); code != app.ExitRunFailed || !strings.Contains(errs, "no signature") {
		t.Errorf("import of an unsigned archive: exit %d, %q", code, errs)
	}

	// Rotation keeps the old key beside the new one.
	before := author.mustRun("key")
	after := author.mustRun("key", "--rotate")
	if before == after {
		t.Error("--rotate kept the same key")
	}
	retired, _ := filepath.Glob(filepath.Join(author.dir, "config", "inflatrace", "signing_key.retired-*"))
	if len(retired) != 2 {
		t.Errorf("retired key files: %v, want the key and its .pub", retired)
	}
}

// Seals are signed with the user's key: verify --all checks each
// signature against the stored seal, so a seal rewritten after signing (as
// a consistent edit of a run's rows must rewrite it) is reported; runs
// sealed by a key the user does not trust are named.
func TestSignedSeals(t *testing.T) {
	h := newHarness(t)
	a := decodeRun(t, h.mustRun("run", h.write("a.toml", studyA), "--json"))
	b := decodeRun(t, h.mustRun("run", h.write("b.toml", studyA+"\n[[forecast]]\nuse = \"tern-b\"\n"), "--json"))
	if _, errs, code := h.run("verify", "--all"); code != 0 || strings.Contains(errs, "no seal signature") || strings.Contains(errs, "do not trust") {
		t.Errorf("verify --all of signed seals: exit %d, %q", code, errs)
	}
	db, err := sql.Open("sqlite3", h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	// b's signature put on a: a genuine signature, of another seal.
	if _, err := db.Exec("UPDATE runs SET seal_signature = (SELECT seal_signature FROM runs WHERE id = ?) WHERE id = ?", b.Run, a.Run); err != nil {
		t.Fatal(err)
	}
	db.Close()
	if out, _, code := h.run("verify", "--all"); code != app.ExitRunFailed || !strings.Contains(out, "rewritten after it was signed") || !strings.Contains(out, a.Run) {
		t.Errorf("verify --all after a seal signature was swapped: exit %d, %q", code, out)
	}
	// Another user's runs, merged in, are sealed by a key not trusted here.
	other := newHarness(t)
	other.mustRun("run", other.write("a.toml", studyA))
	h2 := newHarness(t)
	h2.mustRun("merge", other.ledger)
	if _, errs, code := h2.run("verify", "--all"); code != 0 || !strings.Contains(errs, "a key you do not trust") {
		t.Errorf("verify --all of another user's runs: exit %d, %q", code, errs)
	}
	trust(t, other, h2)
	if _, errs, _ := h2.run("verify", "--all"); strings.Contains(errs, "do not trust") {
		t.Errorf("verify --all after trusting the key: %q", errs)
	}
}

// A node row edited consistently (its outputs and their hash rewritten
// together, so every hash check passes) is reported by verify --all (its
// authentication code no longer matches) and never reused: the next run
// that needs it computes it again, quarantines the edited row and gives
// the prediction first computed.
func TestConsistentNodeEditIsNotReused(t *testing.T) {
	h := newHarness(t)
	first := decodeRun(t, h.mustRun("run", demoPath(t), "--json"))
	db, err := sql.Open("sqlite3", h.ledger)
	if err != nil {
		t.Fatal(err)
	}
	var id int64
	var outputs string
	if err := db.QueryRow("SELECT id, outputs FROM nodes WHERE stage = 'reheat' ORDER BY id LIMIT 1").Scan(&id, &outputs); err != nil {
		t.Fatal(err)
	}
	edited := strings.Replace(outputs, "n_s f 0.9", "n_s f 0.8", 1)
	if edited == outputs {
		t.Fatal("the edit changed nothing")
	}
	sum := sha256.Sum256([]byte(edited))
	if _, err := db.Exec("UPDATE nodes SET outputs = ?, output_hash = ? WHERE id = ?", edited, sum[:], id); err != nil {
		t.Fatal(err)
	}
	db.Close()
	if out, _, code := h.run("verify", "--all"); code != app.ExitRunFailed || !strings.Contains(out, "authentication code does not match") {
		t.Errorf("verify --all after a consistent edit: exit %d, %q", code, out)
	}
	out, errs, code := h.run("run", demoOtherSet(t, h), "--json")
	if code != 0 || !strings.Contains(errs, "found edited") {
		t.Fatalf("run over a consistently edited node: exit %d, %q", code, errs)
	}
	second := decodeRun(t, out)
	for i, r := range second.Results {
		if r["n_s"] != first.Results[i]["n_s"] {
			t.Errorf("result %d: n_s %v, first computed %v: the edited row was served", i, r["n_s"], first.Results[i]["n_s"])
		}
	}
}

// Rotating the key is routine, not an edit: the nodes written under the
// retired key are still reused by the next run, and verify --all reports
// nothing, because the node secret survives the rotation.
func TestKeyRotationKeepsTheLedger(t *testing.T) {
	h := newHarness(t)
	p := h.write("a.toml", studyA)
	first := decodeRun(t, h.mustRun("run", p, "--json"))
	h.mustRun("key", "--rotate")
	out, errs, code := h.run("run", p, "--json")
	if code != 0 {
		t.Fatalf("run after key --rotate: exit %d, %s", code, errs)
	}
	if strings.Contains(errs, "quarantin") || strings.Contains(errs, "integrity") {
		t.Errorf("run after key --rotate treats the old nodes as edited: %s", errs)
	}
	second := decodeRun(t, out)
	if second.Computed != 0 || second.Reused != first.Computed+first.Reused {
		t.Errorf("run after key --rotate: %d computed, %d reused; want 0 computed, %d reused", second.Computed, second.Reused, first.Computed+first.Reused)
	}
	if vout, verrs, code := h.run("verify", "--all"); code != 0 || strings.Contains(verrs, "do not trust") {
		t.Errorf("verify --all after key --rotate: exit %d, %s %s", code, vout, verrs)
	}
	// Deleting the retired key revokes it: what only it vouched for is
	// computed again rather than reused.
	retired, _ := filepath.Glob(filepath.Join(h.dir, "config", "inflatrace", "signing_key.retired-*"))
	if len(retired) != 2 {
		t.Fatalf("retired key files: %v", retired)
	}
	for _, f := range retired {
		os.Remove(f)
	}
	third := decodeRun(t, h.mustRun("run", p, "--json"))
	if third.Computed == 0 {
		t.Errorf("run after the retired key was deleted reused every node (%d reused)", third.Reused)
	}
}
