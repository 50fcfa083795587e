package archive

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"strings"
	"syscall"

	"github.com/inflatrace/inflatrace/pipeline"
)

// DefaultMaxBytes is the default cap on the total size of an archive's
// files (the manifest aside): 4 GiB.
const DefaultMaxBytes int64 = 4 << 30

// MaxManifestBytes is the most a manifest may hold. It is read whole into
// memory; a manifest of inflatrace's is a few kilobytes (one line per file,
// and an archive has a few dozen files).
const MaxManifestBytes = 8 << 20

// Limits bound what reading an archive may consume.
type Limits struct {
	// MaxBytes caps the total size of the archive's files (the manifest
	// aside), as listed and as read; 0 means DefaultMaxBytes.
	MaxBytes int64
}

func (l Limits) maxBytes() int64 {
	if l.MaxBytes <= 0 {
		return DefaultMaxBytes
	}
	return l.MaxBytes
}

// VerifyTar checks the .tar.gz at path against its manifest and writes the
// files named in keep, checked, under dst (a folder the caller owns and
// removes; on an error it may hold part of a kept file). Every other file
// is hashed and dropped. Nothing is written that is not in the manifest
// with its size, and the total stays within lim.
//
// An archive whose manifest is not its first entry (as Pack wrote them
// before the manifest went first) is read twice: once to find the
// manifest, skipping at most lim's total, and once to check.
func VerifyTar(path, dst string, keep []string, lim Limits) (Manifest, error) {
	m, manifestSum, err := tarManifest(path, lim)
	if err != nil {
		return m, err
	}
	c, err := newChecker(path, m, keep, lim)
	if err != nil {
		return m, err
	}
	manifestSeen := false
	err = eachTarEntry(path, func(hdr *tar.Header, r io.Reader) (bool, error) {
		k := tarKind(hdr)
		if hdr.Name == ManifestName && k.regular {
			if manifestSeen {
				return false, &TamperError{path, ManifestName, "appears twice"}
			}
			manifestSeen = true
			sum, data, err := readManifest(path, r, hdr.Size)
			if err == nil && sum != manifestSum {
				err = &TamperError{path, ManifestName, "changed while the archive was read"}
			}
			m.Raw = data
			return true, err
		}
		if hdr.Name == SignatureName && k.regular {
			if m.Signature != nil {
				return false, &TamperError{path, SignatureName, "appears twice"}
			}
			m.Signature, err = readSignature(path, r, hdr.Size)
			return true, err
		}
		e, err := c.admit(hdr.Name, k, hdr.Size)
		if err != nil || !k.regular {
			return true, err
		}
		return true, c.copyEntry(e, r, dst)
	})
	if err != nil {
		return m, err
	}
	return m, c.finish()
}

// VerifyDir checks the archive folder dir against its manifest, by the
// rules VerifyTar applies: links, devices, pipes and sockets are refused
// (never followed), as are files the manifest does not list or lists with
// another size. The files named in keep are copied, checked, under dst.
func VerifyDir(dir, dst string, keep []string, lim Limits) (Manifest, error) {
	var m Manifest
	root, err := filepath.EvalSymlinks(dir) // the folder named itself may be a link
	if err != nil {
		return m, err
	}
	f, size, err := openRegular(dir, root, ManifestName)
	if err != nil {
		return m, err
	}
	_, data, err := readManifest(dir, f, size)
	f.Close()
	if err != nil {
		return m, err
	}
	if m, err = decodeManifest(dir, data); err != nil {
		return m, err
	}
	m.Raw = data
	if sf, size, err := openRegular(dir, root, SignatureName); err == nil {
		m.Signature, err = readSignature(dir, sf, size)
		sf.Close()
		if err != nil {
			return m, err
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		return m, err
	}
	c, err := newChecker(dir, m, keep, lim)
	if err != nil {
		return m, err
	}
	err = filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, err := filepath.Rel(root, p)
		if err != nil {
			return err
		}
		rel = filepath.ToSlash(rel)
		if rel == "." || rel == ManifestName || rel == SignatureName {
			return nil
		}
		info, err := d.Info() // WalkDir gives lstat information: links are not followed
		if err != nil {
			return err
		}
		k := modeKind(info.Mode(), p)
		e, err := c.admit(rel, k, info.Size())
		if err != nil || !k.regular {
			return err
		}
		f, _, err := openRegular(dir, root, rel)
		if err != nil {
			return err
		}
		defer f.Close()
		return c.copyEntry(e, f, dst)
	})
	if err != nil {
		return m, err
	}
	return m, c.finish()
}

