package sshsig

import (
	"crypto/ed25519"
	"crypto/rand"
	"crypto/sha256"
	"encoding/pem"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"

	"golang.org/x/crypto/ssh"
)

func pemEncode(typ string, b []byte) []byte {
	return pem.EncodeToMemory(&pem.Block{Type: typ, Bytes: b})
}

// LoadOrCreate reads the ed25519 signing key at path (OpenSSH private-key
// format, readable by ssh-keygen), creating it (mode 0600, its folder
// 0700) with its public half beside it (path + ".pub") if it does not
// exist. created says whether it was made now. Processes that start at
// once (the shards of a cluster job) agree on one key: a key is written
// whole under another name and linked into place, and a process that
// loses the race reads the winner's.
func LoadOrCreate(path, comment string) (s ssh.Signer, created bool, err error) {
	if s, err := load(path); err == nil || !errors.Is(err, fs.ErrNotExist) {
		return s, false, err
	}
	s, err = Create(path, comment)
	if errors.Is(err, fs.ErrExist) {
		s, err = load(path)
		return s, false, err
	}
	return s, err == nil, err
}

func load(path string) (ssh.Signer, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, err
		}
		return nil, fmt.Errorf("signing key: %w", err)
	}
	s, err := ssh.ParsePrivateKey(data)
	if err != nil {
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	return s, nil
}

// Create writes a new ed25519 signing key at path and its public half at
// path + ".pub". It never replaces a key: if path exists the error wraps
// fs.ErrExist.
func Create(path, comment string) (ssh.Signer, error) {
	if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
		return nil, fmt.Errorf("signing key: %w", err)
	}
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		return nil, fmt.Errorf("signing key: %w", err)
	}
	block, err := ssh.MarshalPrivateKey(priv, comment)
	if err != nil {
		return nil, fmt.Errorf("signing key: %w", err)
	}
	s, err := ssh.NewSignerFromKey(priv)
	if err != nil {
		return nil, err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), ".signing_key-*")
	if err != nil {
		return nil, fmt.Errorf("signing key: %w", err)
	}
	defer os.Remove(tmp.Name())
	if err := tmp.Chmod(0o600); err != nil {
		tmp.Close()
		return nil, fmt.Errorf("signing key: %w", err)
	}
	if _, err := tmp.Write(pemEncode(block.Type, block.Bytes)); err != nil {
		tmp.Close()
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	if err := os.Link(tmp.Name(), path); err != nil {
		if errors.Is(err, fs.ErrExist) {
			return nil, fmt.Errorf("signing key %s: %w", path, fs.ErrExist)
		}
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	line := ssh.MarshalAuthorizedKey(s.PublicKey())
	pub := append(line[:len(line)-1], []byte(" "+comment+"\n")...)
	if err := os.WriteFile(path+".pub", pub, 0o644); err != nil {
		return nil, fmt.Errorf("signing key %s.pub: %w", path, err)
	}
	return s, nil
}

// Secret derives a 32-byte secret from the ed25519 key at path, for
// authentication codes only its holder can make: SHA-256 of a label and
// the key's seed.
func Secret(path, label string) ([]byte, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("signing key: %w", err)
	}
	raw, err := ssh.ParseRawPrivateKey(data)
	if err != nil {
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	var seed []byte
	switch k := raw.(type) {
	case *ed25519.PrivateKey:
		seed = k.Seed()
	case ed25519.PrivateKey:
		seed = k.Seed()
	default:
		return nil, fmt.Errorf("signing key %s: a %T, want ed25519", path, raw)
	}
	h := sha256.New()
	h.Write([]byte(label))
	h.Write(seed)
	return h.Sum(nil), nil
}
