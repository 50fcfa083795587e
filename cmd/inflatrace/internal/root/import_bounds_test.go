package root

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/archive"
	"github.com/inflatrace/inflatrace/pipeline"
)

// released is a genuine export of one predict run, as files in memory, to
// build hostile archives from.
type released struct {
	h        *harness
	run      string
	manifest archive.Manifest
	files    map[string][]byte // every file but the manifest
	dir      string            // the export as a folder
}

func newReleased(t *testing.T, h *harness) *released {
	t.Helper()
	h.mustRun("predict", "--family", "e-model", "--param", "alpha=1", "--efolds", "55")
	runs := h.listRuns()
	r := &released{h: h, run: runs[0].Run, files: map[string][]byte{}, dir: filepath.Join(h.dir, "release")}
	h.mustRun("export", r.run, "--out", r.dir)
	data, err := os.ReadFile(filepath.Join(r.dir, archive.ManifestName))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &r.manifest); err != nil {
		t.Fatal(err)
	}
	for _, e := range r.manifest.Files {
		if r.files[e.Path], err = os.ReadFile(filepath.Join(r.dir, filepath.FromSlash(e.Path))); err != nil {
			t.Fatal(err)
		}
	}
	return r
}

// tarEntry is one entry of a hand-built tar: a header and its content,
// either bytes or that many zeros (a bomb's content compresses to almost
// nothing).
type tarEntry struct {
	hdr   tar.Header
	body  []byte
	zeros int64
}

func regular(name string, body []byte) tarEntry {
	return tarEntry{hdr: tar.Header{Name: name, Typeflag: tar.TypeReg, Mode: 0o644, Size: int64(len(body))}, body: body}
}

// manifestEntry marshals m as the manifest's entry.
func manifestEntry(t *testing.T, m archive.Manifest) tarEntry {
	data, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return regular(archive.ManifestName, data)
}

// entries returns the manifest and then every file, as an intact archive.
func (r *released) entries(t *testing.T) []tarEntry {
	es := []tarEntry{manifestEntry(t, r.manifest)}
	for _, e := range r.manifest.Files {
		es = append(es, regular(e.Path, r.files[e.Path]))
	}
	return es
}

