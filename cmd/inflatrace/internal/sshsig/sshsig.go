// Package sshsig writes and checks signatures in the OpenSSH signature
// format (the "SSHSIG" blob of OpenSSH's PROTOCOL.sshsig, armored between
// "-----BEGIN SSH SIGNATURE-----" lines), the format "ssh-keygen -Y sign"
// writes and "ssh-keygen -Y verify" checks. A referee can therefore check
// a release inflatrace signed with the OpenSSH tools alone:
//
//	ssh-keygen -Y verify -f allowed_signers -I <identity> -n <namespace> -s manifest.json.sig < manifest.json
//
// The signed message is hashed with SHA-512; the signature binds the
// namespace, so a signature made for one purpose cannot be passed off for
// another.
package sshsig

import (
	"bytes"
	"crypto/rand"
	"crypto/sha256"
	"crypto/sha512"
	"encoding/base64"
	"errors"
	"fmt"
	"hash"
	"strings"

	"golang.org/x/crypto/ssh"
)

const (
	magic       = "SSHSIG"
	sigVersion  = 1
	beginArmor  = "-----BEGIN SSH SIGNATURE-----"
	endArmor    = "-----END SSH SIGNATURE-----"
	armorWidth  = 70
	defaultHash = "sha512"
)

// blob is the signature blob of PROTOCOL.sshsig, after the magic.
type blob struct {
	Version   uint32
	PublicKey []byte
	Namespace string
	Reserved  string
	Hash      string
	Signature []byte
}

// signedData is what is actually signed: the magic, then these fields.
type signedData struct {
	Namespace string
	Reserved  string
	Hash      string
	Digest    []byte
}

func digest(alg string, msg []byte) ([]byte, error) {
	var h hash.Hash
	switch alg {
	case "sha512":
		h = sha512.New()
	case "sha256":
		h = sha256.New()
	default:
		return nil, fmt.Errorf("unsupported hash algorithm %q", alg)
	}
	h.Write(msg)
	return h.Sum(nil), nil
}

func toSign(namespace, alg string, msg []byte) ([]byte, error) {
	d, err := digest(alg, msg)
	if err != nil {
		return nil, err
	}
	return append([]byte(magic), ssh.Marshal(signedData{Namespace: namespace, Hash: alg, Digest: d})...), nil
}

// Sign signs msg under namespace and returns the armored signature.
func Sign(signer ssh.Signer, namespace string, msg []byte) ([]byte, error) {
	if namespace == "" {
		return nil, errors.New("sshsig: empty namespace")
	}
	data, err := toSign(namespace, defaultHash, msg)
	if err != nil {
		return nil, err
	}
	sig, err := signer.Sign(rand.Reader, data)
	if err != nil {
		return nil, fmt.Errorf("sshsig: sign: %w", err)
	}
	b := append([]byte(magic), ssh.Marshal(blob{Version: sigVersion, PublicKey: signer.PublicKey().Marshal(),
		Namespace: namespace, Hash: defaultHash, Signature: ssh.Marshal(sig)})...)
	enc := base64.StdEncoding.EncodeToString(b)
	var out bytes.Buffer
	out.WriteString(beginArmor + "\n")
	for len(enc) > armorWidth {
		out.WriteString(enc[:armorWidth] + "\n")
		enc = enc[armorWidth:]
	}
	out.WriteString(enc + "\n" + endArmor + "\n")
	return out.Bytes(), nil
}

// Verify checks an armored signature of msg under namespace and returns
// the public key that made it. It says nothing of whether that key is
// trusted: the caller decides (Allowed).
func Verify(armored []byte, namespace string, msg []byte) (ssh.PublicKey, error) {
	text := strings.TrimSpace(string(armored))
	if !strings.HasPrefix(text, beginArmor) || !strings.HasSuffix(text, endArmor) {
		return nil, errors.New("sshsig: not an armored SSH signature")
	}
	body := strings.Join(strings.Fields(text[len(beginArmor):len(text)-len(endArmor)]), "")
	raw, err := base64.StdEncoding.DecodeString(body)
	if err != nil {
		return nil, fmt.Errorf("sshsig: armor: %w", err)
	}
	if !bytes.HasPrefix(raw, []byte(magic)) {
		return nil, errors.New("sshsig: no SSHSIG magic")
	}
	var b blob
	if err := ssh.Unmarshal(raw[len(magic):], &b); err != nil {
		return nil, fmt.Errorf("sshsig: blob: %w", err)
	}
	if b.Version != sigVersion {
		return nil, fmt.Errorf("sshsig: version %d, want %d", b.Version, sigVersion)
	}
	if b.Namespace != namespace {
		return nil, fmt.Errorf("sshsig: signed for namespace %q, want %q", b.Namespace, namespace)
	}
	pub, err := ssh.ParsePublicKey(b.PublicKey)
	if err != nil {
		return nil, fmt.Errorf("sshsig: public key: %w", err)
	}
	var sig ssh.Signature
	if err := ssh.Unmarshal(b.Signature, &sig); err != nil {
		return nil, fmt.Errorf("sshsig: signature: %w", err)
	}
	data, err := toSign(namespace, b.Hash, msg)
	if err != nil {
		return nil, fmt.Errorf("sshsig: %w", err)
	}
	if err := pub.Verify(data, &sig); err != nil {
		return nil, fmt.Errorf("sshsig: the signature does not match the message (%v)", err)
	}
	return pub, nil
}

// Fingerprint is a key's SHA-256 fingerprint as OpenSSH prints it.
func Fingerprint(k ssh.PublicKey) string { return ssh.FingerprintSHA256(k) }

// Signer is one line of an allowed-signers file (ssh-keygen(1), "ALLOWED
// SIGNERS"): principals and a key; options are not supported and such a
// line is refused.
type Signer struct {
	Principals string
	Key        ssh.PublicKey
}

// ParseAllowed reads an allowed-signers file: one "principals keytype
// base64-key [comment]" a line, blank lines and # comments ignored. file
// names it in errors.
func ParseAllowed(file string, data []byte) ([]Signer, error) {
	var out []Signer
	for i, line := range strings.Split(string(data), "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		principals, rest, ok := strings.Cut(line, " ")
		if !ok {
			return nil, fmt.Errorf("%s:%d: want \"principals keytype key\"", file, i+1)
		}
		key, _, _, _, err := ssh.ParseAuthorizedKey([]byte(strings.TrimSpace(rest)))
		if err != nil {
			return nil, fmt.Errorf("%s:%d: key: %v (options are not supported)", file, i+1, err)
		}
		out = append(out, Signer{Principals: principals, Key: key})
	}
	return out, nil
}

// AllowedLine is key's line in an allowed-signers file for principal.
func AllowedLine(principal string, key ssh.PublicKey) string {
	return principal + " " + strings.TrimSpace(string(ssh.MarshalAuthorizedKey(key)))
}

// Find returns the signer whose key is k, if any.
func Find(signers []Signer, k ssh.PublicKey) (Signer, bool) {
	for _, s := range signers {
		if bytes.Equal(s.Key.Marshal(), k.Marshal()) {
			return s, true
		}
	}
	return Signer{}, false
}
