// Package archive writes and reads release archives of a run: a folder or
// a .tar.gz holding the configuration, the results, a self-contained
// ledger with exactly that run's nodes, and a manifest with the SHA-256 and
// size of every file and the tool version.
//
// Reading (verify.go) checks every file against the manifest before
// anything is used, streaming: sizes are checked against the manifest and a
// total cap before a byte of content is read, no file is held whole in
// memory, and a folder and a .tar.gz are held to the same rules.
package archive

import (
	"archive/tar"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
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
	// Raw is the manifest's bytes as read (what its signature signs), and
	// Signature the archive's signature file, if it has one; neither is
	// written into the manifest.
	Raw       []byte `json:"-"`
	Signature []byte `json:"-"`
}

// SignatureName is the file beside the manifest holding its signature: an
// OpenSSH signature (ssh-keygen -Y) of the manifest's bytes under
// SignatureNamespace. The manifest does not list it.
const SignatureName = "manifest.json.sig"

// SignatureNamespace is the namespace release signatures are made in.
const SignatureNamespace = "inflatrace-release"

// MaxSignatureBytes is the most a signature file may hold (an ed25519
// signature is about 300 bytes).
const MaxSignatureBytes = 64 << 10

// FormatName identifies the manifest format.
const FormatName = "inflatrace-archive/1"

// WriteManifest hashes every file in dir (except the manifest), streaming,
// and writes the manifest.
func WriteManifest(dir, toolVersion string, run pipeline.RunID, created time.Time) (Manifest, error) {
	m := Manifest{Format: FormatName, ToolVersion: toolVersion, Run: string(run), Created: created.UTC().Format(time.RFC3339)}
	files, err := regularFiles(dir)
	if err != nil {
		return m, err
	}
	for _, rel := range files {
		if rel == ManifestName || rel == SignatureName {
			continue
		}
		sum, n, err := hashFile(filepath.Join(dir, filepath.FromSlash(rel)))
		if err != nil {
			return m, err
		}
		m.Files = append(m.Files, Entry{Path: rel, SHA256: sum, Bytes: n})
	}
	data, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return m, err
	}
	m.Raw = append(data, '\n')
	return m, os.WriteFile(filepath.Join(dir, ManifestName), m.Raw, 0o644)
}

// regularFiles lists dir's files as sorted slash-separated relative paths,
// refusing anything but folders and regular files.
func regularFiles(dir string) ([]string, error) {
	var files []string
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		if !d.Type().IsRegular() {
			return fmt.Errorf("archive folder %s: %s is not a regular file", dir, p)
		}
		rel, err := filepath.Rel(dir, p)
		files = append(files, filepath.ToSlash(rel))
		return err
	})
	sort.Strings(files)
	return files, err
}

// hashFile returns the prefixed SHA-256 and the size of a file, reading it
// in pieces.
func hashFile(p string) (string, int64, error) {
	f, err := os.Open(p)
	if err != nil {
		return "", 0, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return "", 0, fmt.Errorf("hash %s: %w", p, err)
	}
	return pipeline.HashPrefix + hex.EncodeToString(h.Sum(nil)), n, nil
}

// Pack writes dir's files as a gzip-compressed tar at path: the manifest
// first, its signature (if any) second (so that a reader can check every later entry against it before
// writing any of it), then the other files in sorted order, with fixed
// modes and times, so the same files give the same bytes. Files are copied
// in pieces, never held whole in memory.
func Pack(dir, path string, modTime time.Time) error {
	files, err := regularFiles(dir)
	if err != nil {
		return err
	}
	ordered := []string{ManifestName}
	for _, rel := range files {
		if rel == SignatureName {
			ordered = append(ordered, rel) // second: read before any listed file
		}
	}
	for _, rel := range files {
		if rel != ManifestName && rel != SignatureName {
			ordered = append(ordered, rel)
		}
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return err
	}
	gz := gzip.NewWriter(f)
	tw := tar.NewWriter(gz)
	for _, rel := range ordered {
		if err = packFile(tw, filepath.Join(dir, filepath.FromSlash(rel)), rel, modTime); err != nil {
			break
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

// packFile appends one file to tw as entry name.
func packFile(tw *tar.Writer, p, name string, modTime time.Time) error {
	in, err := os.Open(p)
	if err != nil {
		return err
	}
	defer in.Close()
	info, err := in.Stat()
	if err != nil {
		return err
	}
	hdr := &tar.Header{Name: name, Mode: 0o644, Size: info.Size(), ModTime: modTime.UTC().Truncate(time.Second), Format: tar.FormatPAX}
	if err := tw.WriteHeader(hdr); err != nil {
		return fmt.Errorf("pack %s: %w", name, err)
	}
	if _, err := io.CopyN(tw, in, info.Size()); err != nil {
		return fmt.Errorf("pack %s: %w", name, err)
	}
	return nil
}

// TamperError reports an archive whose content does not match its
// manifest, or that holds something no archive inflatrace writes holds
// (a link, a device, a path leaving the archive).
type TamperError struct {
	Archive, File, Msg string
}

func (e *TamperError) Error() string {
	return fmt.Sprintf("archive %s refused: %s: %s (the archive was changed after it was written; ask its author for an intact copy)", e.Archive, e.File, e.Msg)
}

// TooLargeError reports an archive refused because it exceeds the total
// size a reader accepts (Limits.MaxBytes).
type TooLargeError struct {
	Archive, File string
	// Bytes is the size that would be reached, Limit the cap.
	Bytes, Limit int64
	// What says what was measured ("the manifest lists 3 files").
	What string
}

func (e *TooLargeError) Error() string {
	return fmt.Sprintf("archive %s refused: %s: %s totalling %s (%d bytes), more than the import limit of %s (%d bytes)",
		e.Archive, e.File, e.What, FormatSize(e.Bytes), e.Bytes, FormatSize(e.Limit), e.Limit)
}