// openRegular opens root/rel without following a link and without
// blocking on a pipe, and checks that what was opened is a regular file.
func openRegular(archive, root, rel string) (*os.File, int64, error) {
	p := filepath.Join(root, filepath.FromSlash(rel))
	f, err := os.OpenFile(p, os.O_RDONLY|syscall.O_NOFOLLOW|syscall.O_NONBLOCK, 0)
	if err != nil {
		if info, lerr := os.Lstat(p); lerr == nil {
			if k := modeKind(info.Mode(), p); !k.regular {
				return nil, 0, &TamperError{archive, rel, k.refusal}
			}
		}
		if errors.Is(err, fs.ErrNotExist) && rel == ManifestName {
			return nil, 0, &TamperError{archive, rel, "missing"}
		}
		return nil, 0, err
	}
	info, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, 0, err
	}
	if k := modeKind(info.Mode(), p); !k.regular {
		f.Close()
		return nil, 0, &TamperError{archive, rel, k.refusal}
	}
	return f, info.Size(), nil
}

// kind classifies an archive entry: a regular file, a folder, or something
// refused, with the reason.
type kind struct {
	regular, dir bool
	refusal      string
}

func tarKind(h *tar.Header) kind {
	switch h.Typeflag {
	case tar.TypeReg:
		return kind{regular: true}
	case tar.TypeDir:
		return kind{dir: true, refusal: "a folder where a file belongs"}
	case tar.TypeSymlink:
		return kind{refusal: fmt.Sprintf("a symbolic link (to %q); archives hold regular files only", h.Linkname)}
	case tar.TypeLink:
		return kind{refusal: fmt.Sprintf("a hard link (to %q); archives hold regular files only", h.Linkname)}
	case tar.TypeChar, tar.TypeBlock:
		return kind{refusal: "a device file; archives hold regular files only"}
	case tar.TypeFifo:
		return kind{refusal: "a named pipe (FIFO); archives hold regular files only"}
	}
	return kind{refusal: fmt.Sprintf("a tar entry of type %q; archives hold regular files only", h.Typeflag)}
}

func modeKind(m fs.FileMode, p string) kind {
	switch {
	case m.IsRegular():
		return kind{regular: true}
	case m.IsDir():
		return kind{dir: true, refusal: "a folder where a file belongs"}
	case m&fs.ModeSymlink != 0:
		target, _ := os.Readlink(p)
		return kind{refusal: fmt.Sprintf("a symbolic link (to %q); archives hold regular files only", target)}
	case m&fs.ModeDevice != 0:
		return kind{refusal: "a device file; archives hold regular files only"}
	case m&fs.ModeNamedPipe != 0:
		return kind{refusal: "a named pipe (FIFO); archives hold regular files only"}
	case m&fs.ModeSocket != 0:
		return kind{refusal: "a socket; archives hold regular files only"}
	}
	return kind{refusal: "not a regular file; archives hold regular files only"}
}

// checker holds one archive's manifest and what has been read of it. It is
// the one set of rules both VerifyTar and VerifyDir apply.
type checker struct {
	archive string
	limit   int64
	listed  map[string]Entry
	keep    map[string]bool
	seen    map[string]bool
	total   int64
}