// writeTar writes entries as a .tar.gz in the harness folder.
func (r *released) writeTar(t *testing.T, name string, entries []tarEntry) string {
	t.Helper()
	p := filepath.Join(r.h.dir, name)
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	gz := gzip.NewWriter(f)
	tw := tar.NewWriter(gz)
	for _, e := range entries {
		hdr := e.hdr
		hdr.ModTime = time.Unix(0, 0)
		if err := tw.WriteHeader(&hdr); err != nil {
			t.Fatal(err)
		}
		if e.zeros > 0 {
			_, err = io.CopyN(tw, zeroReader{}, e.zeros)
		} else {
			_, err = tw.Write(e.body)
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	for _, c := range []io.Closer{tw, gz, f} {
		if err := c.Close(); err != nil {
			t.Fatal(err)
		}
	}
	return p
}

type zeroReader struct{}

func (zeroReader) Read(p []byte) (int, error) { clear(p); return len(p), nil }

// copyDir copies the exported folder to a new folder of the harness.
func (r *released) copyDir(t *testing.T, name string) string {
	t.Helper()
	dst := filepath.Join(r.h.dir, name)
	for _, e := range r.manifest.Files {
		p := filepath.Join(dst, filepath.FromSlash(e.Path))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, r.files[e.Path], 0o644); err != nil {
			t.Fatal(err)
		}
	}
	data, _ := os.ReadFile(filepath.Join(r.dir, archive.ManifestName))
	if err := os.WriteFile(filepath.Join(dst, archive.ManifestName), data, 0o644); err != nil {
		t.Fatal(err)
	}
	return dst
}

// target is a ledger holding a run of its own, into which archives are
// imported, with TMPDIR pointed at a folder of the test's.
type target struct {
	h           *harness
	ledger, tmp string
	runsBefore  string
}

func newTarget(t *testing.T, h *harness) *target {
	tg := &target{h: h, ledger: filepath.Join(h.dir, "target.db"), tmp: filepath.Join(h.dir, "tmp")}
	h.mustRun("--ledger", tg.ledger, "predict", "--family", "starobinsky", "--efolds", "50")
	tg.runsBefore = h.mustRun("--ledger", tg.ledger, "runs", "--json")
	if err := os.MkdirAll(tg.tmp, 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("TMPDIR", tg.tmp)
	return tg
}

// refused imports arc and checks the refusal: exit 3, a message naming
// the archive and every wanted piece, the target's runs unchanged and
// nothing left in TMPDIR.
func (tg *target) refused(t *testing.T, arc string, extra []string, want ...string) {
	t.Helper()
	// These archives are made by hand, unsigned: what is tested is the
	// bounds, which apply before any signature is looked at.
	args := append([]string{"--ledger", tg.ledger, "import", arc, "--allow-unsigned"}, extra...)
	_, errs, code := tg.h.run(args...)
	if code != app.ExitRunFailed {
		t.Errorf("%s: exit %d, want %d (refused): %s", filepath.Base(arc), code, app.ExitRunFailed, errs)
	}
	for _, w := range append([]string{"archive " + arc + " refused"}, want...) {
		if !strings.Contains(errs, w) {
			t.Errorf("%s: the error lacks %q: %s", filepath.Base(arc), w, errs)
		}
	}
	tg.unchanged(t, filepath.Base(arc))
}

func (tg *target) unchanged(t *testing.T, what string) {
	t.Helper()
	if after := tg.h.mustRun("--ledger", tg.ledger, "runs", "--json"); after != tg.runsBefore {
		t.Errorf("%s: the target ledger's runs changed:\n%s\nwere\n%s", what, after, tg.runsBefore)
	}
	tg.noTemp(t, what)
}

func (tg *target) noTemp(t *testing.T, what string) {
	t.Helper()
	left, err := os.ReadDir(tg.tmp)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range left {
		t.Errorf("%s: %s left behind in TMPDIR", what, e.Name())
	}
}

// hostileTar is an archive built to be refused, the flags of its import
// and the pieces its error must name.
type hostileTar struct {
	name    string
	entries []tarEntry
	flags   []string
	want    []string
}

// Hostile .tar.gz archives are refused before anything is merged, each
// naming the archive, the entry and the fault, and leaving no temporary
// files; a folder archive is held to the same rules.
func TestImportRefusesHostileTarballs(t *testing.T) {
	h := newHarness(t)
	r := newReleased(t, h)
	tg := newTarget(t, h)
	const config = "config.toml"
	if r.files[config] == nil || r.files[archive.LedgerName] == nil {
		t.Fatalf("test setup: the export lacks %s or %s: %v", config, archive.LedgerName, r.manifest.Files)
	}
	// with replaces the entry named name (keeping the order).
	with := func(name string, e tarEntry) []tarEntry {
		es := r.entries(t)
		for i := range es {
			if es[i].hdr.Name == name {
				es[i] = e
			}
		}
		return es
	}
	big := int64(4 << 20) // 4 MiB of zeros: a few kilobytes compressed
	cases := []hostileTar{
		{"bomb.tar.gz", // the header's size exceeds the manifest's: refused before a byte is read
			with(config, tarEntry{hdr: tar.Header{Name: config, Typeflag: tar.TypeReg, Mode: 0o644, Size: big}, zeros: big}),
			nil, []string{config, fmt.Sprintf("%d bytes, the manifest lists %d", big, len(r.files[config]))}},
		{"unlisted.tar.gz", append(r.entries(t), regular("notes.txt", []byte("hello"))),
			nil, []string{"notes.txt: not listed in the manifest"}},
		{"symlink.tar.gz", with(config, tarEntry{hdr: tar.Header{Name: config, Typeflag: tar.TypeSymlink, Linkname: "/etc/passwd"}}),
			nil, []string{config + ": a symbolic link (to \"/etc/passwd\")"}},
		{"hardlink.tar.gz", append(r.entries(t), tarEntry{hdr: tar.Header{Name: "again.db", Typeflag: tar.TypeLink, Linkname: archive.LedgerName}}),
			nil, []string{"again.db: a hard link"}},
		{"fifo.tar.gz", append(r.entries(t), tarEntry{hdr: tar.Header{Name: "pipe", Typeflag: tar.TypeFifo, Mode: 0o644}}),
			nil, []string{"pipe: a named pipe"}},
		{"device.tar.gz", append(r.entries(t), tarEntry{hdr: tar.Header{Name: "null", Typeflag: tar.TypeChar, Mode: 0o644, Devmajor: 1, Devminor: 3}}),
			nil, []string{"null: a device file"}},
		{"escape.tar.gz", append(r.entries(t), regular("../escape", []byte("x"))),
			nil, []string{"../escape: a path with a \"..\" component"}},
		{"absolute.tar.gz", append(r.entries(t), regular("/tmp/abs", []byte("x"))),
			nil, []string{"/tmp/abs: an absolute path"}},
		{"duplicate.tar.gz", append(r.entries(t), regular(config, r.files[config])),
			nil, []string{config + ": appears twice"}},
		{"resized.tar.gz", with(config, regular(config, append(bytes.Clone(r.files[config]), "# more\n"...))),
			nil, []string{config, fmt.Sprintf("%d bytes, the manifest lists %d", len(r.files[config])+7, len(r.files[config]))}},
		{"missing.tar.gz", with(config, tarEntry{hdr: tar.Header{Name: "figures", Typeflag: tar.TypeDir, Mode: 0o755}}),
			nil, []string{config + ": listed in the manifest but missing"}},
		{"nomanifest.tar.gz", r.entries(t)[1:], nil, []string{"manifest.json: missing"}},
	}
	// A bomb the manifest declares honestly is refused by the cap, before
	// extraction, with both sizes and the flag.
	bombManifest := r.manifest
	bombManifest.Files = append(append([]archive.Entry(nil), r.manifest.Files...),
		archive.Entry{Path: "zeros.bin", SHA256: zeroSum(big), Bytes: big})
	bomb := append([]tarEntry{manifestEntry(t, bombManifest)}, r.entries(t)[1:]...)
	bomb = append(bomb, tarEntry{hdr: tar.Header{Name: "zeros.bin", Typeflag: tar.TypeReg, Mode: 0o644, Size: big}, zeros: big})
	cases = append(cases, hostileTar{"capped.tar.gz", bomb, []string{"--max-size", "1MB"},
		[]string{"manifest.json: the manifest lists", "more than the import limit of 976.5 KiB (1000000 bytes)", "--max-size"}})
	// A manifest over its own limit (it is read into memory): 9 MiB of
	// blanks after the JSON.
	fat := manifestEntry(t, r.manifest)
	fat.body = append(fat.body, bytes.Repeat([]byte(" "), 9<<20)...)
	fat.hdr.Size = int64(len(fat.body))
	cases = append(cases, hostileTar{"fatmanifest.tar.gz", append([]tarEntry{fat}, r.entries(t)[1:]...), nil,
		[]string{fmt.Sprintf("manifest.json: %d bytes, more than the %d a manifest may hold", fat.hdr.Size, archive.MaxManifestBytes)}})
	// A manifest without sizes cannot be checked before extraction.
	var raw map[string]any
	mdata, _ := json.Marshal(r.manifest)
	json.Unmarshal(mdata, &raw)
	for _, f := range raw["files"].([]any) {
		delete(f.(map[string]any), "bytes")
	}
	mdata, _ = json.Marshal(raw)
	cases = append(cases, hostileTar{"sizeless.tar.gz", append([]tarEntry{regular(archive.ManifestName, mdata)}, r.entries(t)[1:]...), nil,
		[]string{"without its size (bytes)"}})

	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			arc := r.writeTar(t, c.name, c.entries)
			if info, _ := os.Stat(arc); info.Size() > 1<<20 {
				t.Fatalf("test setup: %s is %d bytes; hostile archives must stay small", c.name, info.Size())
			}
			tg.refused(t, arc, c.flags, c.want...)
		})
	}

	// The same archive intact imports, in either entry order (an archive
	// of an older export has its manifest among the sorted files).
	sorted := r.entries(t)
	sort.Slice(sorted, func(i, j int) bool { return sorted[i].hdr.Name < sorted[j].hdr.Name })
	if sorted[0].hdr.Name == archive.ManifestName {
		t.Fatal("test setup: the manifest sorts first, so the older order is not exercised")
	}
	for _, arc := range []string{r.writeTar(t, "intact.tar.gz", r.entries(t)), r.writeTar(t, "older.tar.gz", sorted)} {
		other := filepath.Join(h.dir, filepath.Base(arc)+".db")
		h.mustRun("--ledger", other, "import", arc, "--allow-unsigned")
		h.mustRun("--ledger", other, "verify", r.run) // accepted unsigned: unverified until recomputed
		if got := h.mustRun("--ledger", other, "show", r.run, "--json"); got != h.mustRun("show", r.run, "--json") {
			t.Errorf("%s: the imported run differs from the original", filepath.Base(arc))
		}
		tg.noTemp(t, filepath.Base(arc))
	}
	// The honest bomb imports under a cap of exactly its total, and is
	// refused a byte below it.
	var total int64
	for _, e := range bombManifest.Files {
		total += e.Bytes
	}
	arc := r.writeTar(t, "honest.tar.gz", bomb)
	tg.refused(t, arc, []string{"--max-size", fmt.Sprint(total - 1)}, fmt.Sprintf("totalling %s (%d bytes)", archive.FormatSize(total), total))
	h.mustRun("--ledger", filepath.Join(h.dir, "honest.db"), "import", arc, "--allow-unsigned", "--max-size", fmt.Sprint(total))
	tg.noTemp(t, "honest.tar.gz")
}

