package archive

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// seedArchive is the tar stream (uncompressed) of a small archive Pack
// writes: a manifest and two files.
func seedArchive(t testing.TB) []byte {
	dir := t.TempDir()
	src := filepath.Join(dir, "src")
	os.Mkdir(src, 0o755)
	os.WriteFile(filepath.Join(src, LedgerName), bytes.Repeat([]byte("ledger "), 100), 0o644)
	os.WriteFile(filepath.Join(src, "results.csv"), []byte("row,n_s\r\n1,0.9649\r\n"), 0o644)
	if _, err := WriteManifest(src, "0.1.0", "20261203T000000Z-aaaaaa", time.Unix(0, 0)); err != nil {
		t.Fatal(err)
	}
	arc := filepath.Join(dir, "a.tar.gz")
	if err := Pack(src, arc, time.Unix(0, 0)); err != nil {
		t.Fatal(err)
	}
	f, _ := os.Open(arc)
	defer f.Close()
	gz, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	raw, _ := io.ReadAll(gz)
	return raw
}

// FuzzVerifyTar feeds VerifyTar arbitrary tar streams (gzipped here, so
// that the fuzzer works on the tar format rather than on gzip checksums)
// under a 1 MiB cap. Properties: no panic; an accepted archive's kept
// file is written with exactly the size and SHA-256 its manifest lists,
// and nothing else is written under the destination; a refusal writes
// nothing outside it.
func FuzzVerifyTar(f *testing.F) {
	raw := seedArchive(f)
	f.Add(raw)
	f.Add(raw[:len(raw)/2])
	flipped := append([]byte(nil), raw...)
	flipped[len(flipped)/3] ^= 0xff
	f.Add(flipped)
	var b bytes.Buffer
	tw := tar.NewWriter(&b)
	tw.WriteHeader(&tar.Header{Name: "../escape", Mode: 0o644, Size: 1, Typeflag: tar.TypeReg})
	tw.Write([]byte("x"))
	tw.WriteHeader(&tar.Header{Name: "link", Linkname: "/etc/passwd", Typeflag: tar.TypeSymlink})
	tw.Close()
	f.Add(b.Bytes())
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		arc := filepath.Join(dir, "in.tar.gz")
		var z bytes.Buffer
		gw := gzip.NewWriter(&z)
		gw.Write(data)
		gw.Close()
		if err := os.WriteFile(arc, z.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		dst := filepath.Join(dir, "dst")
		os.Mkdir(dst, 0o755)
		m, err := VerifyTar(arc, dst, []string{LedgerName}, Limits{MaxBytes: 1 << 20})
		// Nothing but the archive and the destination in dir, whatever
		// happened.
		entries, _ := os.ReadDir(dir)
		if len(entries) != 2 {
			var names []string
			for _, e := range entries {
				names = append(names, e.Name())
			}
			t.Fatalf("VerifyTar left %v beside the archive", names)
		}
		if err != nil {
			if strings.TrimSpace(err.Error()) == "" {
				t.Fatal("an empty error")
			}
			return
		}
		written, _ := os.ReadDir(dst)
		for _, w := range written {
			if w.Name() != LedgerName {
				t.Fatalf("accepted archive wrote %s, not asked for", w.Name())
			}
		}
		for _, e := range m.Files {
			if e.Path != LedgerName {
				continue
			}
			got, err := os.ReadFile(filepath.Join(dst, LedgerName))
			if err != nil {
				t.Fatalf("accepted archive lists %s but it was not written: %v", LedgerName, err)
			}
			sum := sha256.Sum256(got)
			if int64(len(got)) != e.Bytes || !strings.HasSuffix(e.SHA256, hex.EncodeToString(sum[:])) {
				t.Fatalf("kept %s: %d bytes sha256 %x, manifest says %d bytes %s", LedgerName, len(got), sum, e.Bytes, e.SHA256)
			}
		}
	})
}

// The fuzzer's first seed is a good archive: VerifyTar accepts it and
// keeps the ledger (so the fuzz target's acceptance checks are reached).
func TestSeedArchiveVerifies(t *testing.T) {
	raw := seedArchive(t)
	dir := t.TempDir()
	arc := filepath.Join(dir, "a.tar.gz")
	var z bytes.Buffer
	gw := gzip.NewWriter(&z)
	gw.Write(raw)
	gw.Close()
	os.WriteFile(arc, z.Bytes(), 0o644)
	dst := filepath.Join(dir, "dst")
	os.Mkdir(dst, 0o755)
	if _, err := VerifyTar(arc, dst, []string{LedgerName}, Limits{MaxBytes: 1 << 20}); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(filepath.Join(dst, LedgerName)); err != nil || fi.Size() != 700 {
		t.Errorf("kept ledger: %v %v", fi, err)
	}
}
