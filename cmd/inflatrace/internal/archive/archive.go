// Package archive writes and reads release archives of a run: a folder or
// a .tar.gz holding the configuration, the results, a self-contained
// ledger with exactly that run's nodes, and a manifest with the SHA-256 of
// every file and the tool version. Reading checks every file against the
// manifest before anything is used.
package archive

import (
	"archive/tar"
	"compress/gzip"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// ManifestName is the manifest's file name inside an archive.
const ManifestName = "manifest.json"

// LedgerName is the name of the archive's ledger file.
const LedgerName = "ledger.db"

// Entry is one file of an archive.
type Entry struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
	Bytes  int64  `json:"bytes"`
}

// Manifest lists an archive's files.
type Manifest struct {
	Format      string  `json:"format"`
	ToolVersion string  `json:"tool_version"`
	Run         string  `json:"run"`
	Created     string  `json:"created"`
	Files       []Entry `json:"files"`
}

// FormatName identifies the manifest format.
const FormatName = "inflatrace-archive/1"

// WriteManifest hashes every file in dir (except the manifest) and writes
// the manifest.
func WriteManifest(dir, toolVersion string, run pipeline.RunID, created time.Time) (Manifest, error) {
	m := Manifest{Format: FormatName, ToolVersion: toolVersion, Run: string(run), Created: created.UTC().Format(time.RFC3339)}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		rel = filepath.ToSlash(rel)
		if rel == ManifestName {
			return nil
		}
		data, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		m.Files = append(m.Files, Entry{Path: rel, SHA256: pipeline.Sum(data), Bytes: int64(len(data))})
		return nil
	})
	if err != nil {
		return m, err
	}
	sort.Slice(m.Files, func(i, j int) bool { return m.Files[i].Path < m.Files[j].Path })
	data, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return m, err
	}
	return m, os.WriteFile(filepath.Join(dir, ManifestName), append(data, '\n'), 0o644)
}

// TamperError reports an archive whose content no longer matches its
// manifest.
type TamperError struct {
	Archive, File, Msg string
}

func (e *TamperError) Error() string {
	return fmt.Sprintf("archive %s refused: %s: %s (the archive was changed after it was written; ask its author for an intact copy)", e.Archive, e.File, e.Msg)
}

// Check verifies every file of an unpacked archive against its manifest:
// no file missing, none extra, every SHA-256 and size as listed.
func Check(name, dir string) (Manifest, error) {
	var m Manifest
	data, err := os.ReadFile(filepath.Join(dir, ManifestName))
	if err != nil {
		return m, &TamperError{name, ManifestName, "missing or unreadable: " + err.Error()}
	}
	if err := json.Unmarshal(data, &m); err != nil {
		return m, &TamperError{name, ManifestName, "not a manifest: " + err.Error()}
	}
	if m.Format != FormatName {
		return m, &TamperError{name, ManifestName, fmt.Sprintf("format %q, want %q", m.Format, FormatName)}
	}
	listed := map[string]Entry{}
	for _, e := range m.Files {
		listed[e.Path] = e
	}
	seen := map[string]bool{}
	err = filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		rel = filepath.ToSlash(rel)
		if rel == ManifestName {
			return nil
		}
		e, ok := listed[rel]
		if !ok {
			return &TamperError{name, rel, "not listed in the manifest"}
		}
		data, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		if got := pipeline.Sum(data); got != e.SHA256 || int64(len(data)) != e.Bytes {
			return &TamperError{name, rel, fmt.Sprintf("expected %s (%d bytes), found %s (%d bytes)", e.SHA256, e.Bytes, got, len(data))}
		}
		seen[rel] = true
		return nil
	})
	if err != nil {
		return m, err
	}
	for _, e := range m.Files {
		if !seen[e.Path] {
			return m, &TamperError{name, e.Path, "listed in the manifest but missing"}
		}
	}
	return m, nil
}

// Pack writes dir's files as a gzip-compressed tar at path, in sorted
// order with fixed modes and times, so the same files give the same bytes.
func Pack(dir, path string, modTime time.Time) error {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return err
	}
	gz := gzip.NewWriter(f)
	tw := tar.NewWriter(gz)
	var files []string
	err = filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			files = append(files, p)
		}
		return err
	})
	if err == nil {
		sort.Strings(files)
		for _, p := range files {
			rel, _ := filepath.Rel(dir, p)
			var data []byte
			if data, err = os.ReadFile(p); err != nil {
				break
			}
			hdr := &tar.Header{Name: filepath.ToSlash(rel), Mode: 0o644, Size: int64(len(data)), ModTime: modTime.UTC().Truncate(time.Second), Format: tar.FormatPAX}
			if err = tw.WriteHeader(hdr); err != nil {
				break
			}
			if _, err = tw.Write(data); err != nil {
				break
			}
		}
	}
	for _, c := range []io.Closer{tw, gz, f} {
		if cerr := c.Close(); err == nil {
			err = cerr
		}
	}
	if err != nil {
		os.Remove(path)
	}
	return err
}

// Unpack extracts a .tar.gz into dir, refusing absolute paths, ".."
// components, links and special files.
func Unpack(path, dir string) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	gz, err := gzip.NewReader(f)
	if err != nil {
		return fmt.Errorf("archive %s: not gzip: %w", path, err)
	}
	tr := tar.NewReader(gz)
	for {
		hdr, err := tr.Next()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return fmt.Errorf("archive %s: %w", path, err)
		}
		name := filepath.FromSlash(hdr.Name)
		if filepath.IsAbs(name) || strings.HasPrefix(filepath.Clean(name), "..") {
			return &TamperError{path, hdr.Name, "path leaves the archive"}
		}
		switch hdr.Typeflag {
		case tar.TypeDir:
			continue
		case tar.TypeReg:
		default:
			return &TamperError{path, hdr.Name, "not a regular file"}
		}
		dst := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
			return err
		}
		out, err := os.OpenFile(dst, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if err != nil {
			return err
		}
		_, err = io.Copy(out, io.LimitReader(tr, 1<<31))
		if cerr := out.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return err
		}
	}
}