func zeroSum(n int64) string {
	data := make([]byte, n)
	return pipeline.Sum(data)
}

// A folder archive is refused for what a .tar.gz is refused for: a link
// (even to a file with the right content), a link to a folder, a named
// pipe, an unlisted, missing or resized file; and an intact one imports.
func TestImportRefusesHostileFolders(t *testing.T) {
	h := newHarness(t)
	r := newReleased(t, h)
	tg := newTarget(t, h)
	const config = "config.toml"
	cases := []struct {
		name   string
		spoil  func(dir string) error
		wanted []string
	}{
		{"symlink", func(dir string) error {
			// the link's target holds exactly the listed content
			good := filepath.Join(h.dir, "good-config.toml")
			if err := os.WriteFile(good, r.files[config], 0o644); err != nil {
				return err
			}
			os.Remove(filepath.Join(dir, config))
			return os.Symlink(good, filepath.Join(dir, config))
		}, []string{config + ": a symbolic link (to \"" + filepath.Join(h.dir, "good-config.toml") + "\")"}},
		{"linkdir", func(dir string) error {
			return os.Symlink(h.dir, filepath.Join(dir, "elsewhere"))
		}, []string{"elsewhere: a symbolic link"}},
		{"fifo", func(dir string) error {
			return syscall.Mkfifo(filepath.Join(dir, "pipe"), 0o644)
		}, []string{"pipe: a named pipe"}},
		{"manifestlink", func(dir string) error {
			m := filepath.Join(dir, archive.ManifestName)
			data, _ := os.ReadFile(m)
			good := filepath.Join(h.dir, "good-manifest.json")
			os.Remove(m)
			if err := os.WriteFile(good, data, 0o644); err != nil {
				return err
			}
			return os.Symlink(good, m)
		}, []string{archive.ManifestName + ": a symbolic link"}},
		{"unlisted", func(dir string) error {
			return os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("hello"), 0o644)
		}, []string{"notes.txt: not listed in the manifest"}},
		{"missing", func(dir string) error {
			return os.Remove(filepath.Join(dir, config))
		}, []string{config + ": listed in the manifest but missing"}},
		{"resized", func(dir string) error {
			return os.WriteFile(filepath.Join(dir, config), append(bytes.Clone(r.files[config]), "# more\n"...), 0o644)
		}, []string{fmt.Sprintf("%s: %d bytes, the manifest lists %d", config, len(r.files[config])+7, len(r.files[config]))}},
		{"capped", func(string) error { return nil },
			[]string{"manifest.json: the manifest lists", "more than the import limit of 100 bytes", "--max-size"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := r.copyDir(t, c.name)
			if err := c.spoil(dir); err != nil {
				t.Fatal(err)
			}
			var flags []string
			if c.name == "capped" {
				flags = []string{"--max-size", "100"}
			}
			tg.refused(t, dir, flags, c.wanted...)
		})
	}
	t.Run("intact", func(t *testing.T) {
		dir := r.copyDir(t, "intact")
		other := filepath.Join(h.dir, "intact.db")
		h.mustRun("--ledger", other, "import", dir, "--allow-unsigned")
		h.mustRun("--ledger", other, "verify", r.run) // accepted unsigned: unverified until recomputed
		if got := h.mustRun("--ledger", other, "show", r.run, "--json"); got != h.mustRun("show", r.run, "--json") {
			t.Error("the imported run differs from the original")
		}
		tg.noTemp(t, "intact")
	})
}

