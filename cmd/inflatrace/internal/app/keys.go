package app

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"golang.org/x/crypto/ssh"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/sshsig"
	"github.com/inflatrace/inflatrace/ledger"
	"github.com/inflatrace/inflatrace/pipeline"
)

// KeyEnv names a signing-key file to use instead of the one in the user's
// configuration folder.
const KeyEnv = "INFLATRACE_KEY"

// ConfigDir is the user's inflatrace configuration folder:
// $XDG_CONFIG_HOME/inflatrace, else ~/.config/inflatrace. It holds the
// signing key (signing_key, signing_key.pub) and the keys the user trusts
// (allowed_signers, in ssh-keygen's allowed-signers format).
func (e *Env) ConfigDir() (string, error) {
	if d := e.Getenv("XDG_CONFIG_HOME"); d != "" {
		return filepath.Join(d, "inflatrace"), nil
	}
	if h := e.Getenv("HOME"); h != "" {
		return filepath.Join(h, ".config", "inflatrace"), nil
	}
	return "", errors.New("no configuration folder: neither XDG_CONFIG_HOME nor HOME is set")
}

// KeyPath is the signing key's file.
func (e *Env) KeyPath() (string, error) {
	if p := e.Getenv(KeyEnv); p != "" {
		return p, nil
	}
	d, err := e.ConfigDir()
	if err != nil {
		return "", err
	}
	return filepath.Join(d, "signing_key"), nil
}

// Principal names the user in allowed-signers lines: user@host.
func (e *Env) Principal() string {
	u := e.Getenv("USER")
	if u == "" {
		u = "inflatrace"
	}
	h, _ := os.Hostname()
	if h == "" {
		h = "localhost"
	}
	return u + "@" + h
}

// SigningKey returns the user's signing key, creating it on first use (and
// saying so on stderr).
func (e *Env) SigningKey() (ssh.Signer, error) {
	p, err := e.KeyPath()
	if err != nil {
		return nil, err
	}
	s, created, err := sshsig.LoadOrCreate(p, e.Principal())
	if err != nil {
		return nil, err
	}
	if created {
		fmt.Fprintf(e.Stderr, "created signing key %s (%s); \"inflatrace key\" shows it\n", p, sshsig.Fingerprint(s.PublicKey()))
	}
	return s, nil
}

// TrustedSigners are the keys the user trusts: their own key, if it
// exists, and the allowed_signers file of the configuration folder.
func (e *Env) TrustedSigners() ([]sshsig.Signer, string, error) {
	var out []sshsig.Signer
	if p, err := e.KeyPath(); err == nil {
		if data, err := os.ReadFile(p + ".pub"); err == nil {
			if k, _, _, _, err := ssh.ParseAuthorizedKey(data); err == nil {
				out = append(out, sshsig.Signer{Principals: "you", Key: k})
			}
		}
	}
	for _, f := range e.retiredKeys() {
		if data, err := os.ReadFile(f + ".pub"); err == nil {
			if k, _, _, _, err := ssh.ParseAuthorizedKey(data); err == nil {
				out = append(out, sshsig.Signer{Principals: "you (retired key " + filepath.Base(f) + ")", Key: k})
			}
		}
	}
	d, err := e.ConfigDir()
	if err != nil {
		return out, "", nil
	}
	file := filepath.Join(d, "allowed_signers")
	data, err := os.ReadFile(file)
	if errors.Is(err, fs.ErrNotExist) {
		return out, file, nil
	}
	if err != nil {
		return nil, file, err
	}
	more, err := sshsig.ParseAllowed(file, data)
	if err != nil {
		return nil, file, Usage(err)
	}
	return append(out, more...), file, nil
}

// SealNamespace is the namespace seals are signed in.
const SealNamespace = "inflatrace-seal"

// signSeal signs a seal message with the user's key (ledger.WithSealSigner).
func (e *Env) signSeal(msg []byte) ([]byte, error) {
	s, err := e.SigningKey()
	if err != nil {
		return nil, err
	}
	return sshsig.Sign(s, SealNamespace, msg)
}

// nodeKey is the secret the user's nodes are authenticated under
// (ledger.WithNodeKey), derived from their signing key (made if needed).
func (e *Env) nodeKey() ([]byte, error) {
	if _, err := e.SigningKey(); err != nil {
		return nil, err
	}
	p, err := e.KeyPath()
	if err != nil {
		return nil, err
	}
	return sshsig.Secret(p, nodeSecretLabel)
}

// nodeSecretLabel labels the node secret derived from a signing key.
const nodeSecretLabel = "inflatrace node authentication v1\n"

// retiredKeys are the files of the user's retired signing keys (key
// --rotate keeps each beside the key, renamed KEY.retired-DATE), oldest
// first. A key the user deletes is no longer retired but revoked: the
// codes and seals it made vouch for nothing.
func (e *Env) retiredKeys() []string {
	p, err := e.KeyPath()
	if err != nil {
		return nil
	}
	all, _ := filepath.Glob(p + ".retired-*")
	var out []string
	for _, f := range all {
		if !strings.HasSuffix(f, ".pub") {
			out = append(out, f)
		}
	}
	sort.Strings(out)
	return out
}

// retiredNodeKeys are the node secrets of the retired keys
// (ledger.WithRetiredNodeKeys): nodes written before a rotation stay
// vouched for. A retired key that cannot be read is passed over.
func (e *Env) retiredNodeKeys() [][]byte {
	var out [][]byte
	for _, f := range e.retiredKeys() {
		if k, err := sshsig.Secret(f, nodeSecretLabel); err == nil {
			out = append(out, k)
		}
	}
	return out
}

// VouchTrusted gives the user's authentication codes to the nodes of
// those of runs whose seals are signed by a key the user trusts (runs
// merged from the user's own cluster shards, or a trusted colleague's),
// and names the others, whose nodes a later run computes again rather
// than reuse.
func (e *Env) VouchTrusted(ctx context.Context, l *ledger.Ledger, runs []pipeline.RunID) error {
	if len(runs) == 0 {
		return nil
	}
	trusted, file, err := e.TrustedSigners()
	if err != nil {
		return err
	}
	for _, id := range runs {
		d, err := l.Run(ctx, id)
		if err != nil {
			return err
		}
		ok := false
		if d.Seal != "" && d.SealSignature != "" {
			pub, err := SealSigner(id, d.Seal, d.SealSignature)
			ok = err == nil && Trusted(trusted, pub)
		}
		if !ok {
			fmt.Fprintf(e.Stderr, "run %s is not sealed by a key you trust (%s lists them): its nodes are not reused until verify %s recomputes it\n", id, file, id)
			continue
		}
		if _, err := l.Vouch(ctx, id); err != nil {
			return err
		}
	}
	return nil
}

// SealSigner checks a seal's signature and returns the key that made it.
func SealSigner(run pipeline.RunID, seal, signature string) (ssh.PublicKey, error) {
	return sshsig.Verify([]byte(signature), SealNamespace, ledger.SealMessage(run, seal))
}

// Trusted says whether key is among the trusted signers.
func Trusted(trusted []sshsig.Signer, key ssh.PublicKey) bool {
	_, ok := sshsig.Find(trusted, key)
	return ok
}