// newChecker validates a manifest's list: every path safe and listed
// once, every hash well-formed, every size given, and the sizes' total
// within the limit (so an archive too large is refused before anything is
// extracted); every kept file must be listed.
func newChecker(archive string, m Manifest, keep []string, lim Limits) (*checker, error) {
	c := &checker{archive: archive, limit: lim.maxBytes(), listed: map[string]Entry{}, keep: map[string]bool{}, seen: map[string]bool{}}
	var total int64
	for _, e := range m.Files {
		if msg := unsafePath(e.Path, false); msg != "" {
			return nil, &TamperError{archive, ManifestName, fmt.Sprintf("lists %q: %s", e.Path, msg)}
		}
		if e.Path == ManifestName {
			return nil, &TamperError{archive, ManifestName, "lists itself"}
		}
		if _, dup := c.listed[e.Path]; dup {
			return nil, &TamperError{archive, ManifestName, fmt.Sprintf("lists %s twice", e.Path)}
		}
		if !wellFormedSum(e.SHA256) {
			return nil, &TamperError{archive, ManifestName, fmt.Sprintf("lists %s with hash %q, not %s and 64 hex digits", e.Path, e.SHA256, pipeline.HashPrefix)}
		}
		if e.Bytes < 0 {
			return nil, &TamperError{archive, ManifestName, fmt.Sprintf("lists %s with %d bytes", e.Path, e.Bytes)}
		}
		if total += e.Bytes; total > c.limit || total < 0 {
			return nil, &TooLargeError{Archive: archive, File: ManifestName, Bytes: sumSizes(m.Files), Limit: c.limit,
				What: fmt.Sprintf("the manifest lists %d files", len(m.Files))}
		}
		c.listed[e.Path] = e
	}
	for _, k := range keep {
		if _, ok := c.listed[k]; !ok {
			return nil, &TamperError{archive, ManifestName, "does not list " + k}
		}
		c.keep[k] = true
	}
	return c, nil
}

// sumSizes adds sizes, saturating at the largest int64.
func sumSizes(files []Entry) int64 {
	var t int64
	for _, e := range files {
		if e.Bytes > 0 && t > (1<<63-1)-e.Bytes {
			return 1<<63 - 1
		}
		t += e.Bytes
	}
	return t
}

func wellFormedSum(s string) bool {
	h, ok := strings.CutPrefix(s, pipeline.HashPrefix)
	if !ok || len(h) != 2*sha256.Size || strings.ToLower(h) != h {
		return false
	}
	_, err := hex.DecodeString(h)
	return err == nil
}

// unsafePath says why an entry name may not be written under a folder, or
// returns "": a relative, slash-separated path in clean form, with no ".."
// and no backslash (a separator on Windows). A folder's name may end in
// "/" and may be ".".
func unsafePath(name string, dir bool) string {
	if dir {
		name = strings.TrimSuffix(name, "/")
		if name == "." || name == "" {
			return ""
		}
	}
	switch {
	case name == "":
		return "an empty path"
	case strings.HasPrefix(name, "/") || filepath.IsAbs(name):
		return "an absolute path; the path leaves the archive"
	case strings.ContainsRune(name, '\\'):
		return "a path with a backslash"
	case name == ".." || strings.HasPrefix(name, "../") || strings.HasSuffix(name, "/..") || strings.Contains(name, "/../"):
		return "a path with a \"..\" component; the path leaves the archive"
	case path.Clean(name) != name:
		return fmt.Sprintf("a path not in clean form (%q)", path.Clean(name))
	}
	return ""
}

