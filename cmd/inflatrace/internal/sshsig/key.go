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
// exist. created says whether it was made now.
func LoadOrCreate(path, comment string) (s ssh.Signer, created bool, err error) {
	data, err := os.ReadFile(path)
	if err == nil {
		s, err := ssh.ParsePrivateKey(data)
		if err != nil {
			return nil, false, fmt.Errorf("signing key %s: %w", path, err)
		}
		return s, false, nil
	}
	if !errors.Is(err, fs.ErrNotExist) {
		return nil, false, fmt.Errorf("signing key: %w", err)
	}
	s, err = Create(path, comment)
	return s, err == nil, err
}

// Create writes a new ed25519 signing key at path (replacing none: the file
// must not exist) and its public half at path + ".pub".
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
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return nil, fmt.Errorf("signing key: %w", err)
	}
	if _, err := f.Write(pemEncode(block.Type, block.Bytes)); err != nil {
		f.Close()
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return nil, fmt.Errorf("signing key %s: %w", path, err)
	}
	s, err := ssh.NewSignerFromKey(priv)
	if err != nil {
		return nil, err
	}
	pub := append(ssh.MarshalAuthorizedKey(s.PublicKey())[:len(ssh.MarshalAuthorizedKey(s.PublicKey()))-1], []byte(" "+comment+"\n")...)
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