// A bad --max-size is a usage error (exit 2) naming the flag.
func TestImportMaxSizeFlag(t *testing.T) {
	h := newHarness(t)
	r := newReleased(t, h)
	for _, bad := range []string{"lots", "2GB/s", "0", "-5", "1.2.3MB"} {
		_, errs, code := h.run("--ledger", filepath.Join(h.dir, "x.db"), "import", r.dir, "--max-size", bad)
		if code != app.ExitUsage || !strings.Contains(errs, "--max-size") {
			t.Errorf("--max-size %q: exit %d, %s", bad, code, errs)
		}
	}
	if _, errs, code := h.run("--ledger", filepath.Join(h.dir, "x.db"), "import", filepath.Join(h.dir, "nowhere.tar.gz")); code != app.ExitUsage || !strings.Contains(errs, "nowhere.tar.gz") {
		t.Errorf("a missing archive: exit %d, %s", code, errs)
	}
}

// Memory stays bounded: importing an archive with a 32 MiB file allocates
// far less than the file's size (it is hashed in pieces, never held
// whole), from a .tar.gz and from a folder.
func TestImportMemoryIsBounded(t *testing.T) {
	h := newHarness(t)
	r := newReleased(t, h)
	const size = 32 << 20
	dir := r.copyDir(t, "bigdir")
	if err := os.WriteFile(filepath.Join(dir, "zeros.bin"), make([]byte, size), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := archive.WriteManifest(dir, app.Version, pipeline.RunID(r.run), time.Unix(0, 0)); err != nil {
		t.Fatal(err)
	}
	arc := filepath.Join(h.dir, "big.tar.gz")
	if err := archive.Pack(dir, arc, time.Unix(0, 0)); err != nil {
		t.Fatal(err)
	}
	for i, src := range []string{arc, dir} {
		runtime.GC()
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		h.mustRun("--ledger", filepath.Join(h.dir, fmt.Sprintf("big%d.db", i)), "import", src, "--allow-unsigned")
		runtime.ReadMemStats(&after)
		if alloc := after.TotalAlloc - before.TotalAlloc; alloc > size/4 {
			t.Errorf("import of %s allocated %d bytes in all, more than a quarter of its %d-byte file", filepath.Base(src), alloc, size)
		} else {
			t.Logf("import of %s allocated %d bytes in all", filepath.Base(src), alloc)
		}
	}
}