// admit checks an entry before any of its content is read: its path and
// kind, that the manifest lists it, only once, with this size, and that the
// running total stays within the limit. It returns the manifest's entry.
func (c *checker) admit(name string, k kind, size int64) (Entry, error) {
	if msg := unsafePath(name, k.dir); msg != "" {
		return Entry{}, &TamperError{c.archive, name, msg}
	}
	if k.dir {
		return Entry{}, nil
	}
	if !k.regular {
		return Entry{}, &TamperError{c.archive, name, k.refusal}
	}
	e, ok := c.listed[name]
	if !ok {
		return e, &TamperError{c.archive, name, "not listed in the manifest"}
	}
	if c.seen[name] {
		return e, &TamperError{c.archive, name, "appears twice"}
	}
	c.seen[name] = true
	if size != e.Bytes {
		return e, &TamperError{c.archive, name, fmt.Sprintf("%d bytes, the manifest lists %d", size, e.Bytes)}
	}
	if c.total+size > c.limit {
		return e, &TooLargeError{Archive: c.archive, File: name, Bytes: c.total + size, Limit: c.limit, What: "the files read so far"}
	}
	c.total += size
	return e, nil
}

// copyEntry streams an admitted entry's content through SHA-256, into a
// file under dst when it is kept and otherwise nowhere. At most the
// declared size plus one byte is read, so an entry longer than declared is
// caught without reading the rest of it.
func (c *checker) copyEntry(e Entry, r io.Reader, dst string) (err error) {
	w := io.Discard
	if c.keep[e.Path] {
		out := filepath.Join(dst, filepath.FromSlash(e.Path))
		if err := os.MkdirAll(filepath.Dir(out), 0o755); err != nil {
			return err
		}
		f, err := os.OpenFile(out, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if err != nil {
			return err
		}
		defer func() {
			if cerr := f.Close(); err == nil {
				err = cerr
			}
		}()
		w = f
	}
	h := sha256.New()
	src := &readErr{r: io.LimitReader(r, e.Bytes+1)}
	n, err := io.Copy(io.MultiWriter(h, w), src)
	if src.err != nil {
		return &TamperError{c.archive, e.Path, "unreadable: " + src.err.Error()}
	}
	if err != nil {
		return fmt.Errorf("archive %s: copy %s: %w", c.archive, e.Path, err)
	}
	got := pipeline.HashPrefix + hex.EncodeToString(h.Sum(nil))
	if n != e.Bytes || got != e.SHA256 {
		more := ""
		if n > e.Bytes {
			more = " or more"
		}
		return &TamperError{c.archive, e.Path, fmt.Sprintf("expected %s (%d bytes), found %s (%d bytes%s)", e.SHA256, e.Bytes, got, n, more)}
	}
	return nil
}

// finish reports a listed file the archive does not hold.
func (c *checker) finish() error {
	for p := range c.listed {
		if !c.seen[p] {
			return &TamperError{c.archive, p, "listed in the manifest but missing"}
		}
	}
	return nil
}

// readErr remembers the error of a reader other than io.EOF, so that a
// failed read (a corrupt archive) is told from a failed write (a full disk).
type readErr struct {
	r   io.Reader
	err error
}

func (r *readErr) Read(p []byte) (int, error) {
	n, err := r.r.Read(p)
	if err != nil && err != io.EOF {
		r.err = err
	}
	return n, err
}

// readManifest reads a manifest of at most MaxManifestBytes from r (size
// is what the header or the file system says, checked first) and returns
// the SHA-256 of its bytes and the bytes.
func readManifest(archive string, r io.Reader, size int64) (string, []byte, error) {
	if size > MaxManifestBytes {
		return "", nil, &TamperError{archive, ManifestName, fmt.Sprintf("%d bytes, more than the %d a manifest may hold", size, MaxManifestBytes)}
	}
	src := &readErr{r: io.LimitReader(r, MaxManifestBytes+1)}
	data, err := io.ReadAll(src) // bounded: at most MaxManifestBytes+1 bytes
	if err != nil {
		return "", nil, &TamperError{archive, ManifestName, "unreadable: " + err.Error()}
	}
	if len(data) > MaxManifestBytes {
		return "", nil, &TamperError{archive, ManifestName, fmt.Sprintf("more than the %d bytes a manifest may hold", MaxManifestBytes)}
	}
	return pipeline.Sum(data), data, nil
}

// decodeManifest parses a manifest and checks its format; every file must
// give its size (the bytes field, written by every inflatrace release):
// without it nothing could be checked before extraction.
func decodeManifest(archive string, data []byte) (Manifest, error) {
	var raw struct {
		Manifest
		Files []struct {
			Path   string `json:"path"`
			SHA256 string `json:"sha256"`
			Bytes  *int64 `json:"bytes"`
		} `json:"files"`
	}
	var m Manifest
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&raw); err != nil {
		return m, &TamperError{archive, ManifestName, "not a manifest: " + err.Error()}
	}
	m = raw.Manifest
	if m.Format != FormatName {
		return m, &TamperError{archive, ManifestName, fmt.Sprintf("format %q, want %q", m.Format, FormatName)}
	}
	m.Files = nil
	for _, f := range raw.Files {
		if f.Bytes == nil {
			return m, &TamperError{archive, ManifestName, fmt.Sprintf("lists %s without its size (bytes); sizes are needed to check an archive before extracting it", f.Path)}
		}
		m.Files = append(m.Files, Entry{Path: f.Path, SHA256: f.SHA256, Bytes: *f.Bytes})
	}
	return m, nil
}

// tarManifest finds and decodes the manifest of a .tar.gz, returning it
// and the SHA-256 of its bytes. Entries before it are skipped; their
// declared sizes count against the limit.
func tarManifest(p string, lim Limits) (Manifest, string, error) {
	var m Manifest
	var sum string
	var skipped int64
	found := false
	err := eachTarEntry(p, func(hdr *tar.Header, r io.Reader) (bool, error) {
		if hdr.Name != ManifestName {
			if skipped += hdr.Size; skipped > lim.maxBytes() || skipped < 0 {
				return false, &TooLargeError{Archive: p, File: hdr.Name, Bytes: skipped, Limit: lim.maxBytes(), What: "the entries before the manifest"}
			}
			return true, nil
		}
		if k := tarKind(hdr); !k.regular {
			return false, &TamperError{p, ManifestName, k.refusal}
		}
		s, data, err := readManifest(p, r, hdr.Size)
		if err != nil {
			return false, err
		}
		found, sum = true, s
		m, err = decodeManifest(p, data)
		return false, err
	})
	if err == nil && !found {
		err = &TamperError{p, ManifestName, "missing"}
	}
	return m, sum, err
}

// eachTarEntry calls fn with every entry of the .tar.gz at p until fn
// returns false or an error. Errors of the gzip or tar format are
// refusals (TamperError).
func eachTarEntry(p string, fn func(*tar.Header, io.Reader) (bool, error)) error {
	f, err := os.Open(p)
	if err != nil {
		return err
	}
	defer f.Close()
	gz, err := gzip.NewReader(f)
	if err != nil {
		return &TamperError{p, "(gzip stream)", "not gzip-compressed: " + err.Error()}
	}
	defer gz.Close()
	tr := tar.NewReader(gz)
	for {
		hdr, err := tr.Next()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return &TamperError{p, "(tar stream)", "not a readable tar: " + err.Error()}
		}
		more, err := fn(hdr, tr)
		if err != nil || !more {
			return err
		}
	}
}

// readSignature reads a signature file of at most MaxSignatureBytes.
func readSignature(archive string, r io.Reader, size int64) ([]byte, error) {
	if size > MaxSignatureBytes {
		return nil, &TamperError{archive, SignatureName, fmt.Sprintf("holds %d bytes; a signature holds at most %d", size, MaxSignatureBytes)}
	}
	data, err := io.ReadAll(io.LimitReader(r, MaxSignatureBytes+1))
	if err != nil {
		return nil, err
	}
	if int64(len(data)) > MaxSignatureBytes {
		return nil, &TamperError{archive, SignatureName, "longer than its header says"}
	}
	if data == nil {
		data = []byte{}
	}
	return data, nil
}
